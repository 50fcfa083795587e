package study

import (
	"errors"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/infer"
)

const inferHead = "[[constraint]]\nuse = \"cmb-combined-2025\"\n\n"

// TestInferencePriors: an [[inference]] reads each parameter's prior
// (fixed, uniform, log-uniform, or the family's default), the reheating
// prior and the constraint sets, and a study of inferences alone needs
// no [[model]] or [[reheating]].
func TestInferencePriors(t *testing.T) {
	text := inferHead + "[[inference]]\nfamily = \"e-model\"\nalpha = {log_uniform = [0.01, 100]}\nw_reh = {uniform = [-0.2, \"1/3\"]}\ntolerance = 0.005\nreference = true\n\n" +
		"[[inference]]\nlabel = \"phi^2\"\nfamily = \"power-law\"\np = 2\n"
	s, err := Parse("s.toml", []byte(text), ".")
	if err != nil {
		t.Fatal(err)
	}
	if s.NumModels() != 0 || len(s.Inferences) != 2 {
		t.Fatalf("%d models, %d inferences", s.NumModels(), len(s.Inferences))
	}
	a := s.Inferences[0]
	if a.Label != "e-model" || !a.Reference || a.Tol != 0.005 || len(a.Constraints) != 1 || a.Constraints[0].Name != "cmb-combined-2025" {
		t.Errorf("first inference: %+v", a)
	}
	alpha, n := a.Params[0], a.Params[1]
	if alpha.Name != "alpha" || alpha.Kind != infer.LogUniform || alpha.Lo != 0.01 || alpha.Hi != 100 {
		t.Errorf("alpha prior %+v", alpha)
	}
	if n.Name != "n" || n.Kind != infer.Fixed || n.Value != 1 {
		t.Errorf("n prior %+v (the family's default, fixed)", n)
	}
	if a.W.Kind != infer.Uniform || a.W.Lo != -0.2 || a.W.Hi != 1.0/3 {
		t.Errorf("w_reh prior %+v", a.W)
	}
	if b := s.Inferences[1]; b.Label != "phi^2" || b.W.Kind != infer.Fixed || b.W.Value != 0 {
		t.Errorf("second inference %+v (w_reh = 0 by default)", b)
	}
	g, err := s.InferenceGraph()
	if err != nil || len(g.Nodes) != 2 || len(g.Results) != 2 || g.Results[0].Label != "e-model | cmb-combined-2025" {
		t.Errorf("graph: %+v, %v", g, err)
	}
}

// TestInferenceErrors: a malformed [[inference]] is refused at its line,
// naming the key.
func TestInferenceErrors(t *testing.T) {
	for _, c := range []struct {
		name, body string
		line       int
		want       string
	}{
		{"no family", "[[inference]]\nalpha = 1\n", 4, "needs family"},
		{"unknown family", "[[inference]]\nfamily = \"q-model\"\n", 5, "q-model"},
		{"unknown key", "[[inference]]\nfamily = \"e-model\"\nbeta = 1\n", 6, "unknown key"},
		{"prior outside the family's range", "[[inference]]\nfamily = \"e-model\"\nalpha = {uniform = [-1, 2]}\n", 6, "alpha allows"},
		{"empty range", "[[inference]]\nfamily = \"e-model\"\nalpha = {uniform = [2, 1]}\n", 6, "empty"},
		{"log prior at zero", "[[inference]]\nfamily = \"e-model\"\nalpha = {log_uniform = [0, 1]}\n", 6, "positive lower end"},
		{"unknown prior", "[[inference]]\nfamily = \"e-model\"\nalpha = {gauss = [1, 2]}\n", 6, "unknown prior"},
		{"no default", "[[inference]]\nfamily = \"e-model\"\n", 4, "alpha has no default"},
		{"w outside", "[[inference]]\nfamily = \"e-model\"\nalpha = 1\nw_reh = {uniform = [-0.5, 1]}\n", 7, "w_reh"},
		{"unknown set", "[[inference]]\nfamily = \"e-model\"\nalpha = 1\nconstraint = \"planck-1990\"\n", 7, "no [[constraint]] named"},
		{"two references", "[[inference]]\nfamily = \"e-model\"\nalpha = 1\nreference = true\n\n[[inference]]\nfamily = \"t-model\"\nalpha = 1\nreference = true\n", 12, "second reference"},
		{"same label", "[[inference]]\nfamily = \"e-model\"\nalpha = 1\n\n[[inference]]\nfamily = \"e-model\"\nalpha = 2\n", 8, "label"},
		{"bad tolerance", "[[inference]]\nfamily = \"e-model\"\nalpha = 1\ntolerance = 2\n", 7, "tolerance"},
	} {
		_, err := Parse("s.toml", []byte(inferHead+c.body), ".")
		var ce *ConfigError
		if !errors.As(err, &ce) {
			t.Errorf("%s: %v, want a ConfigError", c.name, err)
			continue
		}
		if ce.Line != c.line || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v (line %d), want line %d and %q", c.name, err, ce.Line, c.line, c.want)
		}
	}
}

// TestInferenceIndependentSets: independent = true makes one inference
// against the product of the sets' likelihoods.
func TestInferenceIndependentSets(t *testing.T) {
	text := "[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[constraint]]\nuse = \"planck2018-bk18\"\n\n[[inference]]\nfamily = \"e-model\"\nalpha = 1\nindependent = true\n"
	s, err := Parse("s.toml", []byte(text), ".")
	if err != nil {
		t.Fatal(err)
	}
	labels, specs := s.InferenceSpecs()
	if len(specs) != 1 || len(specs[0].Also) != 1 || specs[0].Also[0].Name != "planck2018-bk18" || labels[0] != "e-model | cmb-combined-2025 × planck2018-bk18" {
		t.Errorf("independent sets: %v %+v", labels, specs)
	}
	if _, err := Parse("s.toml", []byte(inferHead+"[[inference]]\nfamily = \"e-model\"\nalpha = 1\nindependent = true\n"), "."); err == nil || !strings.Contains(err.Error(), "two or more") {
		t.Errorf("independent with one set: %v", err)
	}
}

// TestInferenceEfoldPriors: N_reh or N_star replace the T_reh prior, and
// N_star excludes the reheating keys.
func TestInferenceEfoldPriors(t *testing.T) {
	s, err := Parse("s.toml", []byte(inferHead+"[[inference]]\nfamily = \"e-model\"\nalpha = 1\nN_star = {uniform = [50, 60]}\n\n[[inference]]\nlabel = \"b\"\nfamily = \"e-model\"\nalpha = 1\nN_reh = {uniform = [0, 10]}\nw_reh = 0.5\n"), ".")
	if err != nil {
		t.Fatal(err)
	}
	a, b := s.Inferences[0], s.Inferences[1]
	if a.NStar == nil || a.NStar.Kind != infer.Uniform || a.NStar.Lo != 50 || b.NReh == nil || b.NReh.Hi != 10 || b.W.Value != 0.5 {
		t.Errorf("priors: %+v %+v", a.NStar, b.NReh)
	}
	if _, err := Parse("s.toml", []byte(inferHead+"[[inference]]\nfamily = \"e-model\"\nalpha = 1\nN_star = 55\nw_reh = 0.3\n"), "."); err == nil || !strings.Contains(err.Error(), "plays no part") {
		t.Errorf("N_star with w_reh: %v", err)
	}
}
