package tables

import "github.com/inflatrace/inflatrace/stages/study"

func f64(x float64) *float64 { return &x }
func boolp(b bool) *bool     { return &b }

// fixture: a prediction with every field, one with missing optional
// fields and text full of special characters, and a failed one.
func fixture() []study.Result {
	return []study.Result{
		{
			Label: "att(alpha=1, n=2) | N*=55 | planck", Model: "alpha-attractor",
			Params: map[string]float64{"alpha": 1, "n": 2}, Method: "first", Reheating: "fixed-efolds",
			NStar: 55, PhiStar: 5.123456, PhiEnd: 0.9, Ns: 0.96363636, R: 0.0039669421,
			AlphaS: -6.6115702e-4, Nt: -4.9586777e-4,
			EnergyScaleGeV: f64(1.623456e16), HStarGeV: f64(2.481234e13),
			Constraint: "planck", DeltaChi2: f64(0.1234), NSigma: f64(0.0789),
			Inside68: boolp(true), Inside95: boolp(true), Key: "h1:abc",
		},
		{
			Label: `odd_model & co | w=1/3 $x$ 50% | set#1`, Model: `odd_model & "co", {x}|y`,
			Params: map[string]float64{"lambda": 1e-14}, Reheating: "temperature",
			NStar: 51.5, Ns: 0.97, R: 0.1,
			TRehGeV: f64(1e9), WReh: f64(1.0 / 3), BelowBBN: boolp(false),
			Constraint: "set#1", Inside68: boolp(false),
		},
		{
			Label: "bad(mu=2) | N*=60 | planck", Model: "bad", Params: map[string]float64{"mu": 2},
			Constraint: "planck", Error: "inflation never ends for phi > 12.3",
		},
	}
}
