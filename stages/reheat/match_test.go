package reheat

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// pointWithR is a hand-made slow-roll point with r = 16 epsilon_V = r and
// V = 1 (V0 units), to exercise Normalise without a model.
func pointWithR(r float64) slowroll.Point { return slowroll.Point{V: 1, Epsilon: r / 16} }

// TestEnergyScale: H* = pi M_p sqrt(A_s r/2) and
// V*^(1/4) = (3 pi^2 A_s r/2)^(1/4) M_p, from the tensor spectrum
// P_t = 2H^2/(pi^2 M_p^2) = r A_s and H^2 = V/(3 M_p^2) (common practice;
// Planck 2018 X, arXiv:1807.06211, sect. 2, equation number from memory).
// The rows are computed from those two formulas (A_s = 2.0989e-9,
// M_p = 2.435e18 GeV) and printed to 4 digits; they are checked to half a
// unit of the 4th digit.
func TestEnergyScale(t *testing.T) {
	const As = 2.0989e-9
	for _, row := range []struct {
		r, v4, h, hOverMp float64 // computed, 4 digits
	}{
		{0.036, 1.408e16, 4.702e13, 1.931e-5},
		{0.032, 1.367e16, 4.433e13, 1.821e-5},
		{0.01, 1.022e16, 2.478e13, 1.018e-5},
		{0.003, 7.566e15, 1.357e13, 5.574e-6},
		{0.001, 5.749e15, 7.837e12, 3.218e-6},
	} {
		s := Normalise(pointWithR(row.r), slowroll.End{V: 0.5}, Normalisation{As: As})
		// The formulas themselves, to rounding.
		if want := math.Pi * math.Sqrt(As*row.r/2); !within(s.Hstar, want, 1e-14, 0) {
			t.Errorf("r=%g: H* = %.15g M_p, pi sqrt(A_s r/2) = %.15g", row.r, s.Hstar, want)
		}
		if want := math.Pow(3*math.Pi*math.Pi*As*row.r/2, 0.25); !within(math.Pow(s.Vstar, 0.25), want, 1e-14, 0) {
			t.Errorf("r=%g: V*^(1/4) = %.15g M_p, want %.15g", row.r, math.Pow(s.Vstar, 0.25), want)
		}
		// The printed table, converted with the reference's M_p.
		for _, c := range []struct {
			what      string
			got, want float64
		}{
			{"V*^(1/4) [GeV]", math.Pow(s.Vstar, 0.25) * refMp, row.v4},
			{"H* [GeV]", s.Hstar * refMp, row.h},
			{"H*/M_p", s.Hstar, row.hOverMp},
		} {
			// Half a unit of the 4th significant digit is at most 5e-4
			// relative (mantissa 1.0xx); 6e-4 allows for the rounded inputs.
			if !within(c.got, c.want, 6e-4, 0) {
				t.Errorf("r=%g: %s = %.5g, computed %.4g", row.r, c.what, c.got, c.want)
			}
		}
		// The end of inflation: rho_end = (3/2) V_end with the same V0.
		if !within(s.RhoEnd, 1.5*s.V0*0.5, 1e-15, 0) || !within(s.Vend, 0.5*s.V0, 1e-15, 0) {
			t.Errorf("r=%g: V_end %g, rho_end %g with V0 %g", row.r, s.Vend, s.RhoEnd, s.V0)
		}
	}
	// r = 0.01, A_s = 2.1e-9 with the package's own M_p: H* = 2.479e13 GeV
	// (computed from the formula above), i.e. 2.5e13 GeV to the half unit
	// of its 2nd digit.
	s := Normalise(pointWithR(0.01), slowroll.End{V: 1}, Normalisation{As: 2.1e-9})
	if h := GeV(s.Hstar); math.Abs(h-2.5e13) > 0.05e13 {
		t.Errorf("r = 0.01, A_s = 2.1e-9: H* = %.4g GeV, want about 2.5e13", h)
	}
}

// TestNormaliseModel: for a real model at a chosen N, the normalisation
// reproduces A_s = V/(24 pi^2 epsilon_V) (Liddle & Lyth 2000, ch. 7) and
// the energy-scale relations of TestEnergyScale hold for whatever r the
// model predicts there.
func TestNormaliseModel(t *testing.T) {
	const As = 2.099e-9
	for _, c := range []struct {
		family string
		params map[string]float64
		N      float64
	}{
		{"starobinsky", nil, 55},
		{"t-model", map[string]float64{"alpha": 7.0 / 3}, 53},
		{"power-law", map[string]float64{"p": 2}, 60},
		{"natural", map[string]float64{"f": 7}, 50},
	} {
		sol := mustSolve(t, c.family, c.params)
		pr, err := AtEfolds(sol, c.N, Normalisation{As: As})
		if err != nil {
			t.Fatal(err)
		}
		r := pr.Obs.R
		s := pr.Scale
		if got := s.Vstar / (24 * math.Pi * math.Pi * pr.Point.Epsilon); !within(got, As, 1e-14, 0) {
			t.Errorf("%s: A_s reproduced as %.15g", c.family, got)
		}
		if want := math.Pi * math.Sqrt(As*r/2); !within(s.Hstar, want, 1e-14, 0) {
			t.Errorf("%s N=%g: H* = %.15g, pi sqrt(A_s r/2) = %.15g (r = %g)", c.family, c.N, s.Hstar, want, r)
		}
		if want := math.Pow(1.5*math.Pi*math.Pi*As*r, 0.25); !within(math.Pow(s.Vstar, 0.25), want, 1e-14, 0) {
			t.Errorf("%s: V*^(1/4) = %.15g, want %.15g", c.family, math.Pow(s.Vstar, 0.25), want)
		}
		if !within(s.Vend, s.V0*sol.End.V, 1e-15, 0) || !within(s.RhoEnd, 1.5*s.Vend, 1e-15, 0) {
			t.Errorf("%s: V_end %g, rho_end %g", c.family, s.Vend, s.RhoEnd)
		}
		if pr.N != c.N || pr.Point.N != c.N || pr.TReh != 0 {
			t.Errorf("%s: Prediction N %g, Point.N %g, TReh %g", c.family, pr.N, pr.Point.N, pr.TReh)
		}
	}
}

// TestMatchingConstant: with H* = T_reh and g_s,reh = g_s0 the instant
// matching reduces to N* = ln(a_0 T_0/k*), which for k* = 0.05 Mpc^-1 is
// ln(2.348654e-13/3.19747e-40) = 61.8613 (computed: k_B T_0 and k* in GeV
// as in TestConstants, from Fixsen 2009's T_0 and CODATA 2018); the
// tolerance 2e-5 covers the 6-7 printed digits of the two inputs.
func TestMatchingConstant(t *testing.T) {
	h := DefaultHistory()
	h.GSReh = h.GS0
	H := 1e-5
	// T_reh^4 = 30 rho/(pi^2 g) = H^4.
	s := Scale{Hstar: H, RhoEnd: math.Pi * math.Pi * h.GReh * math.Pow(H, 4) / 30}
	N, T := h.InstantEfolds(s)
	if !within(T, H, 1e-14, 0) {
		t.Fatalf("T_reh = %g, want %g", T, H)
	}
	if want := math.Log(2.348654e-13 / 3.19747e-40); math.Abs(N-want) > 2e-5 {
		t.Errorf("ln(a0 T0/k*) = %.6f, computed %.6f", N, want)
	}
	if math.Abs(N-61.86) > 5e-3 {
		t.Errorf("ln(a0 T0/k*) = %.4f, want 61.86", N)
	}
	// k* = 0.002 Mpc^-1 adds ln 25.
	h2 := h
	h2.PivotPerMpc = 0.002
	N2, _ := h2.InstantEfolds(s)
	if !within(N2-N, math.Log(25), 1e-12, 0) {
		t.Errorf("pivot 0.002 vs 0.05: shift %.15g, want ln 25", N2-N)
	}
}

// TestStarobinskyInstantWorkedExample: a self-consistent worked example,
// computed by hand at first order in slow roll (epsilon_V, eta_V, end at
// epsilon_V = 1) with the instant matching N* = ln(a_0 T_0/k*) +
// (1/3) ln(g_s0/g_s,reh) + ln(H*/T_reh), T_reh = (30 rho_end/(pi^2 g))^(1/4)
// (Liddle & Leach 2003, PRD 68, 103503, astro-ph/0305263, equation number
// from memory; Planck 2018 X, arXiv:1807.06211, sect. 2.4, eq. 47 with no
// reheating term, equation number from memory): Starobinsky,
// A_s = 2.099e-9, g = 106.75, k* = 0.05 Mpc^-1, T_0 = 2.7255 K gives
// N* = 55.56, n_s = 0.96532, r = 0.00343, V0^(1/4) = 7.87e15 GeV,
// rho_end^(1/4) = 6.38e15 GeV, each checked to half a unit of its last
// printed digit (GeV values converted with refMp = 2.435e18 GeV).
func TestStarobinskyInstantWorkedExample(t *testing.T) {
	sol := mustSolve(t, "starobinsky", nil)
	pr, err := Instant(sol, DefaultHistory(), Normalisation{As: 2.099e-9})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		what          string
		got, want, pm float64
	}{
		{"N*", pr.N, 55.56, 0.005},
		{"n_s", pr.Obs.Ns, 0.96532, 5e-6},
		{"r", pr.Obs.R, 0.00343, 5e-6},
		{"V0^(1/4) [GeV]", math.Pow(pr.Scale.V0, 0.25) * refMp, 7.87e15, 0.005e15},
		{"rho_end^(1/4) [GeV]", math.Pow(pr.Scale.RhoEnd, 0.25) * refMp, 6.38e15, 0.005e15},
	} {
		if math.Abs(c.got-c.want) > c.pm {
			t.Errorf("%s = %.6g, computed %g (± %g)", c.what, c.got, c.want, c.pm)
		}
	}
	// Instant reheating: rho_end = (pi^2/30) g T_reh^4 (common practice: a
	// thermal bath of g relativistic degrees of freedom).
	if want := math.Pow(30*pr.Scale.RhoEnd/(math.Pi*math.Pi*106.75), 0.25); !within(pr.TReh, want, 1e-14, 0) {
		t.Errorf("T_reh = %g, want %g", pr.TReh, want)
	}
}

// TestInstantSelfConsistency: the returned N* is a fixed point of the
// matching, N* = InstantEfolds(normalised at N*), to 1e-9 (the iteration
// stops at steps below 1e-11).
func TestInstantSelfConsistency(t *testing.T) {
	for _, c := range []struct {
		family string
		params map[string]float64
	}{
		{"starobinsky", nil},
		{"t-model", map[string]float64{"alpha": 1.0 / 3}},
		{"t-model", map[string]float64{"alpha": 7.0 / 3}},
		{"e-model", map[string]float64{"alpha": 1, "n": 2}},
		{"power-law", map[string]float64{"p": 2}},
		{"natural", map[string]float64{"f": 7}},
		{"hilltop", map[string]float64{"mu": 15, "p": 4}},
	} {
		sol := mustSolve(t, c.family, c.params)
		h := DefaultHistory()
		pr, err := Instant(sol, h, Normalisation{As: DefaultAs})
		if err != nil {
			t.Errorf("%s: %v", c.family, err)
			continue
		}
		again, err := AtEfolds(sol, pr.N, Normalisation{As: DefaultAs})
		if err != nil {
			t.Fatal(err)
		}
		N, T := h.InstantEfolds(again.Scale)
		if math.Abs(N-pr.N) > 1e-9 || !within(T, pr.TReh, 1e-9, 0) {
			t.Errorf("%s: N* = %.12g but the matching at it gives %.12g (T_reh %g vs %g)", c.family, pr.N, N, T, pr.TReh)
		}
		// Instant reheating gives the conventional 50-60 window's upper
		// part (Liddle & Leach 2003, astro-ph/0305263: N of about 50-60
		// with an upper limit near 60, from memory; Planck 2018 VI,
		// arXiv:1807.06209, Fig. 28 caption: 50 < N < 60): a sanity band.
		// These models give 55.2-57.4 here.
		if pr.N < 50 || pr.N > 60 {
			t.Errorf("%s: N* = %g outside 50..60", c.family, pr.N)
		}
	}
}

// TestDegreesOfFreedomSlope: in the matching N* = ln(a0 T0/k*) +
// (1/3) ln(g_s0/g_s,reh) + ln(H*/T_reh) with T_reh ∝ g_reh^(-1/4), a
// common g = g_s,reh = g_reh enters as -(1/3) ln g + (1/4) ln g =
// -(1/12) ln g: the -(1/12) ln g_th of the Planck form (Planck 2018 X,
// arXiv:1807.06211, sect. 2.4, eq. 47, equation number from memory; the
// same form is in Planck 2013 XXII, arXiv:1303.5082). Separately, the
// slope in ln g_reh alone is +1/4 and in ln g_s,reh alone -1/3.
//
// For the self-consistent N* the slope is divided by 1 - dF/dN, where
// F(N) is the matching evaluated with the normalisation at N (derived
// here: N = c(g) + F(N) gives dN/dc = 1/(1 - F')); F' is measured by a
// central difference and is O(1/N), so the slope is also close to -1/12.
func TestDegreesOfFreedomSlope(t *testing.T) {
	sol := mustSolve(t, "starobinsky", nil)
	n := Normalisation{As: 2.099e-9}
	base := DefaultHistory()
	pr, err := AtEfolds(sol, 55, n)
	if err != nil {
		t.Fatal(err)
	}
	at := func(g, gs float64) float64 {
		h := base
		h.GReh, h.GSReh = g, gs
		N, _ := h.InstantEfolds(pr.Scale)
		return N
	}
	const f = 4.0 // a factor 4 in g
	for _, c := range []struct {
		what  string
		got   float64
		slope float64
	}{
		{"common g", at(f*106.75, f*106.75) - at(106.75, 106.75), -1.0 / 12},
		{"g_reh only", at(f*106.75, 106.75) - at(106.75, 106.75), 1.0 / 4},
		{"g_s,reh only", at(106.75, f*106.75) - at(106.75, 106.75), -1.0 / 3},
	} {
		if want := c.slope * math.Log(f); !within(c.got, want, 1e-12, 1e-13) {
			t.Errorf("fixed scale, %s: shift %.15g, want %.15g", c.what, c.got, want)
		}
	}
	// Self-consistent N*.
	instant := func(g float64) float64 {
		h := base
		h.GReh, h.GSReh = g, g
		p, err := Instant(sol, h, n)
		if err != nil {
			t.Fatal(err)
		}
		return p.N
	}
	g0 := 106.75
	dl := 0.01
	slope := (instant(g0*math.Exp(dl)) - instant(g0*math.Exp(-dl))) / (2 * dl)
	N0 := instant(g0)
	F := func(N float64) float64 {
		p, err := AtEfolds(sol, N, n)
		if err != nil {
			t.Fatal(err)
		}
		v, _ := base.InstantEfolds(p.Scale)
		return v
	}
	dF := (F(N0+0.1) - F(N0-0.1)) / 0.2
	if want := (-1.0 / 12) / (1 - dF); !within(slope, want, 1e-6, 0) {
		t.Errorf("self-consistent dN*/dln g = %.10g, want -1/12/(1 - F') = %.10g (F' = %.4g)", slope, want, dF)
	}
	if !within(slope, -1.0/12, 0.02, 0) {
		t.Errorf("self-consistent dN*/dln g = %.6g, want -1/12 to 2%%", slope)
	}
}

// TestHistoryCheck: unphysical history values are refused, naming the
// field, by Check and by Instant.
func TestHistoryCheck(t *testing.T) {
	if err := DefaultHistory().Check(); err != nil {
		t.Fatalf("default history: %v", err)
	}
	sol := mustSolve(t, "starobinsky", nil)
	fields := []struct {
		name string
		set  func(h *History, v float64)
	}{
		{"k_pivot", func(h *History, v float64) { h.PivotPerMpc = v }},
		{"T_0", func(h *History, v float64) { h.T0K = v }},
		{"g_s0", func(h *History, v float64) { h.GS0 = v }},
		{"g_reh", func(h *History, v float64) { h.GReh = v }},
		{"g_s_reh", func(h *History, v float64) { h.GSReh = v }},
	}
	for _, f := range fields {
		for _, v := range []float64{0, -1, math.NaN(), math.Inf(1)} {
			h := DefaultHistory()
			f.set(&h, v)
			err := h.Check()
			if err == nil || !strings.Contains(err.Error(), f.name+" ") {
				t.Errorf("%s = %g: error %v, want one naming %s", f.name, v, err, f.name)
			}
			if _, err := Instant(sol, h, Normalisation{As: DefaultAs}); err == nil || !strings.Contains(err.Error(), f.name+" ") {
				t.Errorf("Instant with %s = %g: error %v", f.name, v, err)
			}
		}
	}
}

// TestInstantRangeError: a model range that cannot hold the matched N*
// is reported, with the N* being tried.
func TestInstantRangeError(t *testing.T) {
	sol := mustSolve(t, "power-law", map[string]float64{"p": 2})
	m, err := sol.Model.WithRange(1, 12) // N(12) = 35.5 e-folds only
	if err != nil {
		t.Fatal(err)
	}
	short, err := slowroll.Solve(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Instant(short, DefaultHistory(), Normalisation{As: DefaultAs}); err == nil || !strings.Contains(err.Error(), "reheating matching at N* = 55") {
		t.Errorf("error %v, want one naming the N* tried", err)
	}
}

// BenchmarkInstantReheating: the self-consistent instant-reheating N* for
// Starobinsky (end of inflation already found).
func BenchmarkInstantReheating(b *testing.B) {
	sol := mustSolve(b, "starobinsky", nil)
	h := DefaultHistory()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Instant(sol, h, Normalisation{As: DefaultAs}); err != nil {
			b.Fatal(err)
		}
	}
}
