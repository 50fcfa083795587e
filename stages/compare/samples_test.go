package compare

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// sampleText returns n well-formed rows.
func sampleText(n int) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "%.4f\t%.4f\n", 0.96+0.0001*float64(i), 0.001*float64(i%17))
	}
	return b.String()
}

// TestParseSamples: comments (whole-line and trailing), blank lines,
// tabs and spaces, exponents; values are read exactly (strconv).
func TestParseSamples(t *testing.T) {
	text := "# n_s r\n\n  0.9649   3.5e-3  # a comment\n0.97\t0\n" + sampleText(MinSamples-2) + "\n# end\n"
	pts, err := ParseSamples("s.txt", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	if len(pts) != MinSamples {
		t.Fatalf("%d points, want %d", len(pts), MinSamples)
	}
	if pts[0] != (Point{0.9649, 0.0035}) || pts[1] != (Point{0.97, 0}) {
		t.Errorf("first points %v %v", pts[0], pts[1])
	}
}

// TestParseSamplesErrors: each malformed row is reported with the file
// and its 1-based line (counting comments and blank lines), as a
// *SampleError.
func TestParseSamplesErrors(t *testing.T) {
	head := "# header\n\n0.965 0.01\n" // lines 1-3
	for _, c := range []struct {
		name, text string
		line       int
		msg        string
	}{
		{"three columns", head + "0.965 0.01 7\n", 4, "want 2 columns (n_s r), found 3"},
		{"one column", head + "0.965\n", 4, "want 2 columns (n_s r), found 1"},
		{"not a number", head + "0.96 abc\n", 4, `column 2 (r): "abc" is not a finite number`},
		{"comma", head + "0.96,0.01\n", 4, "want 2 columns (n_s r), found 1"},
		{"NaN", head + "NaN 0.01\n", 4, `column 1 (n_s): "NaN" is not a finite number`},
		{"Inf", head + "0.96 +Inf\n", 4, `column 2 (r): "+Inf" is not a finite number`},
		{"negative r", head + "0.96 -0.002\n", 4, "r = -0.002 < 0: samples of r must be >= 0"},
		{"late row", sampleText(60) + "0.9 0.1 0.2\n", 61, "found 3"},
		{"too few", head + sampleText(10), 0, "11 samples, want at least 50"},
		{"empty", "", 0, "0 samples, want at least 50"},
	} {
		_, err := ParseSamples("c/planck.txt", []byte(c.text))
		var se *SampleError
		if !errors.As(err, &se) {
			t.Errorf("%s: error %v, want *SampleError", c.name, err)
			continue
		}
		if se.Line != c.line || !strings.Contains(se.Msg, c.msg) {
			t.Errorf("%s: line %d %q, want line %d containing %q", c.name, se.Line, se.Msg, c.line, c.msg)
		}
		prefix := "c/planck.txt: "
		if c.line > 0 {
			prefix = fmt.Sprintf("c/planck.txt:%d: ", c.line)
		}
		if !strings.HasPrefix(err.Error(), prefix) {
			t.Errorf("%s: %q does not start with %q", c.name, err, prefix)
		}
	}
}
