package ode

// The Dormand–Prince RK5(4)7M tableau (Dormand & Prince 1980, J. Comp.
// Appl. Math. 6, 19; Hairer, Nørsett & Wanner I, Sect. II.5). Stage 7 is
// evaluated at the new point with the fifth-order weights, so it is the
// first stage of the next step (first same as last).
const (
	c2 = 1.0 / 5
	c3 = 3.0 / 10
	c4 = 4.0 / 5
	c5 = 8.0 / 9

	a21 = 1.0 / 5

	a31 = 3.0 / 40
	a32 = 9.0 / 40

	a41 = 44.0 / 45
	a42 = -56.0 / 15
	a43 = 32.0 / 9

	a51 = 19372.0 / 6561
	a52 = -25360.0 / 2187
	a53 = 64448.0 / 6561
	a54 = -212.0 / 729

	a61 = 9017.0 / 3168
	a62 = -355.0 / 33
	a63 = 46732.0 / 5247
	a64 = 49.0 / 176
	a65 = -5103.0 / 18656

	// Fifth-order weights (also row 7 of the tableau); b2 = b7 = 0.
	b1 = 35.0 / 384
	b3 = 500.0 / 1113
	b4 = 125.0 / 192
	b5 = -2187.0 / 6784
	b6 = 11.0 / 84

	// Error weights e = b - b̂, with b̂ the embedded fourth-order weights
	// 5179/57600, 0, 7571/16695, 393/640, -92097/339200, 187/2100, 1/40.
	e1 = 71.0 / 57600
	e3 = -71.0 / 16695
	e4 = 71.0 / 1920
	e5 = -17253.0 / 339200
	e6 = 22.0 / 525
	e7 = -1.0 / 40

	// Dense output of order 4 (Hairer, Nørsett & Wanner I, Sect. II.6):
	// with r1 = y1 - y0, r2 = h f0 - r1, r3 = r1 - h f1 - r2 and
	// r4 = h sum d_i k_i, y(t0 + θh) = y0 + θ(r1 + (1-θ)(r2 + θ(r3 + (1-θ) r4))).
	d1 = -12715105075.0 / 11282082432
	d3 = 87487479700.0 / 32700410799
	d4 = -10690763975.0 / 1880347072
	d5 = 701980252875.0 / 199316789632
	d6 = -1453857185.0 / 822651844
	d7 = 69997945.0 / 29380423
)

// order is the order of the embedded (error-estimating) solution plus one,
// the exponent in the error's dependence on the step, h^order.
const order = 5
