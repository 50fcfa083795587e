package slowroll

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/ode"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Mode equations.
//
// A scalar mode obeys the Mukhanov–Sasaki equation v” + (k² - z”/z) v = 0
// in conformal time, z = a dphi/dt / H = a pi, with the comoving curvature
// perturbation R = v/z (Mukhanov 1988, Sov. Phys. JETP 67, 1297; Sasaki
// 1986, Prog. Theor. Phys. 76, 1036); a tensor mode obeys the same with
// z_t = a and h = 2v/a for each polarisation (M_p = 1). Only |v| enters
// the power spectra, and the Bunch–Davies mode is a non-oscillating
// solution for |v| even while v oscillates: with the Wronskian
// v v*' - v* v' = i, rho = |v| obeys the Ermakov–Pinney equation
// rho” + (k² - z”/z) rho = 1/(4 rho³) (Milne 1930, Phys. Rev. 35, 863;
// Pinney 1950, Proc. AMS 1, 681). We evolve it in e-folds N with
//
//	s = ln(rho sqrt(2k)),   the log of |v/z| relative to its sub-horizon
//	                        value 1/(z sqrt(2k)),
//	u = ds/dN,
//
// so that s ≈ 0 deep inside the horizon and s - ln z tends to a constant
// outside it: nothing overflows, and the fast phase e^{-ik tau} is never
// integrated. With x = k/(aH), ' = d/dN and ln z' = 1 + delta_1
// (delta_1 = d ln pi/dN for scalars, 0 for tensors), substituting
// rho = e^s/sqrt(2k) into the Ermakov–Pinney equation rewritten with
// d/dtau = aH d/dN and (aH)' = (1 - epsilon_H) aH gives
//
//	s' = u,
//	u' = delta_1' - A² - (3 - epsilon_H + 2 delta_1) A + x² expm1(-4s),
//	A  = u - 1 - delta_1,
//
// (equivalently s” + s'² + (1 - epsilon_H) s' = Z + x² expm1(-4s) with
// Z = z”/z/(aH)² = (1 + delta_1)(2 - epsilon_H + delta_1) + delta_1', the
// form adiabatic.go expands), where expm1 keeps the near-cancellation of
// the two O(x²) terms inside the horizon exact and A, which decays
// outside the horizon, keeps the cancellation there exact. The
// linearisation inside the horizon oscillates with frequency 2x per
// e-fold, and the error of an explicit Runge–Kutta step on the smooth
// solution grows with h x, so the step there scales like 1/x although
// the solution barely changes: at the default tolerances each unit of x
// inside the horizon costs about 25 steps (in de Sitter a mode takes
// 1634 steps from x = 100 to 1e-4, 442 from x = 10; TestModesDeSitter).
// The modes therefore start as late as the adiabatic initial data allow,
// at DepthIn = 10 (see adiabatic.go).
//
// Spectra (M_p = 1): P_s = k³|v/z|²/(2π²) = k² e^{2s}/(4π² z²) and
// P_t = 2 polarisations × 4 k³|v/a|²/(2π²) = 2k² e^{2s_t}/(π² a²); in de
// Sitter, at horizon exit, P_t = 2H²/π² and P_s = H²/(8π² epsilon_H), so
// r = 16 epsilon_H (common practice; e.g. Liddle & Lyth 2000, "Cosmological
// Inflation and Large-Scale Structure").
//
// The modes of a stencil share one integration on one background
// (solveStencil): every right-hand-side evaluation looks the background up
// once for all of them. A mode joins at its start (the integration is
// restarted with the longer state) and is read off at its own time by an
// event on the dense output of the step that reaches it; modes read off
// earlier ride along to the end of the last one. Each joining mode needs
// the short steps inside the horizon again, so the five modes of a
// stencil take about 1140 joint steps against 5 × 440 apart: the saving
// is in the background, looked up (dense output and potential) once per
// evaluation instead of five times.

var (
	ln4pi2     = detmath.Log(4 * math.Pi * math.Pi)
	ln2overpi2 = detmath.Log(2 / (math.Pi * math.Pi))
)

// modeSystem supplies the background to the mode equations, against the
// clock N with a = e^N.
type modeSystem interface {
	// coeffs returns epsilon_H, delta_1, delta_1' and H² at N; false
	// outside the background.
	coeffs(N float64) (modeCoeffs, bool)
	// series returns the Taylor coefficients of the background at N for
	// the adiabatic start of a mode; false outside the background.
	series(N float64) (modeSeries, bool)
	// lnPi returns ln|dphi/dN| at N (z = a pi); any constant for a
	// background without a field (the scalar equation is then that of a
	// massless test field).
	lnPi(N float64) float64
}

// modeSpec is one mode of a joint integration.
type modeSpec struct {
	lnk    float64 // ln k in units where a = e^N
	N0, N1 float64 // clock of its adiabatic start and of its read-off
}

// modeOut is the spectra of one mode at its read-off.
type modeOut struct {
	lnPs, lnPt float64 // ln P_s and ln P_t
	s, st      float64 // the scalar and tensor mode variables s there
}

// modeTol holds the integrator settings of the modes.
type modeTol struct {
	rtol, atol float64
	maxSteps   int // per restart
}

// modeInitial returns the adiabatic (s, u) of the scalar and the tensor
// mode e^lnk at clock N0 (see adiabatic.go).
func modeInitial(bg modeSystem, lnk, N0 float64, y []float64) error {
	ser, ok := bg.series(N0)
	if !ok {
		return fmt.Errorf("mode start N = %g outside the background", N0)
	}
	x := detmath.Exp(lnk-N0) / math.Sqrt(ser.h2)
	zt := [4]float64{2 - ser.eps[0], -ser.eps[1], -ser.eps[2], -ser.eps[3]}
	y[0], y[1] = adiabaticState(x, ser.eps[:], ser.zs[:])
	y[2], y[3] = adiabaticState(x, ser.eps[:], zt[:])
	return nil
}

// solveStencil integrates the scalar and tensor modes ms together on the
// background bg and writes their spectra into out (len(out) = len(ms)).
// The modes must be in order of start (N0 non-decreasing) and each must
// start before it is read off. It returns the integrator's work summed
// over the restarts.
func solveStencil(bg modeSystem, ms []modeSpec, tol modeTol, out []modeOut) (ode.Stats, error) {
	var st ode.Stats
	n := len(ms)
	if n == 0 || len(out) != n {
		panic("solveStencil: want one output per mode")
	}
	tEnd := ms[0].N1
	for i, m := range ms {
		if !(m.N1 > m.N0) || i > 0 && m.N0 < ms[i-1].N0 {
			panic("solveStencil: modes out of order")
		}
		tEnd = math.Max(tEnd, m.N1)
	}
	lnk0 := ms[0].lnk
	// x_j² = x_0² e^{2(lnk_j - lnk_0)}: one exponential per evaluation.
	fac := make([]float64, n)
	for j, m := range ms {
		fac[j] = detmath.Exp(2 * (m.lnk - lnk0))
	}
	rhs := func(N float64, y, dy []float64) {
		f, ok := bg.coeffs(N)
		if !ok {
			for i := range dy {
				dy[i] = math.NaN()
			}
			return
		}
		x2 := detmath.Exp(2*(lnk0-N)) / f.h2 // (k_0/(aH))²
		q := 3 - f.eps
		b := 1 + f.d1
		qs := q + 2*f.d1
		for j := 0; j+3 < len(y); j += 4 {
			xj := x2 * fac[j>>2]
			A := y[j+1] - b
			dy[j] = y[j+1]
			dy[j+1] = f.d1N - float64(A*A) - float64(qs*A) + float64(xj*detmath.Expm1(float64(-4*y[j])))
			B := y[j+3] - 1
			dy[j+2] = y[j+3]
			dy[j+3] = float64(-B*B) - float64(q*B) + float64(xj*detmath.Expm1(float64(-4*y[j+2])))
		}
	}
	// Read-off events: G_j = N - N1_j rising through zero.
	events := make([]ode.Event, n)
	for j := range ms {
		N1 := ms[j].N1
		events[j] = ode.Event{G: func(N float64, _ []float64) float64 { return N - N1 }, Direction: 1}
	}
	read := make([]bool, n)
	set := &ode.Settings{RTol: tol.rtol, ATol: tol.atol, MaxSteps: tol.maxSteps}
	y := make([]float64, 0, 4*n)
	for a := 0; a < n; {
		// Modes a..b-1 start at ms[a].N0.
		b := a + 1
		for b < n && ms[b].N0 == ms[a].N0 {
			b++
		}
		for j := a; j < b; j++ {
			y = y[:4*(j+1)]
			if err := modeInitial(bg, ms[j].lnk, ms[j].N0, y[4*j:]); err != nil {
				return st, err
			}
		}
		t1 := tEnd
		if b < n {
			t1 = ms[b].N0
		}
		set.Events = events[:b]
		r, err := ode.Solve(rhs, ms[a].N0, t1, y, set)
		st.Steps += r.Stats.Steps
		st.Rejected += r.Stats.Rejected
		st.Evals += r.Stats.Evals
		st.EventEvals += r.Stats.EventEvals
		if err != nil {
			return st, err
		}
		for _, h := range r.Events {
			j := h.Event
			if read[j] {
				continue
			}
			read[j] = true
			out[j] = spectra(bg, ms[j].lnk, h.T, h.Y[4*j], h.Y[4*j+2])
		}
		copy(y, r.Y)
		a = b
	}
	for j := range ms {
		if !read[j] {
			return st, fmt.Errorf("mode %d (read-off at N = %g) was not read off by N = %g", j, ms[j].N1, tEnd)
		}
	}
	return st, nil
}

// spectra returns ln P_s and ln P_t of the mode e^lnk from its mode
// variables at clock N.
func spectra(bg modeSystem, lnk, N, s, st float64) modeOut {
	lnz := N + bg.lnPi(N)
	return modeOut{
		lnPs: 2*lnk + 2*s - 2*lnz - ln4pi2,
		lnPt: ln2overpi2 + 2*lnk + 2*st - 2*N,
		s:    s, st: st,
	}
}
