package num

import "math"

// within reports whether got agrees with want to the relative tolerance
// rel, or to the absolute tolerance abs when want is (close to) zero.
func within(got, want, rel, abs float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

// fd returns fourth-order central finite differences of f at x for the
// first three derivatives, with step h (standard stencils; Fornberg 1988,
// Math. Comp. 51, 699, Table 1).
func fd(f func(float64) float64, x, h float64) (d1, d2, d3 float64) {
	m3, m2, m1 := f(x-3*h), f(x-2*h), f(x-h)
	p1, p2, p3 := f(x+h), f(x+2*h), f(x+3*h)
	f0 := f(x)
	d1 = (m2 - 8*m1 + 8*p1 - p2) / (12 * h)
	d2 = (-p2 + 16*p1 - 30*f0 + 16*m1 - m2) / (12 * h * h)
	d3 = (-p3 + 8*p2 - 13*p1 + 13*m1 - 8*m2 + m3) / (8 * h * h * h)
	return
}
