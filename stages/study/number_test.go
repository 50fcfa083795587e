package study

import (
	"math"
	"testing"
)

// TestParseNumberAgreesWithConfig: ParseNumber reads every written form
// of a [[model]] parameter to the bits the configuration's expansion
// gives it (a round trip through Parse), so that a table can trust a
// parameter's text by comparing bits.
func TestParseNumberAgreesWithConfig(t *testing.T) {
	text := `
[[reheating]]
history = "fixed-efolds"
N_star = 55

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = ["1/3", "7/3", " 2 / 3 ", 0.1, 2, "1e-3"]
`
	s, err := Parse("t.toml", []byte(text), ".")
	if err != nil {
		t.Fatal(err)
	}
	if s.NumModels() != 6 {
		t.Fatalf("%d models", s.NumModels())
	}
	for i := 0; i < s.NumModels(); i++ {
		m := s.ModelAt(i)
		x, err := ParseNumber(m.ParamText["alpha"])
		if err != nil || math.Float64bits(x) != math.Float64bits(m.Params["alpha"]) {
			t.Errorf("ParseNumber(%q) = %v, %v; the study has %v", m.ParamText["alpha"], x, err, m.Params["alpha"])
		}
	}
	if _, err := ParseNumber("one/3"); err == nil {
		t.Error("ParseNumber accepted one/3")
	}
}
