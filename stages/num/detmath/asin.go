// Copyright 2009 The Go Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package detmath

import "math"

/*
	Floating-point arcsine and arccosine.

	They are implemented by computing the arctangent
	after appropriate range reduction.
*/

// Asin returns the arcsine, in radians, of x.
//
// Special cases are:
//
//	Asin(±0) = ±0
//	Asin(x) = NaN if x < -1 or x > 1
func Asin(x float64) float64 {
	return asin(x)
}

func asin(x float64) float64 {
	if x == 0 {
		return x // special case
	}
	sign := false
	if x < 0 {
		x = -x
		sign = true
	}
	if x > 1 {
		return math.NaN() // special case
	}

	// 1 - x*x cancels near |x| = 1 (Go's math loses up to 1e-9 of
	// Acos(x) there, 8e6 ulps); (1-x)(1+x) does not: 1-x is exact for
	// x >= 0.5 (Sterbenz), so the product carries two roundings. This one
	// change departs from Go's code; TestAsinNearOne checks it.
	var temp float64
	if x > 0.5 {
		temp = math.Sqrt(float64((1 - x) * (1 + x)))
	} else {
		temp = math.Sqrt(1 - float64(x*x))
	}
	if x > 0.7 {
		temp = math.Pi/2 - satan(temp/x)
	} else {
		temp = satan(x / temp)
	}

	if sign {
		temp = -temp
	}
	return temp
}

// Acos returns the arccosine, in radians, of x.
//
// Special case is:
//
//	Acos(x) = NaN if x < -1 or x > 1
func Acos(x float64) float64 {
	return acos(x)
}

func acos(x float64) float64 {
	// pi/2 - asin(x) (Go's code) loses the ulps of asin near pi/2 against a
	// result near 0: relative 2e-12 at x = 1 - 2^-27. Beyond |x| = 1/2 the
	// half-angle forms acos(x) = 2 asin(sqrt((1-x)/2)) and
	// acos(-x) = pi - acos(x) (common practice) take asin where it is
	// well conditioned, and (1-x)/2 is exact there.
	switch {
	case x > 0.5:
		return float64(2 * asin(math.Sqrt(float64((1-x)/2))))
	case x < -0.5:
		return math.Pi - float64(2*asin(math.Sqrt(float64((1+x)/2))))
	}
	return math.Pi/2 - Asin(x)
}
