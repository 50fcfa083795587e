package reheat

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// Normalisation fixes the overall scale of the potential.
type Normalisation struct {
	// As is the scalar amplitude at the pivot (default 2.1e-9).
	As float64
}

// Scale is a normalised prediction, in reduced Planck units.
type Scale struct {
	V0     float64 // the potential's amplitude V0 [M_p^4]
	Vstar  float64 // V at the pivot's exit [M_p^4]
	Hstar  float64 // Hubble rate at the pivot's exit [M_p]
	Vend   float64 // V at the end of inflation [M_p^4]
	RhoEnd float64 // energy density at the end, (3/2) V_end [M_p^4]
}

// Normalise fixes V0 from the first-order amplitude
// A_s = V/(24 pi^2 epsilon_V) (M_p = 1; Liddle & Lyth 2000, ch. 7), with
// H^2 = V/3 at the pivot and rho_end = (3/2) V_end at the end of inflation,
// which is exact where epsilon_H = 1 (there phidot^2 = V) and the
// conventional approximation when the end is taken at epsilon_V = 1.
func Normalise(p slowroll.Point, end slowroll.End, n Normalisation) Scale {
	V0 := 24 * math.Pi * math.Pi * n.As * p.Epsilon / p.V
	vs := V0 * p.V
	ve := V0 * end.V
	return Scale{V0: V0, Vstar: vs, Hstar: math.Sqrt(vs / 3), Vend: ve, RhoEnd: 1.5 * ve}
}

// Prediction is one matched prediction at the pivot.
type Prediction struct {
	N     float64 // e-folds between the pivot's exit and the end of inflation
	Point slowroll.Point
	Obs   slowroll.Observables
	Scale Scale
	// TReh is the reheating temperature [M_p]; for instantaneous
	// reheating it is the maximum, T_max. Zero when not computed.
	TReh float64
	// TMax is the instantaneous-reheating temperature [M_p], NReh the
	// e-folds of reheating and W its equation of state (zero when not
	// matched to a history).
	TMax, NReh, W float64
}

// AtEfolds evaluates a solution at a given N* and normalises it.
func AtEfolds(sol *slowroll.Solution, N float64, n Normalisation) (Prediction, error) {
	p, o, err := sol.Evaluate(N)
	if err != nil {
		return Prediction{}, err
	}
	return Prediction{N: N, Point: p, Obs: o, Scale: Normalise(p, sol.End, n)}, nil
}

// History describes the thermal history after inflation needed to relate
// the pivot to the end of inflation.
type History struct {
	PivotPerMpc float64 // k* [Mpc^-1]
	T0K         float64 // CMB temperature today [K]
	GS0         float64 // entropy degrees of freedom today
	GReh        float64 // relativistic degrees of freedom at reheating
	GSReh       float64 // entropy degrees of freedom at reheating
}

// DefaultHistory is k* = 0.05 Mpc^-1, T_0 = 2.7255 K, g_s0 = 43/11 and
// g = g_s = 106.75 at reheating.
func DefaultHistory() History {
	return History{PivotPerMpc: DefaultPivotPerMpc, T0K: DefaultT0K, GS0: DefaultGS0, GReh: DefaultGReh, GSReh: DefaultGReh}
}

// Check refuses unphysical history parameters, naming the field.
func (h History) Check() error {
	for _, c := range []struct {
		name string
		v    float64
	}{{"k_pivot [Mpc^-1]", h.PivotPerMpc}, {"T_0 [K]", h.T0K}, {"g_s0", h.GS0}, {"g_reh", h.GReh}, {"g_s_reh", h.GSReh}} {
		if !(c.v > 0) || math.IsInf(c.v, 0) {
			return fmt.Errorf("reheating history: %s = %g, want a positive finite value", c.name, c.v)
		}
	}
	return nil
}

// InstantEfolds returns N*(N) for instantaneous reheating, the right-hand
// side of the matching condition k* = a* H* written with entropy
// conservation from reheating to today (no H_0 needed):
//
//	N* = ln(a_0 T_0/k*) + (1/3) ln(g_s0/g_s,reh) + ln(H*/T_reh),
//	T_reh = (30 rho_end/(pi^2 g_reh))^(1/4),
//
// (Liddle & Leach 2003, PRD 68, 103503, astro-ph/0305263, eq. 2 in the
// entropy form; Planck 2018 X, arXiv:1807.06211, sect. 2.4, with no
// reheating phase). All energies in units of M_p.
func (h History) InstantEfolds(s Scale) (N, TReh float64) {
	kOverT0 := h.PivotPerMpc * PerMpcInGeV / KelvinInGeV(h.T0K) // dimensionless
	TReh = math.Pow(30*s.RhoEnd/(math.Pi*math.Pi*h.GReh), 0.25)
	N = -math.Log(kOverT0) + math.Log(h.GS0/h.GSReh)/3 + math.Log(s.Hstar/TReh)
	return N, TReh
}

// FirstOrder evaluates a slow-roll solution at first order and normalises
// it to A_s.
type FirstOrder struct {
	Sol  *slowroll.Solution
	Norm Normalisation
}

// At implements Evaluator.
func (f FirstOrder) At(N float64) (Prediction, error) { return AtEfolds(f.Sol, N, f.Norm) }

// Instant solves the matching for instantaneous reheating self-consistently
// at first order (Match with EraInstant).
func Instant(sol *slowroll.Solution, h History, n Normalisation) (Prediction, error) {
	return Match(FirstOrder{sol, n}, h, Era{Kind: EraInstant}, 55)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
