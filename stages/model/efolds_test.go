package model

import (
	"math"
	"math/big"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// TestExpm1MinusX against the series e^x - 1 - x = sum over k >= 2 of
// x^k/k! summed in 256-bit arithmetic (math/big), to 4 units in the last
// place, across the switch between the series and expm1(x) - x at
// |x| = 1/2 and far from it.
func TestExpm1MinusX(t *testing.T) {
	ref := func(x float64) float64 {
		bx := new(big.Float).SetPrec(256).SetFloat64(x)
		term := new(big.Float).SetPrec(256).Mul(bx, bx)
		term.Quo(term, big.NewFloat(2))
		sum := new(big.Float).SetPrec(256).Set(term)
		for k := 3; k < 400; k++ {
			term.Mul(term, bx)
			term.Quo(term, new(big.Float).SetInt64(int64(k)))
			sum.Add(sum, term)
		}
		f, _ := sum.Float64()
		return f
	}
	for _, x := range []float64{1e-300, 1e-9, -1e-6, 1e-3, 0.1, -0.3, 0.4999999, 0.5, -0.5, 0.7, 2, -3, 10, 30} {
		got, want := expm1MinusX(x), ref(x)
		if math.Abs(got-want) > 4*math.Abs(want)*0x1p-52 {
			t.Errorf("expm1MinusX(%g) = %.17g, want %.17g", x, got, want)
		}
	}
}

// closedForms are the families with a closed-form e-fold count and end,
// over their parameters (alpha over eight decades; the default range of
// each).
func closedForms(t *testing.T) []*Model {
	var ms []*Model
	add := func(family string, p map[string]float64) {
		f, _ := Lookup(family)
		m, err := f.New(p)
		if err != nil {
			t.Fatalf("%s %v: %v", family, p, err)
		}
		ms = append(ms, m)
	}
	for _, alpha := range []float64{1e-4, 1e-2, 1, 1e2, 1e4} {
		for _, n := range []float64{0.5, 1, 3} {
			add("e-model", map[string]float64{"alpha": alpha, "n": n})
			add("t-model", map[string]float64{"alpha": alpha, "n": n})
		}
	}
	add("starobinsky", nil)
	for _, p := range []float64{2.0 / 3, 1, 2, 4, 10} {
		add("power-law", map[string]float64{"p": p})
	}
	for _, q := range []float64{0.1, 1, 10} {
		add("exponential-plateau", map[string]float64{"q": q})
	}
	return ms
}

// TestClosedFormEfolds: each family's closed-form count Efolds(a, b)
// equals the adaptive quadrature of V/V' (jets of the potential, num.Jet)
// from a to b, the count's definition, to 1e-11 relative (the quadrature
// to 1e-13; the closed forms to rounding), over intervals from the end of
// inflation to field values holding up to hundreds of e-folds, and is
// antisymmetric; the interval's ends are the closed-form end and points
// spread to half the range.
func TestClosedFormEfolds(t *testing.T) {
	for _, m := range closedForms(t) {
		if m.Efolds == nil || m.EpsilonEnd == nil {
			t.Fatalf("%s: no closed forms", m.Describe())
		}
		slope := func(phi float64) float64 { j := m.At(phi); return j.V / j.D1 }
		end := m.EpsilonEnd()
		for i := 1; i <= 6; i++ {
			for _, a := range []float64{end, end + (m.Hi-end)*0.01} {
				b := end + (m.Hi-end)*0.5*float64(i)/6
				q, err := num.Integrate(slope, a, b, &num.QuadSettings{RelTol: 1e-13, AbsTol: 1e-15, MaxIntervals: 4000})
				if err != nil {
					t.Errorf("%s: quadrature from %g to %g: %v", m.Describe(), a, b, err)
					continue
				}
				got := m.Efolds(a, b)
				if math.Abs(got-q.Value) > 1e-11*math.Abs(q.Value) {
					t.Errorf("%s: Efolds(%g, %g) = %.15g, quadrature %.15g", m.Describe(), a, b, got, q.Value)
				}
				if back := m.Efolds(b, a); back != -got {
					t.Errorf("%s: Efolds(%g, %g) = %g, not -Efolds(%g, %g) = %g", m.Describe(), b, a, back, a, b, -got)
				}
			}
		}
	}
}

// TestClosedFormEnd: epsilon_V = (V'/V)^2/2 from the potential's jet is 1
// at each family's closed-form end, to 1e-13 relative (rounding of a few
// operations), below 1 behind it (where the field comes from: above it
// for these families, which roll towards smaller phi) and above 1 ahead.
func TestClosedFormEnd(t *testing.T) {
	eps := func(m *Model, phi float64) float64 { j := m.At(phi); u := j.D1 / j.V; return u * u / 2 }
	for _, m := range closedForms(t) {
		end := m.EpsilonEnd()
		if !(end > m.Lo && end < m.Hi) {
			t.Errorf("%s: end %g outside (%g, %g)", m.Describe(), end, m.Lo, m.Hi)
			continue
		}
		if e := eps(m, end); math.Abs(e-1) > 1e-13 {
			t.Errorf("%s: epsilon_V(%g) = %.17g", m.Describe(), end, e)
		}
		if behind, ahead := eps(m, end*(1+1e-6)), eps(m, end*(1-1e-6)); !(behind < 1 && ahead > 1) {
			t.Errorf("%s: epsilon_V is %g behind the end and %g ahead", m.Describe(), behind, ahead)
		}
	}
}
