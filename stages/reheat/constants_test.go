package reheat

import (
	"math"
	"testing"
)

// TestConstants: the unit conversions against published-values B10.
func TestConstants(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
		rel       float64
		why       string
	}{
		{"reduced Planck mass [GeV]", ReducedPlanckGeV, 2.435e18, 2e-4,
			"B10: 2.435e18 GeV (PDG, from memory; common practice), printed to 4 digits"},
		{"non-reduced / reduced", PlanckMassGeV / ReducedPlanckGeV, math.Sqrt(8 * math.Pi), 1e-15,
			"definition M_p = M_Pl/sqrt(8 pi) (common practice)"},
		{"Planck mass [GeV]", PlanckMassGeV, 1.2209e19, 1e-4, "B10: M_Pl = 1.2209e19 GeV (from memory), 5 digits"},
		{"1 Mpc^-1 [GeV]", PerMpcInGeV, 6.39493e-39, 1e-5, "B10 (C): hbar c / 1 Mpc, printed to 6 digits"},
		{"1 Mpc [GeV^-1]", 1 / PerMpcInGeV, 1.56374e38, 1e-5, "B10 (C), 6 digits"},
		{"k = 0.05 Mpc^-1 [GeV]", 0.05 * PerMpcInGeV, 3.19747e-40, 1e-5, "B10 (C), 6 digits"},
		{"k = 0.002 Mpc^-1 [GeV]", 0.002 * PerMpcInGeV, 1.27899e-41, 1e-5, "B10 (C), 6 digits"},
		{"k_B T_0 [GeV]", KelvinInGeV(DefaultT0K), 2.348654e-13, 5e-7, "B10: T_0 = 2.7255 K (Fixsen 2009, V) with k_B exact (CODATA 2018), 7 digits"},
		{"g_s0", DefaultGS0, 3.90909, 2e-6, "B10: 43/11 (common practice), 6 digits"},
		{"A_s default", DefaultAs, 2.1e-9, 0, "Planck 2018 VI ln(10^10 A_s) = 3.044 rounded (A1, C)"},
		{"A_s from ln(10^10 A_s) = 3.044", math.Exp(3.044) * 1e-10, 2.0989e-9, 5e-5, "A1 / B10 (C), 5 digits"},
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
