package compare_test

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// Compare a prediction with a Gaussian (n_s, r) constraint. The numbers
// are illustrative: n_s = 0.9649 ± 0.0042 (Planck 2018 VI/X) and r with
// sigma_r = 0.036/1.959964 from a one-sided 95% limit r < 0.036
// (BICEP/Keck 2021) — the combination is invented for the example.
func ExampleGaussian_Compare() {
	g := compare.Gaussian{Name: "example", MeanNs: 0.9649, SigmaNs: 0.0042, MeanR: 0, SigmaR: 0.036 / compare.HalfNormal95}
	c := g.Compare(0.9653, 0.0035)
	fmt.Printf("dchi2=%.3f sigmas=%.3f in68=%v\n", c.DeltaChi2, c.Sigmas, c.Inside68)
	// Output: dchi2=0.045 sigmas=0.028 in68=true
}

// Delta chi^2 = 6.18 is two sigma for two parameters.
func ExampleSigmas() {
	fmt.Printf("%.3f %.3f\n", compare.Sigmas(2.2958), compare.Sigmas(6.1801))
	// Output: 1.000 2.000
}
