package reheat

import (
	"math"
	"testing"
)

// TestConstants: the unit conversions against their primary sources:
// the Particle Data Group's astrophysical constants for the Planck mass,
// CODATA 2018 (exact SI of 2019) for k_B and hbar c, IAU 2015 Resolution
// B2 for the parsec, Fixsen 2009 for T_0; derived figures are computed
// from those with the formula beside them. Each tolerance is half a unit
// of the last digit the source (or the computation) prints.
func TestConstants(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
		rel       float64
		why       string
	}{
		{"reduced Planck mass [GeV]", ReducedPlanckGeV, 2.435323e18, 2.1e-7,
			"Particle Data Group, Astrophysical constants: (hbar c/8 pi G)^(1/2) = 2.435323(27)e18 GeV (from memory), 7 digits"},
		{"non-reduced / reduced", PlanckMassGeV / ReducedPlanckGeV, math.Sqrt(8 * math.Pi), 1e-15,
			"definition M_p = M_Pl/sqrt(8 pi) (common practice)"},
		{"Planck mass [GeV]", PlanckMassGeV, 1.220890e19, 4.1e-7,
			"Particle Data Group, Astrophysical constants: (hbar c/G)^(1/2) = 1.220890(14)e19 GeV (from memory), 7 digits"},
		{"1 Mpc^-1 [GeV]", PerMpcInGeV, 6.3949319e-39, 7.9e-9,
			"computed: hbar c/(1 Mpc), hbar c = 1.973269804e-16 GeV m (CODATA 2018), 1 pc = 3.0856775814913673e16 m (IAU 2015 Resolution B2), 8 digits"},
		{"1 Mpc [GeV^-1]", 1 / PerMpcInGeV, 1.5637383e38, 3.2e-8, "computed: (1 Mpc)/(hbar c), same inputs, 8 digits"},
		{"k = 0.05 Mpc^-1 [GeV]", 0.05 * PerMpcInGeV, 3.1974660e-40, 1.6e-8, "computed: 0.05 hbar c/(1 Mpc), 8 digits"},
		{"k = 0.002 Mpc^-1 [GeV]", 0.002 * PerMpcInGeV, 1.2789864e-41, 3.9e-8, "computed: 0.002 hbar c/(1 Mpc), 8 digits"},
		{"k_B T_0 [GeV]", KelvinInGeV(DefaultT0K), 2.3486542e-13, 2.2e-8,
			"computed: k_B T_0, T_0 = 2.7255 K (Fixsen 2009, ApJ 707, 916, arXiv:0911.1955, abstract: 2.72548 +- 0.00057 K) with k_B = 8.617333262e-5 eV/K exact (CODATA 2018), 8 digits"},
		{"g_s0", DefaultGS0, 2 + (7.0/8)*2*3*(4.0/11), 1e-15,
			"photons plus three neutrino species at T_nu^3 = (4/11) T^3: 2 + (7/8) 2 3 (4/11) = 43/11 (common practice)"},
		{"A_s default", DefaultAs, 2.1e-9, 0,
			"Planck 2018 VI, arXiv:1807.06209, Table 2: ln(10^10 A_s) = 3.044 +- 0.014 (from memory as to the table), rounded to 2 digits"},
		{"A_s from ln(10^10 A_s) = 3.044", math.Exp(3.044) * 1e-10, 2.0989e-9, 2.5e-5,
			"computed: exp(3.044) 1e-10, 5 digits (Planck 2018 VI value as above)"},
	}
	for _, c := range cases {
		if !within(c.got, c.want, c.rel, 0) {
			t.Errorf("%s = %.10g, want %.10g ± %g relative (%s)", c.name, c.got, c.want, c.rel, c.why)
		}
	}
}

// TestGeVHelpers: energies in M_p and densities in M_p^4 to GeV.
func TestGeVHelpers(t *testing.T) {
	if GeV(1) != ReducedPlanckGeV || !within(GeV(2.5e-5), 2.5e-5*ReducedPlanckGeV, 1e-15, 0) {
		t.Errorf("GeV(1) = %g, GeV(2.5e-5) = %g", GeV(1), GeV(2.5e-5))
	}
	if !within(QuarterGeV(16), 2*ReducedPlanckGeV, 1e-15, 0) || !within(QuarterGeV(1e-12), 1e-3*ReducedPlanckGeV, 1e-14, 0) {
		t.Errorf("QuarterGeV(16) = %g, QuarterGeV(1e-12) = %g", QuarterGeV(16), QuarterGeV(1e-12))
	}
}
