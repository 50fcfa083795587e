package ode

import (
	"math/big"
	"testing"
)

// The Dormand–Prince RK5(4)7M coefficients as the rationals printed by
// Dormand & Prince 1980 (J. Comp. Appl. Math. 6, 19) and reprinted in
// Hairer, Nørsett & Wanner I, Sect. II.5; the dense-output weights d_i as
// given with DOPRI5 in Hairer, Nørsett & Wanner I, Sect. II.6.
var (
	ratC = []string{"0", "1/5", "3/10", "4/5", "8/9", "1", "1"}
	ratA = [][]string{
		{},
		{"1/5"},
		{"3/40", "9/40"},
		{"44/45", "-56/15", "32/9"},
		{"19372/6561", "-25360/2187", "64448/6561", "-212/729"},
		{"9017/3168", "-355/33", "46732/5247", "49/176", "-5103/18656"},
		{"35/384", "0", "500/1113", "125/192", "-2187/6784", "11/84"},
	}
	ratB    = []string{"35/384", "0", "500/1113", "125/192", "-2187/6784", "11/84", "0"}
	ratBhat = []string{"5179/57600", "0", "7571/16695", "393/640", "-92097/339200", "187/2100", "1/40"}
	ratD    = []string{"-12715105075/11282082432", "0", "87487479700/32700410799", "-10690763975/1880347072",
		"701980252875/199316789632", "-1453857185/822651844", "69997945/29380423"}
)

func rat(s string) *big.Rat {
	r, ok := new(big.Rat).SetString(s)
	if !ok {
		panic("bad rational " + s)
	}
	return r
}

func rats(ss []string) []*big.Rat {
	out := make([]*big.Rat, len(ss))
	for i, s := range ss {
		out[i] = rat(s)
	}
	return out
}

// tableau returns c, A (7x7, lower triangular) as rationals.
func tableau() ([]*big.Rat, [][]*big.Rat) {
	c := rats(ratC)
	A := make([][]*big.Rat, 7)
	for i := range A {
		A[i] = make([]*big.Rat, 7)
		for j := range A[i] {
			A[i][j] = new(big.Rat)
		}
		for j, s := range ratA[i] {
			A[i][j] = rat(s)
		}
	}
	return c, A
}

// elementary weights of the rooted trees of order <= 5: for each tree,
// the vector Φ_i whose weighted sum sum_i b_i Φ_i must equal 1/γ(tree)
// (Butcher's order conditions; Hairer, Nørsett & Wanner I, Sect. II.2).
type tree struct {
	name  string
	order int
	phi   []*big.Rat
	gamma int64
}

func trees(c []*big.Rat, A [][]*big.Rat) []tree {
	n := len(c)
	vec := func(f func(i int) *big.Rat) []*big.Rat {
		v := make([]*big.Rat, n)
		for i := range v {
			v[i] = f(i)
		}
		return v
	}
	mul := func(a, b []*big.Rat) []*big.Rat {
		return vec(func(i int) *big.Rat { return new(big.Rat).Mul(a[i], b[i]) })
	}
	Av := func(v []*big.Rat) []*big.Rat {
		return vec(func(i int) *big.Rat {
			s := new(big.Rat)
			for j := range v {
				s.Add(s, new(big.Rat).Mul(A[i][j], v[j]))
			}
			return s
		})
	}
	one := vec(func(int) *big.Rat { return big.NewRat(1, 1) })
	c2 := mul(c, c)
	c3 := mul(c2, c)
	c4 := mul(c3, c)
	Ac := Av(c)
	Ac2 := Av(c2)
	AAc := Av(Ac)
	return []tree{
		{"1", 1, one, 1},
		{"c", 2, c, 2},
		{"c^2", 3, c2, 3},
		{"Ac", 3, Ac, 6},
		{"c^3", 4, c3, 4},
		{"c.Ac", 4, mul(c, Ac), 8},
		{"Ac^2", 4, Ac2, 12},
		{"AAc", 4, AAc, 24},
		{"c^4", 5, c4, 5},
		{"c^2.Ac", 5, mul(c2, Ac), 10},
		{"c.Ac^2", 5, mul(c, Ac2), 15},
		{"c.AAc", 5, mul(c, AAc), 30},
		{"(Ac)^2", 5, mul(Ac, Ac), 20},
		{"Ac^3", 5, Av(c3), 20},
		{"A(c.Ac)", 5, Av(mul(c, Ac)), 40},
		{"AAc^2", 5, Av(Ac2), 60},
		{"AAAc", 5, Av(AAc), 120},
	}
}

func dot(b, phi []*big.Rat) *big.Rat {
	s := new(big.Rat)
	for i := range b {
		s.Add(s, new(big.Rat).Mul(b[i], phi[i]))
	}
	return s
}

// TestTableauOrderConditions: the rows of A sum to c, the fifth-order
// weights satisfy all 17 conditions up to order 5, the embedded weights
// all 8 up to order 4 and not all of order 5 (so the difference is a true
// error estimate), exactly in rational arithmetic (Dormand & Prince 1980
// state orders 5 and 4 for this pair).
func TestTableauOrderConditions(t *testing.T) {
	c, A := tableau()
	for i := range c {
		s := new(big.Rat)
		for j := range A[i] {
			s.Add(s, A[i][j])
		}
		if s.Cmp(c[i]) != 0 {
			t.Errorf("row %d of A sums to %s, c_%d = %s", i+1, s, i+1, c[i])
		}
	}
	b, bh := rats(ratB), rats(ratBhat)
	// Row 7 of A is b (first same as last).
	for j := 0; j < 6; j++ {
		if A[6][j].Cmp(b[j]) != 0 {
			t.Errorf("a_7%d = %s differs from b_%d = %s", j+1, A[6][j], j+1, b[j])
		}
	}
	fifthFails := 0
	for _, tr := range trees(c, A) {
		want := big.NewRat(1, tr.gamma)
		if got := dot(b, tr.phi); got.Cmp(want) != 0 {
			t.Errorf("order-%d condition %s: sum b Φ = %s, want %s", tr.order, tr.name, got, want)
		}
		got := dot(bh, tr.phi)
		if tr.order <= 4 && got.Cmp(want) != 0 {
			t.Errorf("embedded order-%d condition %s: %s, want %s", tr.order, tr.name, got, want)
		}
		if tr.order == 5 && got.Cmp(want) != 0 {
			fifthFails++
		}
	}
	if fifthFails == 0 {
		t.Error("the embedded weights satisfy every fifth-order condition: no error estimate")
	}
}

// TestDenseOutputOrderConditions: the continuous weights b_i(θ) of the
// dense output satisfy the order conditions up to order 4 for every θ,
// sum b_i(θ) Φ_i = θ^ρ/γ (Hairer, Nørsett & Wanner I, Sect. II.6, where
// the DOPRI5 extension is stated to be of order 4), checked exactly at
// several θ, and reduce to b at θ = 1.
func TestDenseOutputOrderConditions(t *testing.T) {
	c, A := tableau()
	b, d := rats(ratB), rats(ratD)
	for _, th := range []string{"1/7", "1/3", "1/2", "5/8", "9/10", "1"} {
		theta := rat(th)
		one := big.NewRat(1, 1)
		u := new(big.Rat).Sub(one, theta)
		// b_i(θ) = θ b_i + θ(1-θ)(δ_i1 - b_i) + θ²(1-θ)(2b_i - δ_i1 - δ_i7) + θ²(1-θ)² d_i.
		bt := make([]*big.Rat, 7)
		for i := range bt {
			d1i, d7i := new(big.Rat), new(big.Rat)
			if i == 0 {
				d1i.SetInt64(1)
			}
			if i == 6 {
				d7i.SetInt64(1)
			}
			th2 := new(big.Rat).Mul(theta, theta)
			term1 := new(big.Rat).Mul(theta, b[i])
			term2 := new(big.Rat).Mul(new(big.Rat).Mul(theta, u), new(big.Rat).Sub(d1i, b[i]))
			r3 := new(big.Rat).Sub(new(big.Rat).Mul(big.NewRat(2, 1), b[i]), new(big.Rat).Add(d1i, d7i))
			term3 := new(big.Rat).Mul(new(big.Rat).Mul(th2, u), r3)
			term4 := new(big.Rat).Mul(new(big.Rat).Mul(th2, new(big.Rat).Mul(u, u)), d[i])
			bt[i] = new(big.Rat).Add(new(big.Rat).Add(term1, term2), new(big.Rat).Add(term3, term4))
		}
		for _, tr := range trees(c, A) {
			if tr.order > 4 {
				continue
			}
			want := big.NewRat(1, tr.gamma)
			for k := 0; k < tr.order; k++ {
				want.Mul(want, theta)
			}
			if got := dot(bt, tr.phi); got.Cmp(want) != 0 {
				t.Errorf("θ=%s: order-%d condition %s: %s, want %s", th, tr.order, tr.name, got, want)
			}
		}
		if th == "1" {
			for i := range bt {
				if bt[i].Cmp(b[i]) != 0 {
					t.Errorf("b_%d(1) = %s, want b_%d = %s", i+1, bt[i], i+1, b[i])
				}
			}
		}
	}
}

// TestFloatCoefficients: every float64 constant of the solver is the
// rational above rounded to nearest.
func TestFloatCoefficients(t *testing.T) {
	check := func(name string, got float64, s string) {
		want, _ := rat(s).Float64()
		if got != want {
			t.Errorf("%s = %.17g, want %s = %.17g", name, got, s, want)
		}
	}
	cs := []float64{0, 0, c2, c3, c4, c5}
	for i := 2; i <= 5; i++ {
		check("c"+itoa(i), cs[i], ratC[i-1])
	}
	as := [][]float64{{}, {a21}, {a31, a32}, {a41, a42, a43}, {a51, a52, a53, a54}, {a61, a62, a63, a64, a65}}
	for i, row := range as {
		for j, v := range row {
			check("a"+itoa(i+1)+itoa(j+1), v, ratA[i][j])
		}
	}
	bs := map[int]float64{0: b1, 2: b3, 3: b4, 4: b5, 5: b6}
	for i, v := range bs {
		check("b"+itoa(i+1), v, ratB[i])
	}
	// e = b - bhat.
	es := map[int]float64{0: e1, 2: e3, 3: e4, 4: e5, 5: e6, 6: e7}
	for i, v := range es {
		check("e"+itoa(i+1), v, new(big.Rat).Sub(rat(ratB[i]), rat(ratBhat[i])).RatString())
	}
	if bh2 := rat(ratBhat[1]); bh2.Sign() != 0 {
		t.Error("bhat_2 should be 0")
	}
	ds := map[int]float64{0: d1, 2: d3, 3: d4, 4: d5, 5: d6, 6: d7}
	for i, v := range ds {
		check("d"+itoa(i+1), v, ratD[i])
	}
}
