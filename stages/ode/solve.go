package ode

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Status says how an integration ended.
type Status int

const (
	// Completed: the integration reached t1.
	Completed Status = iota
	// Stopped: a terminal event stopped the integration before t1.
	Stopped
)

// String names the status.
func (s Status) String() string {
	switch s {
	case Completed:
		return "completed"
	case Stopped:
		return "stopped by event"
	}
	return "unknown"
}

// EventHit is one located event.
type EventHit struct {
	Event int       // index into Settings.Events
	T     float64   // time of the sign change
	Y     []float64 // solution there (from the dense output)
}

// Stats counts the work done.
type Stats struct {
	Steps      int // accepted steps
	Rejected   int // rejected step attempts
	Evals      int // evaluations of f
	EventEvals int // evaluations of event functions
}

// Result is the outcome of Solve.
type Result struct {
	T      float64   // time reached: t1, the terminal event's time, or the last accepted time on error
	Y      []float64 // solution at T
	Status Status
	Events []EventHit // located events in time order
	Stats  Stats
	// Dense is the continuous extension over [t0, T], when Settings.Dense
	// was set.
	Dense *Dense
}

// workspace holds the stage vectors of one integration.
type workspace struct {
	k       [7][]float64
	y, ytmp []float64
	ynew    []float64
	r       [4][]float64 // r1..r4 of the current step's interpolant
	yev     []float64
	atol    []float64
	gPrev   []float64
	gNew    []float64
	pending []EventHit
}

func newWorkspace(n, nev int) *workspace {
	// One backing array for all vectors.
	buf := make([]float64, 17*n+2*nev)
	w := &workspace{}
	next := func(m int) []float64 {
		s := buf[:m:m]
		buf = buf[m:]
		return s
	}
	for i := range w.k {
		w.k[i] = next(n)
	}
	w.y, w.ytmp, w.ynew = next(n), next(n), next(n)
	for i := range w.r {
		w.r[i] = next(n)
	}
	w.yev = next(n)
	w.atol = next(n)
	w.gPrev, w.gNew = next(nev), next(nev)
	return w
}

// Solve integrates y' = f(t, y) from (t0, y0) to t1 (t1 < t0 integrates
// backward) and returns the solution at t1, or at the first terminal
// event. On a *MaxStepsError, *StepSizeError or *NotFiniteError the Result
// holds the solution at the last accepted time (and the dense output up to
// it). y0 is not modified.
func Solve(f Func, t0, t1 float64, y0 []float64, s *Settings) (Result, error) {
	n := len(y0)
	res := Result{T: t0, Y: append([]float64(nil), y0...)}
	if n == 0 {
		return res, &SettingsError{Field: "y0", Msg: "empty state vector"}
	}
	if math.IsNaN(t0) || math.IsNaN(t1) || math.IsInf(t0, 0) || math.IsInf(t1, 0) {
		return res, &SettingsError{Field: "t0, t1", Msg: "interval ends must be finite"}
	}
	for i, v := range y0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return res, &SettingsError{Field: "y0", Msg: "component " + itoa(i) + " is not finite"}
		}
	}
	cfg, err := s.config(n, math.Abs(t1-t0))
	if err != nil {
		return res, err
	}
	if t0 == t1 {
		if cfg.dense {
			res.Dense = &Dense{dim: n, t: []float64{t0, t0}, coef: make([]float64, 5*n)}
			copy(res.Dense.coef, y0)
		}
		return res, nil
	}
	w := newWorkspace(n, len(cfg.events))
	for i := range w.atol {
		if cfg.atolVec != nil {
			w.atol[i] = cfg.atolVec[i]
		} else {
			w.atol[i] = cfg.atol
		}
	}
	copy(w.y, y0)
	var dense *Dense
	if cfg.dense {
		dense = &Dense{dim: n, t: make([]float64, 1, 64), coef: make([]float64, 0, 64*5*n)}
		dense.t[0] = t0
	}
	err = integrate(f, t0, t1, w, &cfg, &res, dense)
	res.Dense = dense
	return res, err
}

// norm is the scaled RMS norm of v relative to the states a and b.
func (w *workspace) norm(v, a, b []float64, rtol float64) float64 {
	s := 0.0
	for i, x := range v {
		sc := w.atol[i] + float64(rtol*math.Max(math.Abs(a[i]), math.Abs(b[i])))
		q := x / sc
		s += float64(q * q)
	}
	return math.Sqrt(s / float64(len(v)))
}

// initialStep is the starting-step algorithm of Hairer, Nørsett & Wanner
// I, Sect. II.4: h0 from |y0| and |f0|, one explicit Euler step to
// estimate the second derivative, and h = min(100 h0, (0.01/max(d1, d2))^(1/5)).
func initialStep(f Func, t0 float64, w *workspace, cfg *config, dir float64, st *Stats) float64 {
	y, f0, y1, f1 := w.y, w.k[0], w.ytmp, w.ynew
	d0 := w.norm(y, y, y, cfg.rtol)
	d1 := w.norm(f0, y, y, cfg.rtol)
	h0 := 1e-6
	if d0 >= 1e-5 && d1 >= 1e-5 {
		h0 = 0.01 * d0 / d1
	}
	h0 = math.Min(h0, cfg.hmax)
	for i := range y {
		y1[i] = y[i] + float64(float64(dir*h0)*f0[i])
	}
	f(t0+float64(dir*h0), y1, f1)
	st.Evals++
	for i := range f1 {
		y1[i] = f1[i] - f0[i]
	}
	d2 := w.norm(y1, y, y, cfg.rtol) / h0
	var h1 float64
	if m := math.Max(d1, d2); m <= 1e-15 || math.IsNaN(m) {
		h1 = math.Max(1e-6, h0*1e-3)
	} else {
		h1 = detmath.Pow(0.01/m, 1.0/order)
	}
	return math.Min(math.Min(100*h0, h1), cfg.hmax)
}

func integrate(f Func, t0, t1 float64, w *workspace, cfg *config, res *Result, dense *Dense) error {
	dir := 1.0
	if t1 < t0 {
		dir = -1
	}
	st := &res.Stats
	k := &w.k
	t := t0
	f(t, w.y, k[0])
	st.Evals++
	for i, e := range cfg.events {
		w.gPrev[i] = e.G(t, w.y)
		st.EventEvals++
	}
	h := cfg.h0
	if h == 0 {
		h = initialStep(f, t, w, cfg, dir, st)
	}
	h = math.Min(h, cfg.hmax)
	lnErrOld := detmath.Log(1e-4)
	rejected := false
	needInterp := dense != nil || len(cfg.events) > 0
	for attempts := 0; ; attempts++ {
		if attempts >= cfg.maxSteps {
			res.T = t
			copy(res.Y, w.y)
			return &MaxStepsError{T: t, Steps: attempts, H: dir * h}
		}
		last := false
		if float64(dir*(t+float64(dir*h)-t1)) >= 0 {
			h = math.Abs(t1 - t)
			last = true
		}
		if h < 16*ulp(t) {
			res.T = t
			copy(res.Y, w.y)
			return &StepSizeError{T: t, H: dir * h}
		}
		hs := float64(dir * h)
		stages(f, t, hs, w)
		st.Evals += 6
		// Error estimate and acceptance.
		e := w.ytmp
		for i := range e {
			e[i] = float64(hs * (float64(e1*k[0][i]) + float64(e3*k[2][i]) + float64(e4*k[3][i]) + float64(e5*k[4][i]) + float64(e6*k[5][i]) + float64(e7*k[6][i])))
		}
		errN := w.norm(e, w.y, w.ynew, cfg.rtol)
		if math.IsNaN(errN) || math.IsInf(errN, 0) {
			// Non-finite stage values: shrink hard and retry.
			st.Rejected++
			rejected = true
			h *= cfg.fmin
			if h < 16*ulp(t) {
				res.T = t
				copy(res.Y, w.y)
				return &NotFiniteError{T: t, H: dir * h}
			}
			continue
		}
		if errN > 1 {
			st.Rejected++
			rejected = true
			fac := math.Max(cfg.fmin, cfg.safety*detmath.Pow(errN, -1.0/order))
			h *= fac
			continue
		}
		// Accepted.
		st.Steps++
		tNew := t + hs
		if last {
			tNew = t1
		}
		if needInterp {
			for i := range w.y {
				r1 := w.ynew[i] - w.y[i]
				r2 := float64(hs*k[0][i]) - r1
				w.r[0][i] = r1
				w.r[1][i] = r2
				w.r[2][i] = r1 - float64(hs*k[6][i]) - r2
				w.r[3][i] = float64(hs * (float64(d1*k[0][i]) + float64(d3*k[2][i]) + float64(d4*k[3][i]) + float64(d5*k[4][i]) + float64(d6*k[5][i]) + float64(d7*k[6][i])))
			}
		}
		if dense != nil {
			dense.t = append(dense.t, tNew)
			dense.coef = append(dense.coef, w.y...)
			for j := range w.r {
				dense.coef = append(dense.coef, w.r[j]...)
			}
		}
		if len(cfg.events) > 0 {
			if hit, stop := w.events(t, tNew, cfg, st, res); stop {
				res.Status = Stopped
				res.T = hit.T
				copy(res.Y, hit.Y)
				if dense != nil {
					dense.t[len(dense.t)-1] = hit.T
					// The stored interpolant keeps its θ scale: re-express it
					// on the shortened step.
					shortenLast(dense, t, tNew, hit.T)
				}
				return nil
			}
		}
		// Next step size (PI controller).
		lnErr := detmath.Log(math.Max(errN, 1e-300))
		fac := float64(cfg.safety * detmath.Exp(float64(-cfg.alpha*lnErr)+float64(cfg.beta*lnErrOld)))
		fac = math.Min(cfg.fmax, math.Max(cfg.fmin, fac))
		if rejected {
			fac = math.Min(fac, 1)
		}
		lnErrOld = math.Max(lnErr, detmath.Log(1e-4))
		rejected = false
		t = tNew
		copy(w.y, w.ynew)
		k[0], k[6] = k[6], k[0] // first same as last
		if last {
			res.T = t
			copy(res.Y, w.y)
			return nil
		}
		h = math.Min(h*fac, cfg.hmax)
	}
}

// stages computes k2..k7 and the fifth-order solution w.ynew for the step
// (t, t+h), given k1 = f(t, y) in k[0].
func stages(f Func, t, h float64, w *workspace) {
	k, y, yt := &w.k, w.y, w.ytmp
	for i := range y {
		yt[i] = y[i] + float64(float64(h*a21)*k[0][i])
	}
	f(t+float64(c2*h), yt, k[1])
	for i := range y {
		yt[i] = y[i] + float64(h*(float64(a31*k[0][i])+float64(a32*k[1][i])))
	}
	f(t+float64(c3*h), yt, k[2])
	for i := range y {
		yt[i] = y[i] + float64(h*(float64(a41*k[0][i])+float64(a42*k[1][i])+float64(a43*k[2][i])))
	}
	f(t+float64(c4*h), yt, k[3])
	for i := range y {
		yt[i] = y[i] + float64(h*(float64(a51*k[0][i])+float64(a52*k[1][i])+float64(a53*k[2][i])+float64(a54*k[3][i])))
	}
	f(t+float64(c5*h), yt, k[4])
	for i := range y {
		yt[i] = y[i] + float64(h*(float64(a61*k[0][i])+float64(a62*k[1][i])+float64(a63*k[2][i])+float64(a64*k[3][i])+float64(a65*k[4][i])))
	}
	f(t+h, yt, k[5])
	yn := w.ynew
	for i := range y {
		yn[i] = y[i] + float64(h*(float64(b1*k[0][i])+float64(b3*k[2][i])+float64(b4*k[3][i])+float64(b5*k[4][i])+float64(b6*k[5][i])))
	}
	f(t+h, yn, k[6])
}

// shortenLast rewrites the last stored step, which spanned (ta, tb), to
// span (ta, tc) with the same polynomial, so that Dense.At keeps
// evaluating the integrated interpolant. The polynomial in θ = (t-ta)/h is
// resampled exactly: it is of degree 4, so its values at five points of
// the new step determine it; the coefficients are rebuilt in the
// y0, r1..r4 form from the values and end derivatives.
func shortenLast(d *Dense, ta, tb, tc float64) {
	m := d.dim
	i := len(d.t) - 2
	c := d.coef[5*m*i : 5*m*(i+1)]
	s := (tc - ta) / (tb - ta) // new step as a fraction of the old
	r1, r2, r3, r4 := c[m:2*m], c[2*m:3*m], c[3*m:4*m], c[4*m:5*m]
	for j := 0; j < m; j++ {
		// Power-basis coefficients p(θ) = y0 + p1 θ + p2 θ² + p3 θ³ + p4 θ⁴ of
		// y0 + θ(r1 + (1-θ)(r2 + θ(r3 + (1-θ) r4))).
		p1 := r1[j] + r2[j]
		p2 := -r2[j] + r3[j] + r4[j]
		p3 := -r3[j] - 2*r4[j]
		p4 := r4[j]
		// Rescale θ = s φ.
		q1, q2, q3, q4 := float64(p1*s), float64(float64(p2*s)*s), float64(float64(float64(p3*s)*s)*s), float64(float64(float64(float64(p4*s)*s)*s)*s)
		// Back to the r-form: q(φ) = y0 + φ(R1 + (1-φ)(R2 + φ(R3 + (1-φ)R4))).
		R4 := q4
		R3 := -q3 - float64(2*R4)
		R2 := -q2 + R3 + R4
		R1 := q1 - R2
		r1[j], r2[j], r3[j], r4[j] = R1, R2, R3, R4
	}
}

// events checks the sign of every event function at the end of the
// accepted step (ta, tb), locates the crossings on the step's interpolant,
// records the non-terminal ones up to the first terminal one in time
// order, and reports whether a terminal one stops the integration.
func (w *workspace) events(ta, tb float64, cfg *config, st *Stats, res *Result) (EventHit, bool) {
	w.pending = w.pending[:0]
	for i, e := range cfg.events {
		g := e.G(tb, w.ynew)
		st.EventEvals++
		w.gNew[i] = g
		gp := w.gPrev[i]
		rise := gp < 0 && g >= 0
		fall := gp > 0 && g <= 0
		if !(rise && e.Direction >= 0 || fall && e.Direction <= 0) {
			continue
		}
		te := tb
		if g != 0 {
			te = w.locate(e.G, ta, tb, gp, g, cfg.eventTol, st)
		}
		w.pending = append(w.pending, EventHit{Event: i, T: te})
	}
	copy(w.gPrev, w.gNew)
	if len(w.pending) == 0 {
		return EventHit{}, false
	}
	// Time order (insertion sort: few events).
	dir := 1.0
	if tb < ta {
		dir = -1
	}
	p := w.pending
	for i := 1; i < len(p); i++ {
		for j := i; j > 0 && dir*(p[j].T-p[j-1].T) < 0; j-- {
			p[j], p[j-1] = p[j-1], p[j]
		}
	}
	for _, hit := range p {
		hit.Y = make([]float64, len(w.y))
		w.interp(ta, tb, hit.T, hit.Y)
		res.Events = append(res.Events, hit)
		if cfg.events[hit.Event].Terminal {
			return hit, true
		}
	}
	return EventHit{}, false
}

// interp evaluates the current step's interpolant at t.
func (w *workspace) interp(ta, tb, t float64, y []float64) {
	theta := (t - ta) / (tb - ta)
	interpolate(theta, w.y, w.r[0], w.r[1], w.r[2], w.r[3], y)
}

// locate finds the sign change of g between ta and tb on the interpolant
// by Brent's method.
func (w *workspace) locate(g func(float64, []float64) float64, ta, tb, ga, gb, tol float64, st *Stats) float64 {
	fn := func(t float64) float64 {
		w.interp(ta, tb, t, w.yev)
		st.EventEvals++
		return g(t, w.yev)
	}
	r, err := num.BrentF(fn, ta, tb, ga, gb, &num.RootSettings{XTol: tol})
	if err != nil {
		// The bracket is valid by construction; a failure means g is NaN
		// inside the step. Report the end of the step.
		return tb
	}
	return r.X
}

// ulp is the spacing of float64 values at x.
func ulp(x float64) float64 {
	x = math.Abs(x)
	return math.Nextafter(x, math.Inf(1)) - x
}

func itoa(i int) string {
	if i == 0 {
		return "0"
	}
	var b [20]byte
	p := len(b)
	for i > 0 {
		p--
		b[p] = byte('0' + i%10)
		i /= 10
	}
	return string(b[p:])
}
