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

// refMp is the reduced Planck mass used throughout published-values.md,
// 2.435e18 GeV; the package's own value, 1.220890e19/sqrt(8 pi) =
// 2.43532e18 GeV, differs by 1.3e-4. GeV figures from the reference file
// are compared after converting with refMp.
const refMp = 2.435e18
