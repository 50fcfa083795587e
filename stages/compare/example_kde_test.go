package compare_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// A constraint given as samples: an invented half-normal r (an upper
// limit) and a normal n_s, written as a two-column text, read back and
// smoothed into a density.
func ExampleNewKDE() {
	rng := rand.New(rand.NewPCG(1, 2))
	var text strings.Builder
	text.WriteString("# n_s r (invented samples)\n")
	for i := 0; i < 2000; i++ {
		fmt.Fprintf(&text, "%.6f %.6f\n", 0.965+0.004*rng.NormFloat64(), math.Abs(0.015*rng.NormFloat64()))
	}
	pts, err := compare.ParseSamples("samples.txt", []byte(text.String()))
	if err != nil {
		fmt.Println(err)
		return
	}
	k, err := compare.NewKDE("invented", "synthetic samples", pts)
	if err != nil {
		fmt.Println(err)
		return
	}
	in68, in95 := k.Inside(0.965, 0.01)
	fmt.Printf("%d samples; (0.965, 0.01) inside 68%%: %v, 95%%: %v\n", k.N(), in68, in95)
	in68, in95 = k.Inside(0.965, 0.035)
	fmt.Printf("(0.965, 0.035) inside 68%%: %v, 95%%: %v\n", in68, in95)
	// Output:
	// 2000 samples; (0.965, 0.01) inside 68%: true, 95%: true
	// (0.965, 0.035) inside 68%: false, 95%: false
}

// A malformed row is reported with its line.
func ExampleParseSamples() {
	_, err := compare.ParseSamples("limits.txt", []byte("# n_s r\n0.965 0.01\n0.96 0.02 0.5\n"))
	fmt.Println(err)
	// Output: limits.txt:3: want 2 columns (n_s r), found 3
}
