package study

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

const axisHead = "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\n"

// A range's points, made one at a time, are those of the range's
// documented formula (README, "Configuration"): the ends exactly, else
// a + (b-a) i/(n-1), or exp(log a + (log b - log a) i/(n-1)) for a log
// range, each written with six significant digits. Any other bit would
// change the node keys of every recorded scan.
func TestRangePointsAreTheFormula(t *testing.T) {
	for _, c := range []struct {
		kind string
		a, b float64
		n    int
	}{
		{"log", 0.01, 100, 1000}, {"log", 100, 0.01, 7}, {"linear", 1, 7, 13}, {"linear", -3, 2.5, 1001},
		{"linear", 5, 5, 4}, {"log", 3, 3, 5}, {"linear", 0.5, 0.7, 1}, {"log", 1e-5, 99, 2},
	} {
		text := fmt.Sprintf("family = \"power-law\"\np = {%s = [%v, %v], points = %d}\n", c.kind, c.a, c.b, c.n)
		if c.kind == "linear" && c.a <= 0 {
			text = fmt.Sprintf("potential = \"p*phi^2\"\nfield_range = [1, 30]\np = {%s = [%v, %v], points = %d}\n", c.kind, c.a, c.b, c.n)
		}
		s, err := Parse("r.toml", []byte(axisHead+text), ".")
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		if s.NumModels() != c.n {
			t.Fatalf("%+v: %d points", c, s.NumModels())
		}
		for i := 0; i < c.n; i++ {
			want := c.a // a one-point range is its first end
			if i > 0 && i == c.n-1 {
				want = c.b
			} else if i > 0 {
				f := float64(i) / float64(c.n-1)
				// The products are rounded as the study rounds them, so
				// that no build fuses them (see stages/num/detmath).
				if c.kind == "linear" {
					want = c.a + float64((c.b-c.a)*f)
				} else {
					want = detmath.Exp(detmath.Log(c.a) + float64((detmath.Log(c.b)-detmath.Log(c.a))*f))
					// and the same point as the standard library's exp and
					// log give, which differ between builds in the last bits
					// (an ulp of the exponent, up to 4.6 here, is 8.9e-16 of
					// the point).
					if std := math.Exp(math.Log(c.a) + (math.Log(c.b)-math.Log(c.a))*f); math.Abs(std-want) > 4e-15*want {
						t.Fatalf("%+v: point %d: detmath %v, math %v", c, i, want, std)
					}
				}
			}
			m := s.ModelAt(i)
			if got := m.Params["p"]; math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("%+v: point %d is %v, want %v", c, i, got, want)
			}
			if got := m.ParamText["p"]; got != strconv.FormatFloat(want, 'g', 6, 64) {
				t.Fatalf("%+v: point %d written %q", c, i, got)
			}
		}
	}
}

// A range is checked by its ends and the points next to them: a range
// whose end leaves the family's declared interval is refused at the key's
// line, naming the value, however many points it has; a range inside the
// interval is accepted, and so is each of its points (property: the
// interior lies between the checked points).
func TestRangeCheckedByItsEnds(t *testing.T) {
	for _, c := range []struct {
		text, value string
	}{
		{"p = {linear = [2, 101], points = 10000000}", "value 101 outside (0, 100]"},
		{"p = {linear = [0, 50], points = 10000000}", "value 0 outside (0, 100]"},
		{"p = {log = [1e-3, 1e3], points = 3}", "value 1000 outside (0, 100]"},
		{"p = {linear = [100, 100.00000000000003], points = 5}", "outside (0, 100]"},
	} {
		_, err := Parse("r.toml", []byte(axisHead+"family = \"power-law\"\n"+c.text+"\n"), ".")
		var ce *ConfigError
		if !errors.As(err, &ce) {
			t.Errorf("%s: error %v, want a ConfigError", c.text, err)
			continue
		}
		if ce.Line != 8 || ce.Path != "model[0].p" || !strings.Contains(ce.Msg, c.value) {
			t.Errorf("%s: %v; want line 8, model[0].p, %q", c.text, err, c.value)
		}
	}
	s, err := Parse("r.toml", []byte(axisHead+"family = \"power-law\"\np = {linear = [1e-300, 100], points = 10000000}\n"), ".")
	if err != nil {
		t.Fatal(err)
	}
	fam := s.ModelAt(0)
	for _, i := range []int{0, 1, 2, 4_999_999, 9_999_997, 9_999_998, 9_999_999} {
		if x := s.ModelAt(i).Params["p"]; !(x > 0 && x <= 100) {
			t.Errorf("point %d of %s: p = %v", i, fam.Family, x)
		}
	}
}

// Parsing a range of ten million points holds none of them: it allocates
// as a range of three points does, give or take a little (a study that
// made every value and its text would allocate 2e7 times).
func TestLargeRangeIsNotMade(t *testing.T) {
	parse := func(n int) func() {
		text := []byte(axisHead + fmt.Sprintf("family = \"e-model\"\nalpha = {log = [0.01, 100], points = %d}\n", n))
		return func() {
			if _, err := Parse("r.toml", text, "."); err != nil {
				t.Fatal(err)
			}
		}
	}
	small := testing.AllocsPerRun(3, parse(3))
	large := testing.AllocsPerRun(3, parse(10_000_000))
	if large > small+100 {
		t.Errorf("a 1e7-point range allocates %.0f times, a 3-point one %.0f", large, small)
	}
}
