package expr

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// within reports whether got agrees with want to the relative tolerance
// rel; when want is exactly zero, to rel as an absolute tolerance. Equal
// infinities and two NaNs agree.
func within(got, want, rel float64) bool {
	switch {
	case got == want, math.IsNaN(got) && math.IsNaN(want):
		return true
	case want == 0:
		return math.Abs(got) <= rel
	}
	return math.Abs(got-want) <= rel*math.Abs(want)
}

// same reports whether two jets are equal component by component (==, so
// +0 equals -0), with NaN equal to NaN.
func same(a, b num.Jet) bool {
	eq := func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) }
	return eq(a.V, b.V) && eq(a.D1, b.D1) && eq(a.D2, b.D2) && eq(a.D3, b.D3)
}

// comps returns the components of a jet as an array.
func comps(j num.Jet) [4]float64 { return [4]float64{j.V, j.D1, j.D2, j.D3} }

// mustCompile compiles src in the field x, allowing constants.
func mustCompile(t testing.TB, src string, params map[string]float64) *Expr {
	t.Helper()
	e, err := CompileWith(src, "x", params, &Options{AllowConstant: true})
	if err != nil {
		t.Fatalf("Compile(%q): %v", src, err)
	}
	return e
}

// unfolded compiles src without constant folding, for comparison with the
// folded tree.
func unfolded(t testing.TB, src string, params map[string]float64) *node {
	t.Helper()
	tree, _, err := parse(src, &scope{field: "x", params: params})
	if err != nil {
		t.Fatalf("parse(%q): %v", src, err)
	}
	return lower(tree, params, false)
}

// fdStencils are central finite-difference weights on the offsets -4..4:
// first and second derivatives to eighth order, the third to sixth order
// (Fornberg 1988, Math. Comp. 51, 699, Table 1).
var fdStencils = [3][9]float64{
	{1.0 / 280, -4.0 / 105, 1.0 / 5, -4.0 / 5, 0, 4.0 / 5, -1.0 / 5, 4.0 / 105, -1.0 / 280},
	{-1.0 / 560, 8.0 / 315, -1.0 / 5, 8.0 / 5, -205.0 / 72, 8.0 / 5, -1.0 / 5, 8.0 / 315, -1.0 / 560},
	{-7.0 / 240, 3.0 / 10, -169.0 / 120, 61.0 / 30, 0, -61.0 / 30, 169.0 / 120, -3.0 / 10, 7.0 / 240},
}

// fd returns the first three derivatives of f at x by central finite
// differences with step h.
func fd(f func(float64) float64, x, h float64) [3]float64 {
	var fs [9]float64
	for i := range fs {
		fs[i] = f(x + float64(i-4)*h)
	}
	var d [3]float64
	for k, st := range fdStencils {
		for i, c := range st {
			d[k] += c * fs[i]
		}
		d[k] /= math.Pow(h, float64(k+1))
	}
	return d
}
