package ode

// Dense is the continuous extension of a solution: one polynomial of
// degree 4 per accepted step (Hairer, Nørsett & Wanner I, Sect. II.6),
// continuous with a continuous first derivative across steps. Its error
// is of the order of the local error of the steps, i.e. of the tolerance.
// A Dense is read-only once Solve returns and safe for concurrent use.
type Dense struct {
	dim int
	// t holds the step boundaries t[0], ..., t[n] in the direction of
	// integration; step i spans t[i] to t[i+1].
	t []float64
	// coef holds, per step, y0 and r1..r4 (5*dim values).
	coef []float64
}

// Dim is the dimension of the system.
func (d *Dense) Dim() int { return d.dim }

// Steps is the number of stored steps.
func (d *Dense) Steps() int { return len(d.t) - 1 }

// Span returns the first and last time covered (t0 > t1 for a backward
// integration).
func (d *Dense) Span() (t0, t1 float64) { return d.t[0], d.t[len(d.t)-1] }

// Boundaries returns the step boundaries (the accepted times, starting
// with t0). The slice must not be modified.
func (d *Dense) Boundaries() []float64 { return d.t }

// At writes the interpolated solution at t into y (len(y) = Dim()). A t
// outside the integrated interval is a *RangeError and leaves y alone.
func (d *Dense) At(t float64, y []float64) error {
	n := len(d.t) - 1
	lo, hi := d.t[0], d.t[n]
	fwd := hi >= lo
	if fwd && !(t >= lo && t <= hi) || !fwd && !(t <= lo && t >= hi) {
		return &RangeError{T: t, T0: lo, T1: hi}
	}
	// Binary search for the step i with t between t[i] and t[i+1].
	i, j := 0, n-1
	for i < j {
		k := int(uint(i+j) >> 1)
		if fwd && d.t[k+1] < t || !fwd && d.t[k+1] > t {
			i = k + 1
		} else {
			j = k
		}
	}
	d.eval(i, t, y)
	return nil
}

func (d *Dense) eval(i int, t float64, y []float64) {
	h := d.t[i+1] - d.t[i]
	theta := 0.0
	if h != 0 {
		theta = (t - d.t[i]) / h
	}
	m := d.dim
	c := d.coef[5*m*i : 5*m*(i+1)]
	interpolate(theta, c[:m], c[m:2*m], c[2*m:3*m], c[3*m:4*m], c[4*m:5*m], y)
}

// interpolate evaluates y0 + θ(r1 + (1-θ)(r2 + θ(r3 + (1-θ) r4))).
func interpolate(theta float64, y0, r1, r2, r3, r4, y []float64) {
	u := 1 - theta
	for j := range y {
		y[j] = y0[j] + float64(theta*(r1[j]+float64(u*(r2[j]+float64(theta*(r3[j]+float64(u*r4[j])))))))
	}
}
