package tables

import (
	"math"
	"strconv"
	"testing"
)

// TestNumberLayouts: significant digits with trailing zeros kept in text
// formats, positional for exponents -3..digits-1 and scientific outside
// (as printf's %g, cut at 1e-3); the machine form is Go's shortest 'g'
// layout, positional for decimal exponents -4 to 5 (strconv); rounding that carries into a new decade
// moves the layout with it; correctly rounded, ties to even (IEEE 754
// round-to-nearest, as strconv does; 1234.5 and 1.2345e4 are exact
// binary values).
func TestNumberLayouts(t *testing.T) {
	for _, c := range []struct {
		x                     float64
		digits                int
		machine, plain, latex string
	}{
		{0.96363636, 4, "0.9636", "0.9636", "$0.9636$"},
		{55, 4, "55", "55.00", "$55.00$"},
		{0.0039669421, 4, "0.003967", "0.003967", "$0.003967$"},
		{-6.6115702e-4, 4, "-0.0006612", "-6.612e-4", `$-6.612\times10^{-4}$`},
		{1.623456e16, 3, "1.62e+16", "1.62e+16", `$1.62\times10^{16}$`},
		{2.481234e13, 4, "2.481e+13", "2.481e+13", `$2.481\times10^{13}$`},
		{9.99996, 4, "10", "10.00", "$10.00$"},
		{0.00099996, 4, "0.001", "0.001000", "$0.001000$"},
		{1234.5, 4, "1234", "1234", "$1234$"},
		{12345, 4, "12340", "1.234e+4", `$1.234\times10^{4}$`},
		{0, 3, "0", "0.00", "$0.00$"},
		{1, 1, "1", "1", "$1$"},
	} {
		f := numberFormat{c.digits}
		if got := f.machine(c.x); got != c.machine {
			t.Errorf("machine(%g, %d) = %q, want %q", c.x, c.digits, got, c.machine)
		}
		if got := f.plain(c.x); got != c.plain {
			t.Errorf("plain(%g, %d) = %q, want %q", c.x, c.digits, got, c.plain)
		}
		if got := f.latex(c.x); got != c.latex {
			t.Errorf("latex(%g, %d) = %q, want %q", c.x, c.digits, got, c.latex)
		}
	}
}

// TestExactNumbers: exact mode writes the shortest decimal that parses
// back to the same float64 (strconv's round-trip guarantee), checked on
// awkward values, in all three layouts; positional for exponents -3..5.
func TestExactNumbers(t *testing.T) {
	f := numberFormat{0}
	a, b := 0.1, 0.2
	sum := a + b // 0.30000000000000004 in float64 (a constant 0.1 + 0.2 would be exactly 0.3)
	for _, x := range []float64{sum, 1.0 / 3, 2.4812345678901234e13, -6.6115702e-4, 1e-300, math.MaxFloat64, 5e-324, 55} {
		s := f.machine(x)
		if y, err := strconv.ParseFloat(s, 64); err != nil || y != x {
			t.Errorf("machine(%v) = %q reads back as %v", x, s, y)
		}
		if s != strconv.FormatFloat(x, 'g', -1, 64) {
			t.Errorf("machine(%v) = %q is not the shortest form", x, s)
		}
	}
	for _, c := range []struct {
		x            float64
		plain, latex string
	}{
		{sum, "0.30000000000000004", "$0.30000000000000004$"},
		{55, "55", "$55$"},
		{123456.5, "123456.5", "$123456.5$"},
		{1234567, "1.234567e+6", `$1.234567\times10^{6}$`},
		{2.4812345678901234e13, "2.4812345678901234e+13", `$2.4812345678901234\times10^{13}$`},
		{-6.6115702e-4, "-6.6115702e-4", `$-6.6115702\times10^{-4}$`},
		{0.001, "0.001", "$0.001$"},
	} {
		if got := f.plain(c.x); got != c.plain {
			t.Errorf("exact plain(%v) = %q, want %q", c.x, got, c.plain)
		}
		if got := f.latex(c.x); got != c.latex {
			t.Errorf("exact latex(%v) = %q, want %q", c.x, got, c.latex)
		}
	}
}

// TestNonFinite: NaN and infinities in each layout.
func TestNonFinite(t *testing.T) {
	f := numberFormat{4}
	for _, c := range []struct {
		x                     float64
		machine, plain, latex string
	}{
		{math.NaN(), "NaN", "NaN", "NaN"},
		{math.Inf(1), "+Inf", "+Inf", `$+\infty$`},
		{math.Inf(-1), "-Inf", "-Inf", `$-\infty$`},
	} {
		if f.machine(c.x) != c.machine || f.plain(c.x) != c.plain || f.latex(c.x) != c.latex {
			t.Errorf("%v: %q %q %q", c.x, f.machine(c.x), f.plain(c.x), f.latex(c.x))
		}
	}
	if jsonNumber(f, math.NaN()) != "null" || jsonNumber(f, math.Inf(1)) != "null" {
		t.Error("non-finite JSON numbers are not null")
	}
}
