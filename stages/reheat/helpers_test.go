package reheat

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

func within(got, want, rel, abs float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

func mustSolve(t testing.TB, family string, p map[string]float64) *slowroll.Solution {
	t.Helper()
	f, err := model.Lookup(family)
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	sol, err := slowroll.Solve(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

// refMp is the reduced Planck mass rounded to 4 digits, 2.435e18 GeV
// (common practice; the Particle Data Group prints 2.435323e18 GeV, from
// memory), with which the hand-computed GeV figures of these tests were
// worked; the package's own value, 1.220890e19/sqrt(8 pi) = 2.43532e18
// GeV, differs by 1.3e-4. Those GeV figures are compared after converting
// with refMp.
const refMp = 2.435e18
