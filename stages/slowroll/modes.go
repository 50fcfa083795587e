package slowroll

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/ode"
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
//	s = ln(rho sqrt(2k)/z),   the log of |v/z| relative to its
//	                           sub-horizon value 1/(z sqrt(2k)),
//	u = ds/dN,
//
// so that s ≈ 0 deep inside the horizon and s - ln z tends to a constant
// outside it: nothing overflows, and the fast phase e^{-ik tau} is never
// integrated. With x = k/(aH), ' = d/dN and ln z' = 1 + delta_1
// (delta_1 = d ln pi/dN for scalars, 0 for tensors), substituting
// rho = z e^s/sqrt(2k) into the Ermakov–Pinney equation rewritten with
// d/dtau = aH d/dN and (aH)' = (1 - epsilon_H) aH gives
//
//	s' = u,
//	u' = delta_1' - A² - (3 - epsilon_H + 2 delta_1) A + x² expm1(-4s),
//	A  = u - 1 - delta_1,
//
// where expm1 keeps the near-cancellation of the two O(x²) terms inside
// the horizon exact. The linearisation inside the horizon oscillates with
// frequency 2x per e-fold, and the error of an explicit Runge–Kutta step
// on the smooth solution grows with h x, so the step there scales like
// 1/x although the solution barely changes: at the default tolerances
// about 70% of a mode's ~1600 steps are spent between x = 100 and 10,
// which is what limits DepthIn (the cost grows linearly with it).
//
// Spectra (M_p = 1): P_s = k³|v/z|²/(2π²) = k² e^{2s}/(4π² z²) and
// P_t = 2 polarisations × 4 k³|v/a|²/(2π²) = 2k² e^{2s_t}/(π² a²); in de
// Sitter, at horizon exit, P_t = 2H²/π² and P_s = H²/(8π² epsilon_H), so
// r = 16 epsilon_H (common practice; e.g. Liddle & Lyth 2000, "Cosmological
// Inflation and Large-Scale Structure").
//
// Initial conditions, at x = DepthIn. The adiabatic (WKB) amplitude
// rho² = 1/(2W) with W² = ω² - (1/2)[W”/W - (3/2)(W'/W)²] (conformal-time
// derivatives, ω² = k² - z”/z) solves the Ermakov–Pinney equation
// exactly; its second-order iterate with z”/z = Z (aH)² and Z, epsilon_H
// held constant (exact for power-law inflation, where Z (aH)² =
// (ν² - 1/4)/tau²) is
//
//	W²/k² = 1 - Z/x² + (3/2) Z (1 - epsilon_H)²/x⁴,
//	Z     = (1 + delta_1)(2 - epsilon_H + delta_1) + delta_1',
//
// so s = -(1/4) ln(W²/k²) and u = -(1/4) d ln(W²/k²)/dN with
// d(1/x²)/dN = 2(1 - epsilon_H)/x². The neglected terms are O(x⁻⁶) and
// O(epsilon_i epsilon_j x⁻⁴) in s; they excite an oscillation of that
// relative amplitude, i.e. about 1e-12 at x = 100.

var (
	ln4pi2     = math.Log(4 * math.Pi * math.Pi)
	ln2overpi2 = math.Log(2 / (math.Pi * math.Pi))
)

// modeSystem supplies the background to the mode equations, against the
// clock N with a = e^N.
type modeSystem interface {
	// coeffs returns epsilon_H, delta_1, delta_1' and H² at N; false
	// outside the background.
	coeffs(N float64) (modeCoeffs, bool)
	// lnPi returns ln|dphi/dN| at N (z = a pi); any constant for a
	// background without a field (the scalar equation is then that of a
	// massless test field).
	lnPi(N float64) float64
}

// modeOut is the result of one mode integration.
type modeOut struct {
	lnPs, lnPt float64 // ln P_s and ln P_t at the final time
	res        ode.Result
}

// modeZ is z”/z/(aH)² for scalars and tensors.
func modeZ(f modeCoeffs) (zs, zt float64) {
	zs = (1+f.d1)*(2-f.eps+f.d1) + f.d1N
	zt = 2 - f.eps
	return zs, zt
}

// modeInitial returns (s, u) at x for the given Z and epsilon_H.
func modeInitial(x, Z, eps float64) (s, u float64) {
	y := 1 / (x * x)
	c := 1.5 * Z * (1 - eps) * (1 - eps)
	q := -Z*y + c*y*y
	qN := -2*(1-eps)*Z*y + 4*(1-eps)*c*y*y
	return -0.25 * math.Log1p(q), -0.25 * qN / (1 + q)
}

// solveModes integrates the scalar and tensor modes of comoving wavenumber
// e^lnk (in units where a = e^N) together, from clock N0 to N1.
func solveModes(bg modeSystem, lnk, N0, N1, rtol, atol float64, maxSteps int, dense bool) (modeOut, error) {
	f0, ok := bg.coeffs(N0)
	if !ok {
		return modeOut{}, fmt.Errorf("mode start N = %g outside the background", N0)
	}
	x0 := math.Exp(lnk-N0) / math.Sqrt(f0.h2)
	zs, zt := modeZ(f0)
	ss, us := modeInitial(x0, zs, f0.eps)
	st, ut := modeInitial(x0, zt, f0.eps)
	rhs := func(N float64, y, dy []float64) {
		f, ok := bg.coeffs(N)
		if !ok {
			dy[0], dy[1], dy[2], dy[3] = math.NaN(), math.NaN(), math.NaN(), math.NaN()
			return
		}
		x2 := math.Exp(2*(lnk-N)) / f.h2 // (k/(aH))²
		q := 3 - f.eps
		A := y[1] - 1 - f.d1
		dy[0] = y[1]
		dy[1] = f.d1N - A*A - (q+2*f.d1)*A + x2*math.Expm1(-4*y[0])
		B := y[3] - 1
		dy[2] = y[3]
		dy[3] = -B*B - q*B + x2*math.Expm1(-4*y[2])
	}
	s := &ode.Settings{RTol: rtol, ATol: atol, MaxSteps: maxSteps, Dense: dense}
	r, err := ode.Solve(rhs, N0, N1, []float64{ss, us, st, ut}, s)
	if err != nil {
		return modeOut{res: r}, err
	}
	lnz := N1 + bg.lnPi(N1)
	return modeOut{
		lnPs: 2*lnk + 2*r.Y[0] - 2*lnz - ln4pi2,
		lnPt: ln2overpi2 + 2*lnk + 2*r.Y[2] - 2*N1,
		res:  r,
	}, nil
}
