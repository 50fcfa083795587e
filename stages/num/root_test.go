package num

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// cardano returns the real root of x^3 + p x + q = 0 with one real root
// (Cardano's formula; common practice).
func cardano(p, q float64) float64 {
	d := q*q/4 + p*p*p/27
	return math.Cbrt(-q/2+math.Sqrt(d)) + math.Cbrt(-q/2-math.Sqrt(d))
}

func TestBrentKnownRoots(t *testing.T) {
	cases := []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
		tol  float64 // absolute
		src  string
	}{
		{"x^2 - 2", func(x float64) float64 { return x*x - 2 }, 0, 2, math.Sqrt2, 4e-15, "closed form"},
		{"x^3 - 2x - 5 (Wallis's equation)", func(x float64) float64 { return x*x*x - 2*x - 5 }, 2, 3, cardano(-2, -5), 4e-15, "Cardano's formula"},
		{"e^x - 3", func(x float64) float64 { return math.Exp(x) - 3 }, 0, 5, math.Log(3), 4e-15, "closed form"},
		{"sin x on [3,4]", math.Sin, 3, 4, math.Pi, 4e-15, "closed form"},
		{"cos x - x", func(x float64) float64 { return math.Cos(x) - x }, 0, 1, 0.7390851332151607, 4e-15, "the Dottie number, from memory (the residual test below confirms it)"},
		{"x e^x - 1", func(x float64) float64 { return x*math.Exp(x) - 1 }, 0, 1, 0.5671432904097838, 4e-15, "the omega constant W(1), from memory (residual confirms)"},
		{"tanh(50(x-0.3)): steep", func(x float64) float64 { return math.Tanh(50 * (x - 0.3)) }, 0, 1, 0.3, 4e-15, "closed form"},
		{"(x-1)^3: triple root", func(x float64) float64 { return (x - 1) * (x - 1) * (x - 1) }, 0, 3, 1, 1e-14, "closed form; Brent's bracket still closes in x"},
		{"root at a", func(x float64) float64 { return x - 1 }, 1, 3, 1, 0, "f(a) = 0 is returned as is"},
		{"root at b", func(x float64) float64 { return x - 3 }, 1, 3, 3, 0, "f(b) = 0 is returned as is"},
		{"reversed bracket", func(x float64) float64 { return x*x - 2 }, 2, 0, math.Sqrt2, 4e-15, "a > b"},
	}
	for _, c := range cases {
		r, err := Brent(c.f, c.a, c.b, nil)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if math.Abs(r.X-c.want) > c.tol {
			t.Errorf("%s: root %.17g, want %.17g ± %g (%s)", c.name, r.X, c.want, c.tol, c.src)
		}
		if r.F != c.f(r.X) {
			t.Errorf("%s: reported F = %g, f(X) = %g", c.name, r.F, c.f(r.X))
		}
		// Brent (1973), ch. 4: at most about (log2((b-a)/tol))^2
		// evaluations, in practice far fewer.
		if bound := math.Pow(math.Log2(math.Abs(c.b-c.a)/1e-15), 2); float64(r.Evals) > bound {
			t.Errorf("%s: %d evaluations, above Brent's bound %g", c.name, r.Evals, bound)
		}
	}
	// The from-memory constants are confirmed by their residuals.
	if r := math.Cos(0.7390851332151607) - 0.7390851332151607; math.Abs(r) > 2e-16 {
		t.Errorf("Dottie number residual %g", r)
	}
	if r := 0.5671432904097838*math.Exp(0.5671432904097838) - 1; math.Abs(r) > 4e-16 {
		t.Errorf("omega constant residual %g", r)
	}
	// Cardano's root is a root (guards the helper itself).
	x := cardano(-2, -5)
	if r := x*x*x - 2*x - 5; math.Abs(r) > 1e-14 {
		t.Errorf("Cardano residual %g", r)
	}
}

func TestBrentSettings(t *testing.T) {
	f := func(x float64) float64 { return math.Exp(x) - 3 }
	r, err := Brent(f, 0, 5, &RootSettings{XTol: 1e-4})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.X-math.Log(3)) > 1e-4 {
		t.Errorf("XTol 1e-4: root %g, want ln 3 ± 1e-4", r.X)
	}
	tight, _ := Brent(f, 0, 5, nil)
	if r.Evals > tight.Evals {
		t.Errorf("XTol 1e-4 used %d evaluations, the default %d", r.Evals, tight.Evals)
	}
	// BrentF with the known end values is the same computation.
	rf, err := BrentF(f, 0, 5, f(0), f(5), nil)
	if err != nil || rf.X != tight.X {
		t.Errorf("BrentF: %v, %v; Brent %v", rf, err, tight)
	}
}

func TestBrentErrors(t *testing.T) {
	r, err := Brent(func(x float64) float64 { return x*x + 1 }, -1, 1, nil)
	if !errors.Is(err, ErrNoBracket) {
		t.Errorf("x^2+1 on [-1,1]: error %v, want ErrNoBracket", err)
	} else if !strings.Contains(err.Error(), "f(-1)=2") || !strings.Contains(err.Error(), "f(1)=2") {
		t.Errorf("no-bracket error %q should give both end values", err)
	}
	if r.Evals != 2 {
		t.Errorf("no-bracket: %d evaluations, want 2", r.Evals)
	}
	if _, err := Brent(func(x float64) float64 { return math.Log(x) }, -1, 2, nil); err == nil || !strings.Contains(err.Error(), "NaN") {
		t.Errorf("NaN at an end: error %v, want one mentioning NaN", err)
	}
	// A NaN met during the search.
	nanInside := func(x float64) float64 {
		if x > 0.2 && x < 0.8 {
			return math.NaN()
		}
		return x - 0.5
	}
	if _, err := Brent(nanInside, 0, 1, nil); err == nil || !strings.Contains(err.Error(), "NaN") {
		t.Errorf("NaN inside: error %v, want one mentioning NaN", err)
	}
	if _, err := Brent(func(x float64) float64 { return math.Cos(x) - x }, 0, 1, &RootSettings{MaxIter: 2}); err == nil || !strings.Contains(err.Error(), "did not converge") {
		t.Errorf("MaxIter 2: error %v, want non-convergence", err)
	}
}

// TestPolish: Polish returns the float64 at or just above the sign change
// of f (the member of the adjacent pair with f >= 0), whichever side of the
// root it starts from; an exact zero or a point without a nearby sign
// change is returned unchanged (Polish's doc comment).
func TestPolish(t *testing.T) {
	cases := []struct {
		name  string
		f     func(float64) float64
		start float64
	}{
		{"x^2 - 2 from above", func(x float64) float64 { return x*x - 2 }, 1.4142136},
		{"x^2 - 2 from below", func(x float64) float64 { return x*x - 2 }, 1.4142135},
		{"x^2 - 2, negative root", func(x float64) float64 { return x*x - 2 }, -1.41421},
		{"cos x - x (decreasing)", func(x float64) float64 { return math.Cos(x) - x }, 0.739},
		{"e^x - 3", func(x float64) float64 { return math.Exp(x) - 3 }, 1.1},
	}
	for _, c := range cases {
		x := Polish(c.f, c.start, c.start-1, c.start+1)
		up, down := math.Nextafter(x, math.Inf(1)), math.Nextafter(x, math.Inf(-1))
		if !(c.f(x) >= 0) || !(c.f(up) < 0 || c.f(down) < 0) {
			t.Errorf("%s: Polish = %.17g, f there %g, neighbours %g %g", c.name, x, c.f(x), c.f(down), c.f(up))
		}
	}
	if x := Polish(func(x float64) float64 { return x - 0.5 }, 0.5, 0, 1); x != 0.5 {
		t.Errorf("exact root moved to %g", x)
	}
	if x := Polish(func(x float64) float64 { return x*x + 1 }, 0.25, 0, 1); x != 0.25 {
		t.Errorf("no root: moved to %g", x)
	}
	// From either side, the same bits.
	f := func(x float64) float64 { return x*x*x - 2*x - 5 }
	if a, b := Polish(f, 2.09, 2, 3), Polish(f, 2.1, 2, 3); a != b {
		t.Errorf("Polish from 2.09 gives %.17g, from 2.1 %.17g", a, b)
	}
}
