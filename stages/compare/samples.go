package compare

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// MinSamples is the fewest (n_s, r) samples a sample constraint accepts:
// below about fifty points a two-dimensional kernel estimate of a 95%
// region rests on two or three points outside it (common practice).
const MinSamples = 50

// SampleError is a malformed sample file, with the 1-based line of the
// offending row (0 when the complaint is about the file as a whole).
type SampleError struct {
	File string // the source as named to ParseSamples
	Line int    // 1-based line, 0 for the file as a whole
	Msg  string // what is wrong
}

// Error returns "file:line: message" (or "file: message").
func (e *SampleError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", e.File, e.Line, e.Msg)
	}
	return fmt.Sprintf("%s: %s", e.File, e.Msg)
}

// ParseSamples reads (n_s, r) samples: one point a line, two numbers
// separated by spaces or tabs, n_s first. A '#' starts a comment that runs
// to the end of its line; blank lines are skipped. Every value must be a
// finite number, r must be >= 0 (the constraint's r is bounded below by
// zero) and there must be at least MinSamples points. file names the
// source in errors, which are *SampleError with the offending line.
func ParseSamples(file string, data []byte) ([]Point, error) {
	var pts []Point
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 4096), 1<<20)
	line := 0
	for sc.Scan() {
		line++
		text := sc.Text()
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		fields := strings.Fields(text)
		if len(fields) == 0 {
			continue
		}
		if len(fields) != 2 {
			return nil, &SampleError{File: file, Line: line, Msg: fmt.Sprintf("want 2 columns (n_s r), found %d", len(fields))}
		}
		var v [2]float64
		for k, f := range fields {
			x, err := strconv.ParseFloat(f, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, &SampleError{File: file, Line: line, Msg: fmt.Sprintf("column %d (%s): %q is not a finite number", k+1, [2]string{"n_s", "r"}[k], f)}
			}
			v[k] = x
		}
		if v[1] < 0 {
			return nil, &SampleError{File: file, Line: line, Msg: fmt.Sprintf("r = %g < 0: samples of r must be >= 0", v[1])}
		}
		pts = append(pts, Point{Ns: v[0], R: v[1]})
	}
	if err := sc.Err(); err != nil {
		return nil, &SampleError{File: file, Line: line + 1, Msg: err.Error()}
	}
	if len(pts) < MinSamples {
		return nil, &SampleError{File: file, Msg: fmt.Sprintf("%d samples, want at least %d", len(pts), MinSamples)}
	}
	return pts, nil
}
