package study

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// axis is one fanned-out model parameter: the values of a list as
// written, or a range table whose points are made one at a time, so that
// a range of ten million points costs its four numbers, not ten million
// values and texts.
type axis struct {
	name  string
	xs    []float64   // a list's values (nil for a range)
	texts []string    // a list's values as written
	rng   *valueRange // a range (nil for a list)
}

// len is the number of the axis's values.
func (a *axis) len() int {
	if a.rng != nil {
		return a.rng.n
	}
	return len(a.xs)
}

// at returns value i and its text.
func (a *axis) at(i int) (float64, string) {
	if a.rng != nil {
		x := a.rng.at(i)
		return x, a.rng.text(x)
	}
	return a.xs[i], a.texts[i]
}

// probes are the indices of the values parsing checks with the family: all
// of a list's; a range's ends and the points next to them (see
// valueRange.extremes).
func (a *axis) probes() []int {
	n := a.len()
	if a.rng == nil || n <= 4 {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	return []int{0, n - 1, 1, n - 2} // the ends first: an error names the value written
}

// valueRange is a range table: {linear = [a, b], points = n} gives n
// values evenly spaced from a to b, both included; {log = [a, b], points =
// n} evenly spaced in log (a, b > 0).
type valueRange struct {
	log  bool
	a, b float64
	n    int
	// lo and span: a and b - a (linear), or log a and log b - log a.
	lo, span float64
}

// at returns point i, 0 <= i < n: the ends exactly, else a + (b-a) i/(n-1)
// or exp(log a + (log b - log a) i/(n-1)).
func (r *valueRange) at(i int) float64 {
	switch {
	case i == 0:
		return r.a
	case i == r.n-1:
		return r.b
	}
	f := float64(i) / float64(r.n-1)
	if r.log {
		return detmath.Exp(r.lo + float64(r.span*f))
	}
	return r.lo + float64(r.span*f)
}

// text is a point as the study writes it in labels.
func (r *valueRange) text(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }

// extremes are the indices of the interior points nearest the ends, 1 and
// n-2, or none when there is no interior.
//
// The interior points lie between them: i/(n-1), its product with the
// span and the sum with log a or a are each rounded by IEEE 754
// arithmetic, which is monotone, so a linear range's interior is monotone
// in i; a log range's is too up to math.Exp's last bit. Each declared
// parameter range of a family is an interval, so the family's check of
// the ends and of these two points stands for every point (a family's
// build, which may also fail where its canonical map is numerical, is
// then met by the model node, which fails with the reason).
func (r *valueRange) extremes() []int {
	if r.n < 3 {
		return nil
	}
	return []int{1, r.n - 2}
}

// MaxGridPoints bounds one range's points.
const MaxGridPoints = 10_000_000

// parseRange reads a range table; its points are checked finite by their
// extremes (extremes), and a range that overflows names its first point
// that does.
func parseRange(t map[string]any) (*valueRange, error) {
	var kind string
	var ends []any
	for _, k := range []string{"linear", "log"} {
		if e, ok := t[k]; ok {
			if kind != "" {
				return nil, errors.New("a range is linear or log, not both")
			}
			kind = k
			ends, _ = e.([]any)
		}
	}
	for k := range t {
		if k != "linear" && k != "log" && k != "points" {
			return nil, fmt.Errorf("unknown range key %q (a range has linear or log, and points)", k)
		}
	}
	if kind == "" || len(ends) != 2 {
		return nil, errors.New("a range is {linear = [a, b], points = n} or {log = [a, b], points = n}")
	}
	a, _, err := number(ends[0])
	if err != nil {
		return nil, err
	}
	b, _, err := number(ends[1])
	if err != nil {
		return nil, err
	}
	n, ok := t["points"].(int64)
	if !ok || n < 1 || n > MaxGridPoints {
		return nil, fmt.Errorf("points: want an integer from 1 to %d", MaxGridPoints)
	}
	if math.IsNaN(a) || math.IsInf(a, 0) || math.IsNaN(b) || math.IsInf(b, 0) {
		return nil, fmt.Errorf("a range needs finite ends, got [%g, %g]", a, b)
	}
	if kind == "log" && !(a > 0 && b > 0) {
		return nil, fmt.Errorf("a log range needs positive ends, got [%g, %g]", a, b)
	}
	r := &valueRange{log: kind == "log", a: a, b: b, n: int(n), lo: a, span: b - a}
	if r.log {
		r.lo = detmath.Log(a)
		r.span = detmath.Log(b) - r.lo
	}
	for _, i := range r.extremes() {
		if x := r.at(i); math.IsNaN(x) || math.IsInf(x, 0) {
			// Name the first point that overflows, as a scan would.
			for j := 1; j < r.n-1; j++ {
				if x := r.at(j); math.IsNaN(x) || math.IsInf(x, 0) {
					return nil, fmt.Errorf("the range [%g, %g] overflows double precision (point %d is %g)", a, b, j+1, x)
				}
			}
		}
	}
	return r, nil
}

// grid expands a range table into its values and texts (for the
// reheating keys and field ranges, whose values are all held).
func grid(t map[string]any) ([]float64, []string, error) {
	r, err := parseRange(t)
	if err != nil {
		return nil, nil, err
	}
	xs := make([]float64, r.n)
	ts := make([]string, r.n)
	for i := range xs {
		xs[i] = r.at(i)
		ts[i] = r.text(xs[i])
	}
	return xs, ts, nil
}

// axisValues reads a model parameter: a number, a list (numbers) or a
// range table, kept as a range.
func axisValues(name string, v any) (axis, error) {
	if t, ok := v.(map[string]any); ok {
		r, err := parseRange(t)
		if err != nil {
			return axis{}, err
		}
		return axis{name: name, rng: r}, nil
	}
	xs, ts, err := numbers(v)
	if err != nil {
		return axis{}, err
	}
	return axis{name: name, xs: xs, texts: ts}, nil
}
