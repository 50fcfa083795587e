package app

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestNumberFormats: the table's numbers are printed with strconv instead
// of fmt; the text must be exactly fmt's %.Nf and %.Ng (the tables shipped
// in papers must not change with the speed-up). Both packages document
// these verbs as the same conversion (Go standard library, fmt and
// strconv.FormatFloat); this checks it over edge values and random ones.
func TestNumberFormats(t *testing.T) {
	xs := []float64{0, math.Copysign(0, -1), 1, -1, 0.5, 0.125, 2.5, 9.9999, 0.96512, 1e-10, 3.2e-3, 1.6e16,
		1e9, 123456.5, 0.000123449, math.Inf(1), math.Inf(-1), math.NaN(), math.MaxFloat64, math.SmallestNonzeroFloat64}
	r := rand.New(rand.NewPCG(1, 2))
	for range 20000 {
		xs = append(xs, (r.Float64()-0.5)*math.Pow(10, float64(r.IntN(40)-20)))
	}
	for _, x := range xs {
		for _, prec := range []int{2, 3, 4, 5, 6} {
			if got, want := fixed(x, prec), fmt.Sprintf("%.*f", prec, x); got != want {
				t.Fatalf("fixed(%v, %d) = %q, fmt gives %q", x, prec, got, want)
			}
			if got, want := general(x, prec), fmt.Sprintf("%.*g", prec, x); got != want {
				t.Fatalf("general(%v, %d) = %q, fmt gives %q", x, prec, got, want)
			}
		}
	}
}
