package runcmd

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
	"github.com/inflatrace/inflatrace/stages/study/edit"
)

// editFlag is a repeatable --set, --add or --drop flag; every one appends
// to the same list, so that edits apply in command-line order.
type editFlag struct {
	kind  edit.Kind
	edits *[]edit.Edit
}

func (f *editFlag) String() string { return "" }

func (f *editFlag) Type() string {
	if f.kind == edit.Drop {
		return "PATH"
	}
	return "PATH=VALUE"
}

func (f *editFlag) Set(arg string) error {
	e, err := edit.ParseFlag(f.kind, arg)
	if err != nil {
		return err
	}
	*f.edits = append(*f.edits, e)
	return nil
}

// load returns the checked study to run: the CONFIG file, or the text
// recorded with --from's run, edited by the --set, --add and --drop flags
// (and written to --write-config), and the run it derives from ("" for a
// file).
func load(ctx context.Context, o *Options) (*study.Study, pipeline.RunID, error) {
	switch {
	case o.Config != "" && o.From != "":
		return nil, "", app.Usage(fmt.Errorf("give a CONFIG file or --from RUN, not both"))
	case o.Config == "" && o.From == "":
		return nil, "", app.Usage(fmt.Errorf("give a CONFIG file, or --from RUN to re-run a recorded run"))
	case (o.WriteConfig != "" || o.DryRun) && len(o.Edits) == 0 && o.From == "":
		return nil, "", app.Usage(fmt.Errorf("--write-config and --dry-run go with --from RUN or with --set, --add or --drop"))
	}
	if o.Config != "" && len(o.Edits) == 0 {
		s, err := study.Load(o.Config)
		if err != nil {
			return nil, "", app.Usage(err)
		}
		return s, "", nil
	}
	var (
		text []byte
		file string
		dir  string
		from pipeline.RunID
	)
	if o.From != "" {
		l, err := o.Env.OpenLedger(o.Globals)
		if err != nil {
			return nil, "", err
		}
		defer l.Close()
		id, err := l.ResolveRun(ctx, o.From)
		if err != nil {
			return nil, "", fmt.Errorf("--from %s: %w", o.From, err)
		}
		run, err := l.Run(ctx, id)
		if err != nil {
			return nil, "", fmt.Errorf("--from %s: %w", o.From, err)
		}
		text, from = []byte(run.ConfigText), id
		// The recorded path may carry a suffix (" [shard 1/4]", " [from …]");
		// its directory still resolves relative constraint files.
		orig := app.RecordedFile(run.ConfigPath)
		dir = filepath.Dir(orig)
		file = orig + " [from " + string(id) + "]"
	} else {
		data, err := os.ReadFile(o.Config)
		if err != nil {
			return nil, "", app.Usage(fmt.Errorf("read config: %w", err))
		}
		text, dir, file = data, filepath.Dir(o.Config), o.Config+" [edited]"
	}
	for i, e := range o.Edits {
		var err error
		if text, err = edit.Apply(text, o.Edits[i:i+1]); err != nil {
			return nil, "", app.Usage(fmt.Errorf("%s: %w", e, err))
		}
	}
	s, err := study.Parse(file, text, dir)
	if err != nil {
		return nil, "", app.Usage(blame(o.Edits, err))
	}
	if o.WriteConfig != "" {
		if err := os.WriteFile(o.WriteConfig, text, 0o644); err != nil {
			return nil, "", fmt.Errorf("--write-config: %w", err)
		}
	}
	return s, from, nil
}

// blame names the edit a configuration error comes from, when its path is
// the edit's or lies inside it.
func blame(edits []edit.Edit, err error) error {
	var ce *study.ConfigError
	if !errors.As(err, &ce) || ce.Path == "" {
		return err
	}
	for i := len(edits) - 1; i >= 0; i-- {
		p := edits[i].Path
		if ce.Path == p || strings.HasPrefix(ce.Path, p+".") || strings.HasPrefix(ce.Path, p+"[") {
			return fmt.Errorf("%s: %w", edits[i], err)
		}
	}
	return err
}
