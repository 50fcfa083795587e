package compare

import (
	"math"
	"math/rand/v2"
	"strings"
)

func sqrt1m(rho float64) float64 { return math.Sqrt(1 - rho*rho) }

func contains(s, sub string) bool { return strings.Contains(s, sub) }

// gaussSamples draws n points from a bivariate Gaussian with the given
// means, sigmas and correlation (a fixed seed: the tests are reproducible).
func gaussSamples(seed uint64, n int, mNs, sNs, mR, sR, rho float64) []Point {
	rng := rand.New(rand.NewPCG(seed, 1))
	pts := make([]Point, n)
	for i := range pts {
		z1, z2 := rng.NormFloat64(), rng.NormFloat64()
		pts[i] = Point{Ns: mNs + sNs*z1, R: mR + sR*(rho*z1+sqrt1m(rho)*z2)}
	}
	return pts
}
