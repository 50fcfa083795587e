package slowroll

import "math"

// Adiabatic initial data of a mode.
//
// With s = ln(|v| sqrt(2k)) (see modes.go), ' = d/dN, x = k/(aH) and
// y = 1/x², the Ermakov–Pinney equation for |v| reads
//
//	s” + s'² + (1 - epsilon_H) s' = Z + expm1(-4s)/y,   y' = 2(1 - epsilon_H) y,
//
// with Z = z”/z/(aH)². Deep inside the horizon its Bunch–Davies solution
// is the adiabatic (WKB) vacuum: the non-oscillating solution, an
// asymptotic series s = a_1 y + a_2 y² + ... whose coefficients are
// polynomials in Z, epsilon_H and their derivatives. It is the adiabatic
// expansion |v|² = 1/(2W), W² = ω² - (1/2)[W”/W - (3/2)(W'/W)²]
// (conformal time, ω² = k² - z”/z) of Parker & Fulling 1974, PRD 9, 341,
// and Birrell & Davies 1982, "Quantum Fields in Curved Space", Sect. 3.5
// (the section from memory), written for s = -(1/2) ln(W/k): W² = ω² -
// (1/2)[...] turns into the equation above with W = k e^{-2s}
// (derived in modes.go's terms). The series itself is checked against
// closed forms, not against those texts (adiabatic_test.go).
//
// The coefficients follow order by order from the equation solved for
// the s of its linear term,
//
//	s = (y/4)[Z - s” - s'² - (1 - epsilon_H) s'] + [expm1(-4s) + 4s]/4,
//
// whose right-hand side at order y^(n+1) involves a_1..a_n only:
//
//	a_1     = Z/4,
//	a_(n+1) = (E_(n+1) - [D²s]_n - [(Ds)²]_n - (1 - epsilon_H)[Ds]_n)/4,
//
// where [.]_n is the coefficient of y^n, D(a_n y^n) = (a_n' + 2n(1 -
// epsilon_H) a_n) y^n, and E_n that of expm1(-4s) + 4s from the power-
// series exponential f = exp(g), g = -4s: f_n = (1/n) sum_j j g_j f_(n-j),
// E_n = f_n - g_n. The coefficients a_n are functions of N, carried as
// truncated Taylor polynomials in t = N - N0 about the starting time so
// that their derivatives are exact polynomial operations; a_n needs
// 2(n - 1) derivatives of the background. The Taylor coefficients of the
// background that are known exactly (epsilon_H to third order, Z_s to
// first, from V, V', V”, V”'; see seriesAt) are used and the higher ones
// set to zero: the first neglected one, Z_s” y²/16, is about 1e-11 at
// x = 20 for the built-in families at N* = 55 (Z_s” is of order N^-3).
//
// The series is asymptotic: its terms shrink until order n ≈ x (from
// the Hankel expansion of power-law inflation, DLMF 10.18.17) and grow
// after, so it is summed up to its smallest term among the first
// adiabaticOrder (optimal truncation; the error is then about half that
// term). From x ≈ 8 on the eighth term is the smallest: at the default
// start x = 10 the sum is accurate to 2e-11 for epsilon_H up to 0.1
// (TestAdiabaticPowerLawHankel), and the neglected Z_s” y²/16 is about
// 1.6e-10 for the built-in families at N* = 55 (Z_s” ≈ 2.5e-5 there).

// adiabaticOrder is the largest order in y = (aH/k)² of the series; the
// Taylor polynomials have degree 2·adiabaticOrder - 1.
const adiabaticOrder = 8

const adiabaticDeg = 2*adiabaticOrder - 1

// taylor is a truncated Taylor polynomial: p[k] is the coefficient of t^k.
type taylor [adiabaticDeg + 1]float64

// mulAdd adds c·a·b, up to degree deg, to p.
func (p *taylor) mulAdd(deg int, c float64, a, b *taylor) {
	for k := 0; k <= deg; k++ {
		s := 0.0
		for j := 0; j <= k; j++ {
			s += float64(a[j] * b[k-j])
		}
		p[k] += float64(c * s)
	}
}

// yDeriv returns the coefficient of y^n in D(a y^n) = (a' + 2n(1 -
// epsilon_H) a) y^n, up to degree deg, with om = 1 - epsilon_H.
func yDeriv(deg int, a *taylor, n int, om *taylor) taylor {
	var d taylor
	for k := 0; k <= deg; k++ {
		d[k] = float64(k+1) * a[k+1]
	}
	d.mulAdd(deg, 2*float64(n), om, a)
	return d
}

// adiabaticTerms returns the terms a_n y^n of the adiabatic series of s
// and of s', n = 1..adiabaticOrder, at the time where k/(aH) = x, for the
// Taylor coefficients eps (of epsilon_H) and z (of Z) in N there; missing
// coefficients are zero.
func adiabaticTerms(x float64, eps, z []float64) (ts, tu [adiabaticOrder]float64) {
	var om taylor // 1 - epsilon_H
	copy(om[:], eps)
	for k := range om {
		om[k] = -om[k]
	}
	om[0]++
	// a[n], da[n] = [Ds]_n, g[n] = -4 a[n], f[n] of exp(g), for n >= 1.
	var a, da, g, f [adiabaticOrder + 1]taylor
	f[0][0] = 1
	copy(a[1][:], z)
	for k := range a[1] {
		a[1][k] *= 0.25
	}
	y := 1 / (x * x)
	yn := y
	for n := 1; ; n++ {
		// a_n is needed to degree 2(adiabaticOrder - n) + 1: each order
		// takes two derivatives, and s' needs the first.
		deg := 2*(adiabaticOrder-n) + 1
		da[n] = yDeriv(deg-1, &a[n], n, &om)
		ts[n-1], tu[n-1] = a[n][0]*yn, da[n][0]*yn
		if n == adiabaticOrder {
			return ts, tu
		}
		// f_n from g_1..g_n.
		for k := 0; k <= deg; k++ {
			g[n][k] = -4 * a[n][k]
		}
		for j := 1; j <= n; j++ {
			f[n].mulAdd(deg, float64(j)/float64(n), &g[j], &f[n-j])
		}
		// a_(n+1) = (E_(n+1) - [L s]_n)/4, E_(n+1) = f_(n+1) - g_(n+1)
		// = (1/(n+1)) sum_{j<=n} j g_j f_(n+1-j).
		nd := deg - 2
		next := &a[n+1]
		for j := 1; j <= n; j++ {
			next.mulAdd(nd, float64(j)/float64(n+1), &g[j], &f[n+1-j])
		}
		d2 := yDeriv(nd, &da[n], n, &om)
		for k := 0; k <= nd; k++ {
			next[k] -= d2[k]
		}
		for j := 1; j < n; j++ {
			next.mulAdd(nd, -1, &da[j], &da[n-j])
		}
		next.mulAdd(nd, -1, &om, &da[n])
		for k := 0; k <= nd; k++ {
			next[k] *= 0.25
		}
		yn *= y
	}
}

// adiabaticState returns s and s' of the adiabatic mode at the time where
// k/(aH) = x (see adiabaticTerms), summed up to the smallest term.
func adiabaticState(x float64, eps, z []float64) (s, u float64) {
	ts, tu := adiabaticTerms(x, eps, z)
	n := adiabaticCut(ts[:])
	for i := n - 1; i >= 0; i-- { // smallest first
		s += ts[i]
		u += tu[i]
	}
	return s, u
}

// adiabaticCut returns how many terms of an asymptotic series to sum:
// up to its smallest term in magnitude (optimal truncation).
func adiabaticCut(ts []float64) int {
	best := 0
	for i := range ts {
		if math.Abs(ts[i]) <= math.Abs(ts[best]) {
			best = i
		}
	}
	return best + 1
}
