package ledger

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"unique"

	"github.com/inflatrace/inflatrace/pipeline"
)

// checkRecord verifies a node record handed to RecordNode before anything
// is written, and returns the text its row stores. Computed and Failed
// records must be genuine: the key is the hash of the description, and the
// description names the record's stage, version, parameters and inputs
// (so the stored row re-derives its key). A computed record's output hash must be the hash of its outputs'
// canonical text (outputsText when the engine hands it over, else encoded
// here); a failed one carries an error and no outputs. A Reused record
// needs only a well-formed key: its row is already in the ledger and is
// checked there.
// Shapes book holds are resolved (book may be nil).
func checkRecord(rec pipeline.NodeRecord, action pipeline.Action, outputsText []byte, book *shapeBook) (rowText, error) {
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
		text, err := describedRow(rec)
		if err != nil {
			return rowText{}, err
		}
		if outputsText == nil {
			enc, err := rec.Outputs.Encode()
			if err != nil {
				return rowText{}, fmt.Errorf("outputs: %w", err)
			}
			outputsText = enc
		}
		text.outputs = string(outputsText)
		if want := pipeline.OutputID(pipeline.Sum(outputsText)); rec.OutputHash != want {
			return rowText{}, fmt.Errorf("%w: output hash: expected %s (hash of the outputs' canonical encoding), found %s", ErrIntegrity, want, rec.OutputHash)
		}
		return text, text.pack(rec, book)
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
		text, err := describedRow(rec)
		if err != nil {
			return text, err
		}
		return text, text.pack(rec, book)
	}
	return rowText{}, fmt.Errorf("unknown action %q", action)
}

// describedRow checks a new record's description against its key and its
// structured fields, reading it line by line in the layout
// pipeline.Describe writes (today's key format only), and returns the
// parameters' canonical text, which must be the "param" lines without
// their prefix; the record's inputs must be those the "input" lines name.
func describedRow(rec pipeline.NodeRecord) (rowText, error) {
	if got := pipeline.KeyOf(rec.Description); got != rec.Key {
		return rowText{}, fmt.Errorf("%w: node key: expected %s (hash of the description), found %s", ErrIntegrity, got, rec.Key)
	}
	bad := func(format string, a ...any) (rowText, error) {
		return rowText{}, fmt.Errorf("%w: description does not match the record's stage, version, parameters and inputs: %s", ErrIntegrity, fmt.Sprintf(format, a...))
	}
	rest := rec.Description
	line := func() string {
		l, r, _ := strings.Cut(rest, "\n")
		rest = r
		return l
	}
	if h := line(); h != keyFormatHeader {
		return bad("in another key format: header %q, want %q", h, keyFormatHeader)
	}
	if t := line(); !strings.HasPrefix(t, "tool ") {
		return bad("line 2 is %q, want the tool", t)
	}
	if st := line(); st != "stage "+rec.Stage {
		return bad("names stage line %q, the record says %q", st, rec.Stage)
	}
	if v := line(); v != "version "+strconv.Itoa(rec.Version) {
		return bad("names version line %q, the record says %d", v, rec.Version)
	}
	var params strings.Builder
	inputs := 0
	for rest != "" {
		l := line()
		if p, ok := strings.CutPrefix(l, "param "); ok && inputs == 0 {
			params.WriteString(p)
			params.WriteByte('\n')
			continue
		}
		in, ok := strings.CutPrefix(l, "input ")
		if !ok || inputs >= len(rec.Inputs) {
			return bad("unexpected line %q", l)
		}
		ref := rec.Inputs[inputs]
		if err := pipeline.ParseHash(string(ref.Key)); err != nil {
			return bad("input %d key: %v", inputs, err)
		}
		if want := strconv.Itoa(inputs) + " " + ref.Stage + " " + string(ref.Output); in != want {
			return bad("input line %q, the record's input is %q", in, want)
		}
		inputs++
	}
	if inputs != len(rec.Inputs) {
		return bad("%d inputs, the record has %d", inputs, len(rec.Inputs))
	}
	// That the parameter lines are the canonical text of rec.Params is
	// checked as they are packed (rowText.pack).
	return rowText{params: params.String()}, nil
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
// "tool <quoted>" line, interned: the unquoted text can share the
// description's bytes, and a tool kept with a node (storedNode) must not
// keep its whole description alive.
func describedTool(desc string) (string, error) {
	for rest := desc; rest != ""; {
		var l string
		l, rest, _ = strings.Cut(rest, "\n")
		if q, ok := strings.CutPrefix(l, "tool "); ok {
			tool, err := strconv.Unquote(q)
			if err != nil {
				return "", fmt.Errorf("tool line %q: %v", l, err)
			}
			return unique.Make(tool).Value(), nil
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
