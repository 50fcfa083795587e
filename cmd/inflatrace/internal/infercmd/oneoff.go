package infercmd

import (
	"errors"
	"fmt"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/stages/study"
)

// OneOff holds the flags of a one-off inference (no study file): one
// model family with its priors against the named constraint sets.
type OneOff struct {
	Family      string
	Params      []string // name=VALUE or name=uniform:lo,hi or name=log_uniform:lo,hi
	WReh        string   // VALUE or uniform:lo,hi
	NReh        string
	NStar       string
	TMinGeV     string
	Constraints []string
	CFiles      []string
	Forecasts   []string
	FFiles      []string
	Independent bool
	Tolerance   string
	Label       string
}

// oneOffFile names the study a one-off inference builds, in the ledger
// and in messages.
const oneOffFile = "(infer flags)"

// Study builds the study the flags describe, as the text of a study file
// (so that the run records it, `show` prints it and a user can keep it),
// and parses it with the study's own checks. An error of the study names
// the flag that wrote the offending line.
func (o *OneOff) Study() (*study.Study, error) {
	var b strings.Builder
	line := 0
	flags := map[int]string{}
	emit := func(flag, text string) {
		b.WriteString(text + "\n")
		line++
		if flag != "" {
			flags[line] = flag
		}
	}
	emit("", `title = "One-off inference of `+o.Family+` (inflatrace infer --family)"`)
	sets := o.Constraints
	if len(sets) == 0 && len(o.CFiles) == 0 {
		sets = []string{"cmb-combined-2025"}
	}
	for _, c := range sets {
		emit("", "[[constraint]]")
		emit("--constraint "+c, "use = "+strconv.Quote(c))
	}
	for _, f := range o.CFiles {
		emit("", "[[constraint]]")
		emit("--constraint-file "+f, "file = "+strconv.Quote(f))
	}
	for _, f := range o.Forecasts {
		emit("", "[[forecast]]")
		emit("--forecast "+f, "use = "+strconv.Quote(f))
	}
	for _, f := range o.FFiles {
		emit("", "[[forecast]]")
		emit("--forecast-file "+f, "file = "+strconv.Quote(f))
	}
	emit("", "[[inference]]")
	emit("--family "+o.Family, "family = "+strconv.Quote(o.Family))
	if o.Label != "" {
		emit("--label "+o.Label, "label = "+strconv.Quote(o.Label))
	}
	seen := map[string]bool{}
	params := append([]string(nil), o.Params...)
	sort.SliceStable(params, func(i, j int) bool { return key(params[i]) < key(params[j]) })
	for _, p := range params {
		name, spec, ok := strings.Cut(p, "=")
		name = strings.TrimSpace(name)
		if !ok || name == "" {
			return nil, fmt.Errorf("--prior %q: want name=VALUE, name=uniform:lo,hi or name=log_uniform:lo,hi", p)
		}
		if seen[name] {
			return nil, fmt.Errorf("--prior %q: %s given twice", p, name)
		}
		seen[name] = true
		v, err := priorValue(spec, true)
		if err != nil {
			return nil, fmt.Errorf("--prior %q: %w", p, err)
		}
		emit("--prior "+p, strconv.Quote(name)+" = "+v)
	}
	for _, e := range []struct{ flag, key, val string }{
		{"--w-reh", "w_reh", o.WReh}, {"--N-reh", "N_reh", o.NReh}, {"--efolds", "N_star", o.NStar},
	} {
		if e.val == "" {
			continue
		}
		v, err := priorValue(e.val, false)
		if err != nil {
			return nil, fmt.Errorf("%s %q: %w", e.flag, e.val, err)
		}
		emit(e.flag+" "+e.val, e.key+" = "+v)
	}
	for _, e := range []struct{ flag, key, val string }{
		{"--T-reh-min-GeV", "T_reh_min_GeV", o.TMinGeV}, {"--tolerance", "tolerance", o.Tolerance},
	} {
		if e.val == "" {
			continue
		}
		x, err := strconv.ParseFloat(e.val, 64)
		if err != nil {
			return nil, fmt.Errorf("%s %q: not a number", e.flag, e.val)
		}
		emit(e.flag+" "+e.val, e.key+" = "+strconv.FormatFloat(x, 'g', -1, 64))
	}
	if o.Independent {
		emit("--independent", "independent = true")
	}
	wd, err := os.Getwd()
	if err != nil {
		return nil, err
	}
	s, err := study.Parse(oneOffFile, []byte(b.String()), wd)
	var ce *study.ConfigError
	if errors.As(err, &ce) {
		if f, ok := flags[ce.Line]; ok {
			return nil, fmt.Errorf("%s: %s", f, ce.Msg)
		}
		return nil, fmt.Errorf("%s", ce.Msg)
	}
	return s, err
}

// key is a --prior's parameter name, for ordering.
func key(p string) string { name, _, _ := strings.Cut(p, "="); return strings.TrimSpace(name) }

// priorValue writes a prior given on the command line as the TOML a
// study holds: a number or ratio ("1/3"), {uniform = [lo, hi]} or, when
// logOK, {log_uniform = [lo, hi]}.
func priorValue(spec string, logOK bool) (string, error) {
	spec = strings.TrimSpace(spec)
	kind, rng, ranged := strings.Cut(spec, ":")
	if !ranged {
		if _, err := study.ParseNumber(spec); err != nil {
			return "", err
		}
		return strconv.Quote(spec), nil
	}
	switch kind {
	case "uniform":
	case "log_uniform":
		if !logOK {
			return "", errors.New("a value or uniform:lo,hi")
		}
	default:
		return "", fmt.Errorf("unknown prior %q: want uniform:lo,hi or log_uniform:lo,hi", kind)
	}
	lo, hi, ok := strings.Cut(rng, ",")
	if !ok {
		return "", fmt.Errorf("%s:%s: want %s:lo,hi", kind, rng, kind)
	}
	var ends []string
	for _, e := range []string{lo, hi} {
		e = strings.TrimSpace(e)
		if _, err := study.ParseNumber(e); err != nil {
			return "", err
		}
		ends = append(ends, strconv.Quote(e))
	}
	return "{" + kind + " = [" + ends[0] + ", " + ends[1] + "]}", nil
}
