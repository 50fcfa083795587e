package ledger

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
)

// checkRecord verifies a node record handed to RecordNode before anything
// is written. Computed and Failed records must be genuine: the key is the
// hash of the description and the description is the one the record's
// stage, version, parameters and inputs produce. A computed record's output
// hash must be the hash of its outputs; a failed one carries an error and no
// outputs. A Reused record needs only a well-formed key: its row is already
// in the ledger and is checked there.
func checkRecord(rec pipeline.NodeRecord, action pipeline.Action) (rowText, error) {
	if err := pipeline.ParseHash(string(rec.Key)); err != nil {
		return rowText{}, fmt.Errorf("%w: node key: %v", ErrIntegrity, err)
	}
	if rec.Duration < 0 {
		return rowText{}, fmt.Errorf("negative duration %v", rec.Duration)
	}
	switch action {
	case pipeline.Reused:
		return rowText{}, nil
	case pipeline.Computed:
		if rec.Status != pipeline.NodeOK {
			return rowText{}, fmt.Errorf("a computed node must have status %q, found %q", pipeline.NodeOK, rec.Status)
		}
		if rec.Error != "" {
			return rowText{}, fmt.Errorf("a computed node carries error text %q", rec.Error)
		}
		if err := checkDescription(rec, false); err != nil {
			return rowText{}, err
		}
		text, err := rowValues(rec)
		if err != nil {
			return rowText{}, err
		}
		if want := pipeline.OutputID(pipeline.Sum([]byte(text.outputs))); rec.OutputHash != want {
			return rowText{}, fmt.Errorf("%w: output hash: expected %s (hash of the outputs' canonical encoding), found %s", ErrIntegrity, want, rec.OutputHash)
		}
		return text, nil
	case pipeline.Failed:
		if rec.Status != pipeline.NodeFailed {
			return rowText{}, fmt.Errorf("a failed node must have status %q, found %q", pipeline.NodeFailed, rec.Status)
		}
		if rec.Error == "" {
			return rowText{}, errors.New("a failed node must carry its error text")
		}
		if len(rec.Outputs) != 0 || rec.OutputHash != "" {
			return rowText{}, fmt.Errorf("a failed node carries outputs (%d values, hash %q); a failure is never a result", len(rec.Outputs), rec.OutputHash)
		}
		if err := checkDescription(rec, false); err != nil {
			return rowText{}, err
		}
		return rowValues(rec)
	}
	return rowText{}, fmt.Errorf("unknown action %q", action)
}

// checkDescription checks that the key is the hash of the description and
// that the description is what Describe writes for the record's fields, so
// the structured fields stored beside the description cannot disagree
// with the text the key commits to. For a stored row (stored is true) a
// description in an older key format is accepted on its key alone.
func checkDescription(rec pipeline.NodeRecord, stored bool) error {
	if got := pipeline.KeyOf(rec.Description); got != rec.Key {
		return fmt.Errorf("%w: node key: expected %s (hash of the description), found %s", ErrIntegrity, got, rec.Key)
	}
	if header, _, _ := strings.Cut(rec.Description, "\n"); header != keyFormatHeader {
		if stored {
			// Written under another key format (pipeline.KeyVersion was
			// bumped since): its key still checks out, but today's
			// Describe cannot reproduce it, and need not.
			return nil
		}
		return fmt.Errorf("%w: description is in another key format: header %q, want %q", ErrIntegrity, header, keyFormatHeader)
	}
	tool, err := describedTool(rec.Description)
	if err != nil {
		return fmt.Errorf("%w: description: %v", ErrIntegrity, err)
	}
	for i, in := range rec.Inputs {
		if err := pipeline.ParseHash(string(in.Key)); err != nil {
			return fmt.Errorf("%w: input %d key: %v", ErrIntegrity, i, err)
		}
	}
	want, err := pipeline.Describe(tool, rec.Stage, rec.Version, rec.Params, rec.Inputs)
	if err != nil {
		return fmt.Errorf("%w: describe the record's fields: %v", ErrIntegrity, err)
	}
	if want != rec.Description {
		return fmt.Errorf("%w: description does not match the record's stage, version, parameters and inputs: %s",
			ErrIntegrity, firstDifference(want, rec.Description))
	}
	return nil
}

// keyFormatHeader is the first line of every description pipeline.Describe
// writes today; it names the key format version.
var keyFormatHeader = func() string {
	d, err := pipeline.Describe("", "", 0, nil, nil)
	if err != nil {
		return ""
	}
	header, _, _ := strings.Cut(d, "\n")
	return header
}()

// describedTool extracts the tool identity from a description's
// "tool <quoted>" line.
func describedTool(desc string) (string, error) {
	for rest := desc; rest != ""; {
		var l string
		l, rest, _ = strings.Cut(rest, "\n")
		if q, ok := strings.CutPrefix(l, "tool "); ok {
			tool, err := strconv.Unquote(q)
			if err != nil {
				return "", fmt.Errorf("tool line %q: %v", l, err)
			}
			return tool, nil
		}
	}
	return "", errors.New("no tool line")
}

// firstDifference describes the first line where two texts differ.
func firstDifference(expected, found string) string {
	e := strings.Split(expected, "\n")
	f := strings.Split(found, "\n")
	for i := 0; i < max(len(e), len(f)); i++ {
		var el, fl string
		if i < len(e) {
			el = e[i]
		}
		if i < len(f) {
			fl = f[i]
		}
		if el != fl {
			return fmt.Sprintf("line %d: expected %q, found %q", i+1, el, fl)
		}
	}
	return "texts are equal"
}
