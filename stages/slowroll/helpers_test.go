package slowroll

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
)

func within(got, want, rel, abs float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

func mustModel(t testing.TB, family string, p map[string]float64) *model.Model {
	t.Helper()
	f, err := model.Lookup(family)
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func mustSolve(t testing.TB, family string, p map[string]float64) *Solution {
	t.Helper()
	sol, err := Solve(mustModel(t, family, p), nil)
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

func mustEvaluate(t testing.TB, sol *Solution, N float64) (Point, Observables) {
	t.Helper()
	p, o, err := sol.Evaluate(N)
	if err != nil {
		t.Fatalf("%s at N=%g: %v", sol.Model.Describe(), N, err)
	}
	return p, o
}
