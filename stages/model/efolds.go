package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Closed-form first-order e-fold counts, the integral of V/V' between two
// canonical field values (Model.Efolds), for the families whose V/V' has
// an elementary antiderivative. Each is written so that it keeps its
// relative precision for every interval inside the family's range: no
// difference of two large antiderivative values.

// plateauEfolds returns c ((e^(b z) - e^(b a)) - b (z - a)), which is the
// integral from a to z of (e^(b phi) - 1)/(2 n b), the E-model's V/V', for
// c = 1/(2 n b^2) (derived here). With x = b (z - a) it is computed as
// c (expm1(b a) expm1(x) + (expm1(x) - x)): for 0 <= a <= z both terms are
// non-negative, so nothing cancels; a > z gives the negative.
func plateauEfolds(c, b, a, z float64) float64 {
	if z < a {
		return -plateauEfolds(c, b, z, a)
	}
	x := b * (z - a)
	return float64(c * (float64(detmath.Expm1(float64(b*a))*detmath.Expm1(x)) + expm1MinusX(x)))
}

// invFactorial[k] is 1/k!.
var invFactorial = func() (f [19]float64) {
	p := 1.0
	for k := range f {
		if k > 0 {
			p *= float64(k)
		}
		f[k] = 1 / p
	}
	return f
}()

// expm1MinusX returns e^x - 1 - x. For |x| < 1/2 it sums the Taylor
// series x^2/2! + ... + x^18/18! (the first term left out, 0.5^19/19!, is
// 2e-19 of the sum), where expm1(x) - x would lose log10(2/|x|) digits;
// beyond, expm1(x) - x loses less than two bits.
func expm1MinusX(x float64) float64 {
	if math.Abs(x) >= 0.5 {
		return detmath.Expm1(x) - x
	}
	t := invFactorial[18]
	for k := 17; k >= 2; k-- {
		t = invFactorial[k] + float64(x*t)
	}
	return x * x * t
}

// coshEfolds returns c sinh((a + z)/s) sinh((z - a)/s), which is
// (c/2) (cosh(2z/s) - cosh(2a/s)): the T-model's count, the integral from a
// to z of V/V' = (s/(4n)) sinh(2 phi/s) with c = s^2/(4n) (derived here),
// as a product, without the difference of the two cosh.
func coshEfolds(c, s, a, z float64) float64 {
	return c * detmath.Sinh((a+z)/s) * detmath.Sinh((z-a)/s)
}
