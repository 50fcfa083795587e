//go:build amd64 && !amd64.v3

package detmath

import (
	"math"
	"testing"
)

// Built where gc fuses nothing (amd64 below v3), Go's math package runs
// its pure-Go code unrounded, and detmath must return the same bits: the
// explicit roundings change nothing where no fusion was possible. Exp,
// Log and Hypot are assembly in math on amd64 (Exp uses fused
// instructions when the CPU has them), so functions built on them are
// compared within ulps in TestCloseToGoMath instead.
func TestSameBitsAsGoMath(t *testing.T) {
	for _, c := range unary {
		if !c.pureStd {
			continue
		}
		for _, x := range inputs(c.lo, c.hi, 20000) {
			got, want := c.f(x), c.std(x)
			if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Fatalf("%s(%.17g) = %.17g, math %.17g", c.name, x, got, want)
			}
		}
	}
}
