package expr

import (
	"math"
	"reflect"
	"testing"
)

// Precedence, associativity and literal forms: each source's value and
// canonical text (arithmetic: common practice).
func TestPrecedence(t *testing.T) {
	rows := []struct {
		src   string
		want  float64
		canon string
	}{
		{"2^3^2", 512, "2^3^2"},
		{"(2^3)^2", 64, "(2^3)^2"},
		{"-2^2", -4, "-2^2"},
		{"(-2)^2", 4, "(-2)^2"},
		{"2*-3", -6, "2 * -3"},
		{"-2*3", -6, "-2 * 3"},
		{"-(2*3)", -6, "-(2 * 3)"},
		{"1/2/2", 0.25, "1 / 2 / 2"},
		{"1/(2/2)", 1, "1 / (2 / 2)"},
		{"2-3-4", -5, "2 - 3 - 4"},
		{"2-(3-4)", 3, "2 - (3 - 4)"},
		{"1+(2+3)", 6, "1 + (2 + 3)"},
		{"2+3*4", 14, "2 + 3 * 4"},
		{"(2+3)*4", 20, "(2 + 3) * 4"},
		{"2*3^2", 18, "2 * 3^2"},
		{"2^3*2", 16, "2^3 * 2"},
		{"8/2^2", 2, "8 / 2^2"},
		{"2^-1", 0.5, "2^-1"},
		{"-2^-2", -0.25, "-2^-2"},
		{"2^-2^2", 0.0625, "2^-2^2"},
		{"--3", 3, "--3"},
		{"1 - -1", 2, "1 - -1"},
		{"1.5e-3*2E+4", 30, "0.0015 * 20000"},
		{".5 + 2.", 2.5, "0.5 + 2"},
		{"1e3 + 2.5E-1", 1000.25, "1000 + 0.25"},
		{"pow(2, 10)", 1024, "pow(2, 10)"},
		{"pow(2, 3)^2", 64, "pow(2, 3)^2"},
		{"  ( ( 1 ) )\n", 1, "1"},
		{"2*pi", 2 * math.Pi, "2 * pi"},
		{"sqrt(16)+exp(0)", 5, "sqrt(16) + exp(0)"},
		{"(-8)^(1/3)", math.NaN(), "(-8)^(1 / 3)"},
	}
	for _, r := range rows {
		e := mustCompile(t, r.src, nil)
		if got := e.Value(0); !within(got, r.want, 0) {
			t.Errorf("%q = %g, want %g", r.src, got, r.want)
		}
		if got := e.String(); got != r.canon {
			t.Errorf("%q prints as %q, want %q", r.src, got, r.canon)
		}
		if e.DependsOnField() {
			t.Errorf("%q: DependsOnField() = true for a constant", r.src)
		}
		if j := e.At(1); j.D1 != 0 || j.D2 != 0 || j.D3 != 0 {
			t.Errorf("%q: constant has derivatives %v", r.src, j)
		}
	}
}

// Unary minus and ^ with the field.
func TestPrecedenceWithField(t *testing.T) {
	rows := []struct {
		src   string
		x     float64
		want  float64
		canon string
	}{
		{"-x^2", 3, -9, "-x^2"},
		{"(-x)^2", 3, 9, "(-x)^2"},
		{"x^-2", 2, 0.25, "x^-2"},
		{"2*x^2+1", 3, 19, "2 * x^2 + 1"},
		{"x^3^2", 2, 512, "x^3^2"},
		{"x/2/x", 5, 0.5, "x / 2 / x"},
		{"-x*x", 3, -9, "-x * x"},
	}
	for _, r := range rows {
		e := mustCompile(t, r.src, nil)
		if got := e.Value(r.x); got != r.want {
			t.Errorf("%q at %g = %g, want %g", r.src, r.x, got, r.want)
		}
		if got := e.String(); got != r.canon {
			t.Errorf("%q prints as %q, want %q", r.src, got, r.canon)
		}
	}
}

func TestParamsAndCanonicalText(t *testing.T) {
	params := map[string]float64{"alpha": 2, "V0": 3e-10, "unused": 1}
	e, err := Compile("V0*(1-exp(-sqrt(2/(3*alpha))*phi))^2", "phi", params)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := e.Params(), []string{"V0", "alpha"}; !reflect.DeepEqual(got, want) {
		t.Errorf("Params() = %v, want %v", got, want)
	}
	if got, want := e.String(), "V0 * (1 - exp(-sqrt(2 / (3 * alpha)) * phi))^2"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	if e.Field() != "phi" || !e.DependsOnField() {
		t.Errorf("Field() = %q, DependsOnField() = %v", e.Field(), e.DependsOnField())
	}
	// Params returns a copy.
	e.Params()[0] = "changed"
	if e.Params()[0] != "V0" {
		t.Error("Params() exposes the Expr's own slice")
	}
	// Layout does not change the canonical text.
	f, err := Compile(" V0 * ( 1 - exp( - sqrt( 2/(3*alpha) ) * phi ) ) ^ 2 ", "phi", params)
	if err != nil {
		t.Fatal(err)
	}
	if f.String() != e.String() {
		t.Errorf("layout changed the canonical text: %q vs %q", f.String(), e.String())
	}
}

// Field and parameter names may be any identifiers, including non-ASCII
// letters, and "e" is an ordinary name.
func TestNames(t *testing.T) {
	e, err := Compile("φ_1^2 * e + λ", "φ_1", map[string]float64{"e": 2, "λ": 1})
	if err != nil {
		t.Fatal(err)
	}
	if got := e.Value(3); got != 19 {
		t.Errorf("value = %g, want 19", got)
	}
}

func TestConstantKinetic(t *testing.T) {
	if _, err := Compile("1", "x", nil); err == nil {
		t.Fatal("Compile accepted a constant without AllowConstant")
	}
	e, err := CompileWith("1", "x", nil, &Options{AllowConstant: true})
	if err != nil {
		t.Fatal(err)
	}
	if j := e.At(0.3); j.V != 1 || j.D1 != 0 || j.D2 != 0 || j.D3 != 0 || e.DependsOnField() {
		t.Errorf("constant 1: At = %v, DependsOnField = %v", j, e.DependsOnField())
	}
	// x - x refers to the field, so it is accepted without the option.
	if _, err := Compile("x - x", "x", nil); err != nil {
		t.Errorf("x - x: %v", err)
	}
}
