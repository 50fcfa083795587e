package expr

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/inflatrace/inflatrace/stages/num"
)

var fuzzParams = map[string]float64{"alpha": 0.7, "f": 3, "V0": 2e-10, "xi": 50}

// fuzzPoints are field values at which compiled expressions are evaluated.
var fuzzPoints = []float64{-2.5, -1, 0, 1e-9, 0.5, 1, 3.7}

// FuzzCompile checks that compiling arbitrary text never panics; that every
// error is a *SyntaxError whose position lies inside the source (a column at
// most one past the end of its line) and whose message names that position;
// and that whatever compiles evaluates without panicking, has Value equal
// to At().V, gives the same results to the bit as the unfolded tree
// (folding changes no result), refers only to declared parameters, is
// constant with zero derivatives when it does not depend on the field, and
// prints to canonical text that compiles to the same text and the same
// results to the bit.
func FuzzCompile(f *testing.F) {
	for _, s := range []string{
		"tanh(x/sqrt(6*alpha))^2",
		"V0*(1 - exp(-sqrt(2/(3*alpha))*x))^2",
		"1 + cos(x/f)",
		"x^4/(1 + xi*x^2)^2",
		"-x^2^-3 * pow(x, 2.5e-1) / .5",
		"x +", "(x", "x)", "1e", "pow(x)", "foo(x)", "x $", "",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		e, err := CompileWith(src, "x", fuzzParams, &Options{AllowConstant: true})
		if err != nil {
			checkFuzzError(t, src, err)
			return
		}
		// Without the option the only new error is CodeConstant.
		if _, err := Compile(src, "x", fuzzParams); err != nil {
			var se *SyntaxError
			if !errors.As(err, &se) || se.Code != CodeConstant || e.DependsOnField() {
				t.Fatalf("Compile(%q) = %v, but CompileWith accepted it (depends on field: %v)", src, err, e.DependsOnField())
			}
		}
		if e.Field() != "x" || !sort.StringsAreSorted(e.Params()) {
			t.Fatalf("%q: field %q, parameters %v", src, e.Field(), e.Params())
		}
		for _, p := range e.Params() {
			if _, ok := fuzzParams[p]; !ok {
				t.Fatalf("%q refers to %q, which was not declared", src, p)
			}
		}
		tree, _, err := parse(src, &scope{field: "x", params: fuzzParams})
		if err != nil {
			t.Fatalf("%q compiles but does not parse: %v", src, err)
		}
		raw := lower(tree, fuzzParams, false)
		g, err := CompileWith(e.String(), "x", fuzzParams, &Options{AllowConstant: true})
		if err != nil {
			t.Fatalf("canonical text %q of %q does not compile: %v", e.String(), src, err)
		}
		if g.String() != e.String() {
			t.Fatalf("canonical text %q of %q reprints as %q", e.String(), src, g.String())
		}
		for _, x := range fuzzPoints {
			j := e.At(x)
			if v := e.Value(x); v != j.V && !(math.IsNaN(v) && math.IsNaN(j.V)) {
				t.Fatalf("%q at %g: Value %v, At().V %v", src, x, v, j.V)
			}
			if k := g.At(x); !same(j, k) {
				t.Fatalf("%q at %g: %v, from canonical text %q: %v", src, x, j, e.String(), k)
			}
			if u := raw.eval(num.Var(x)); !sameFolded(j, u) {
				t.Fatalf("%q at %g: folded %v, unfolded %v", src, x, j, u)
			}
			if v := raw.value(x); v != j.V && !(math.IsNaN(v) && math.IsNaN(j.V)) {
				t.Fatalf("%q at %g: unfolded Value %v, folded %v", src, x, v, j.V)
			}
			if !e.DependsOnField() {
				if c := e.At(fuzzPoints[0]); !same(j, c) || j.D1 != 0 || j.D2 != 0 || j.D3 != 0 {
					t.Fatalf("constant %q: %v at %g, %v at %g", src, j, x, c, fuzzPoints[0])
				}
			}
			chained := num.Jet{V: x, D1: 0.5, D2: -1, D3: 2}
			if k, u := e.Eval(chained), raw.eval(chained); !sameFolded(k, u) || k.V != j.V && !(math.IsNaN(k.V) && math.IsNaN(j.V)) {
				t.Fatalf("%q at the jet %v: folded %v, unfolded %v, value at %g %v", src, chained, k, u, x, j.V)
			}
		}
	})
}

// sameFolded reports whether a folded jet agrees with the unfolded one:
// the same value (NaN equal to NaN), and the same derivatives wherever the
// unfolded derivative is finite. Where it is not, the unfolded tree has
// differentiated a constant subtree that overflowed (2^2000 has the
// derivatives 2000 2^1999 * 0 = Inf * 0 = NaN), while folding rightly
// gives a constant zero derivatives.
func sameFolded(folded, unfolded num.Jet) bool {
	if folded.V != unfolded.V && !(math.IsNaN(folded.V) && math.IsNaN(unfolded.V)) {
		return false
	}
	f, u := comps(folded), comps(unfolded)
	for i := 1; i < 4; i++ {
		if !math.IsNaN(u[i]) && !math.IsInf(u[i], 0) && f[i] != u[i] {
			return false
		}
	}
	return true
}

func checkFuzzError(t *testing.T, src string, err error) {
	t.Helper()
	var se *SyntaxError
	if !errors.As(err, &se) {
		t.Fatalf("Compile(%q) returned %T %v, want a *SyntaxError", src, err, err)
	}
	lines := strings.Split(src, "\n")
	if se.Line < 1 || se.Line > len(lines) {
		t.Fatalf("Compile(%q): line %d outside [1, %d]: %v", src, se.Line, len(lines), err)
	}
	if n := utf8.RuneCountInString(lines[se.Line-1]); se.Col < 1 || se.Col > n+1 {
		t.Fatalf("Compile(%q): column %d outside [1, %d]: %v", src, se.Col, n+1, err)
	}
	if se.Col > utf8.RuneCountInString(src)+1 {
		t.Fatalf("Compile(%q): column %d beyond the source", src, se.Col)
	}
	if se.Code < CodeEmpty || se.Code > CodeConstant || se.Msg == "" {
		t.Fatalf("Compile(%q): code %d, message %q", src, se.Code, se.Msg)
	}
	if c := se.Caret(); !strings.HasSuffix(c, "^") {
		t.Fatalf("Compile(%q): Caret() = %q", src, c)
	}
	pos := fmt.Sprintf("column %d", se.Col)
	if se.Line != 1 {
		pos = fmt.Sprintf("line %d, column %d", se.Line, se.Col)
	}
	if msg := se.Error(); !strings.Contains(msg, pos) || !strings.HasSuffix(msg, se.Msg) {
		t.Fatalf("Compile(%q): message %q does not name %s or ends otherwise than %q", src, msg, pos, se.Msg)
	}
}
