package model

import (
	"errors"
	"math"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// The built-in families and their declared parameters, as documented in
// families.go and the catalogue files (alpha-attractors: Kallosh, Linde &
// Roest 2013, arXiv:1311.0472; others as cited there). Every family has a
// formula, a reference with a year, a kind and at least one tag.
func TestRegistry(t *testing.T) {
	params := map[string]string{
		"t-model": "alpha,n", "e-model": "alpha,n", "starobinsky": "",
		"power-law": "p", "natural": "f", "hilltop": "mu,p",
		"hilltop-quadratic": "mu", "hilltop-quartic": "mu", "coleman-weinberg": "v",
		"brane": "mu,p", "exponential-plateau": "q", "loop": "alpha", "radion-assisted-gauge": "alpha",
		"higgs": "xi", "two-plateau": "alpha,gamma",
	}
	var want []string
	for n := range params {
		want = append(want, n)
	}
	sort.Strings(want)
	got := Names()
	if strings.Join(got, ",") != strings.Join(want, ",") {
		t.Errorf("Names() = %v, want %v", got, want)
	}
	if len(got) < 14 {
		t.Errorf("%d families, the catalogue promises at least 14", len(got))
	}
	if !sort.StringsAreSorted(got) {
		t.Errorf("Names() not sorted: %v", got)
	}
	kinds := map[string]bool{KindLargeField: true, KindSmallField: true, KindPlateau: true}
	year := regexp.MustCompile(`(19|20)[0-9][0-9]`)
	for name, ps := range params {
		f, err := Lookup(name)
		if err != nil {
			t.Fatal(err)
		}
		if got := strings.Join(f.ParamNames(), ","); got != ps {
			t.Errorf("%s: parameters %q, want %q", name, got, ps)
		}
		if f.Reference == "" || f.Formula == "" || !year.MatchString(f.Reference) {
			t.Errorf("%s: missing formula or dated reference (%q)", name, f.Reference)
		}
		if !kinds[f.Kind] || len(f.Tags) == 0 {
			t.Errorf("%s: kind %q, tags %v", name, f.Kind, f.Tags)
		}
		for _, p := range f.Params {
			if p.Unit == "" || p.Doc == "" {
				t.Errorf("%s: parameter %s has no unit or doc", name, p.Name)
			}
		}
		if (f.AsymptoticW != nil) != (name == "two-plateau") {
			t.Errorf("%s: AsymptoticW set = %v", name, f.AsymptoticW != nil)
		}
	}
}

func TestLookupUnknownListsKnown(t *testing.T) {
	_, err := Lookup("quintic")
	if err == nil {
		t.Fatal("Lookup(quintic) succeeded")
	}
	for _, n := range append([]string{`"quintic"`}, Names()...) {
		if !strings.Contains(err.Error(), n) {
			t.Errorf("error %q does not name %s", err, n)
		}
	}
}

// A renamed family's old name is refused with an error naming the new one,
// and every new name is a registered family that the old name does not
// shadow (an old name must not be registered again).
func TestLookupRenamedNamesNew(t *testing.T) {
	if len(renamed) == 0 {
		t.Fatal("no renamed families: radion-gauge was renamed")
	}
	for from, to := range renamed {
		if _, ok := registry[from]; ok {
			t.Errorf("old name %q is still registered", from)
		}
		if _, err := Lookup(to); err != nil {
			t.Errorf("new name %q: %v", to, err)
		}
		_, err := Lookup(from)
		if err == nil {
			t.Errorf("Lookup(%q) succeeded", from)
			continue
		}
		if want := `family "` + from + `" was renamed "` + to + `"`; err.Error() != want {
			t.Errorf("Lookup(%q) = %q, want %q", from, err, want)
		}
	}
	if _, err := Lookup("radion-gauge"); err == nil || !strings.Contains(err.Error(), `"radion-assisted-gauge"`) {
		t.Errorf("Lookup(radion-gauge) = %v, want the new name radion-assisted-gauge", err)
	}
}

func TestParameterValidation(t *testing.T) {
	cases := []struct {
		family string
		given  map[string]float64
		param  string   // the parameter the error must name
		words  []string // further text the message must contain
	}{
		{"t-model", map[string]float64{"alpha": 1, "beta": 2}, "beta", []string{"unknown", "allowed: alpha, n"}},
		{"starobinsky", map[string]float64{"alpha": 1}, "alpha", []string{"unknown", "allowed: none"}},
		{"e-model", map[string]float64{"n": 1}, "alpha", []string{"missing", "alpha, n"}},
		{"power-law", nil, "p", []string{"missing"}},
		{"t-model", map[string]float64{"alpha": 0}, "alpha", []string{"outside (0, +Inf)"}},
		{"t-model", map[string]float64{"alpha": -1}, "alpha", []string{"outside"}},
		{"e-model", map[string]float64{"alpha": math.NaN()}, "alpha", []string{"not finite"}},
		{"e-model", map[string]float64{"alpha": math.Inf(1)}, "alpha", []string{"not finite"}},
		{"t-model", map[string]float64{"alpha": 1, "n": 0}, "n", []string{"outside"}},
		{"natural", map[string]float64{"f": -2}, "f", []string{"outside"}},
		{"hilltop", map[string]float64{"mu": 1, "p": 1.5}, "p", []string{"outside [2, +Inf)"}},
		{"hilltop", map[string]float64{"mu": 0, "p": 4}, "mu", []string{"outside"}},
		// The catalogue's range checks: each refuses what makes the
		// potential ill-defined (a non-positive scale or power, a drop
		// beyond float64, a coupling beyond what the canonical map resolves).
		{"hilltop-quadratic", map[string]float64{"mu": -1}, "mu", []string{"outside (0, +Inf)"}},
		{"hilltop-quartic", nil, "mu", []string{"missing"}},
		{"hilltop-quartic", map[string]float64{"mu": 1, "p": 4}, "p", []string{"unknown", "allowed: mu"}},
		{"coleman-weinberg", map[string]float64{"v": 0}, "v", []string{"outside"}},
		{"brane", map[string]float64{"mu": 1, "p": 0}, "p", []string{"outside (0, +Inf)"}},
		{"brane", map[string]float64{"mu": math.Inf(1)}, "mu", []string{"not finite"}},
		{"exponential-plateau", map[string]float64{"q": -0.5}, "q", []string{"outside"}},
		{"loop", map[string]float64{"alpha": 0}, "alpha", []string{"outside"}},
		{"radion-assisted-gauge", map[string]float64{"alpha": -1}, "alpha", []string{"outside"}},
		{"higgs", map[string]float64{"xi": 0}, "xi", []string{"outside (0, 1e+10]"}},
		{"higgs", map[string]float64{"xi": 1e11}, "xi", []string{"outside"}},
		{"higgs", map[string]float64{"xi": 1e4, "lambda": 0.1}, "lambda", []string{"unknown", "allowed: xi"}},
		{"two-plateau", map[string]float64{"alpha": 1}, "gamma", []string{"missing"}},
		{"two-plateau", map[string]float64{"alpha": 1, "gamma": 400}, "gamma", []string{"outside (0, 350]"}},
		{"two-plateau", map[string]float64{"alpha": -1, "gamma": 100}, "alpha", []string{"outside"}},
	}
	for _, c := range cases {
		f, err := Lookup(c.family)
		if err != nil {
			t.Fatal(err)
		}
		m, err := f.New(c.given)
		if err == nil {
			t.Errorf("%s %v: accepted as %s", c.family, c.given, m.Describe())
			continue
		}
		var pe *ParamError
		if !errors.As(err, &pe) || pe.Param != c.param || pe.Family != c.family {
			t.Errorf("%s %v: error %v, want a ParamError for %s", c.family, c.given, err, c.param)
			continue
		}
		for _, w := range c.words {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s %v: error %q does not contain %q", c.family, c.given, err, w)
			}
		}
	}
}

// Defaults: n = 1 for the alpha-attractors (the "simplest" models of
// Kallosh, Linde & Roest 2013) and p = 2 for the hilltop (quadratic;
// Boubekeur & Lyth 2005); the hilltop's closed bound p = 2 is allowed.
func TestDefaults(t *testing.T) {
	for _, c := range []struct {
		family string
		given  map[string]float64
		want   string
	}{
		{"t-model", map[string]float64{"alpha": 1}, "t-model(alpha=1, n=1)"},
		{"e-model", map[string]float64{"alpha": 0.5}, "e-model(alpha=0.5, n=1)"},
		{"hilltop", map[string]float64{"mu": 10}, "hilltop(mu=10, p=2)"},
		{"hilltop", map[string]float64{"mu": 10, "p": 2}, "hilltop(mu=10, p=2)"},
		{"starobinsky", nil, "starobinsky()"},
		{"power-law", map[string]float64{"p": 0.6666666666666666}, "power-law(p=0.6666666666666666)"},
	} {
		m := mustNew(t, c.family, c.given)
		if got := m.Describe(); got != c.want {
			t.Errorf("Describe() = %q, want %q", got, c.want)
		}
	}
	// The defaulted t-model is the same potential as n = 1 given.
	a := mustNew(t, "t-model", map[string]float64{"alpha": 1})
	b := mustNew(t, "t-model", map[string]float64{"alpha": 1, "n": 1})
	if a.At(2.3) != b.At(2.3) {
		t.Errorf("default n differs from n = 1: %v vs %v", a.At(2.3), b.At(2.3))
	}
}

// New must not keep the caller's map: changing it afterwards leaves the
// model alone (common practice for value-like configuration).
func TestNewCopiesParameters(t *testing.T) {
	given := map[string]float64{"p": 2}
	m := mustNew(t, "power-law", given)
	given["p"] = 4
	if m.Params["p"] != 2 || m.At(3).V != 9 {
		t.Errorf("model changed with the caller's map: %v, V(3) = %g", m.Params, m.At(3).V)
	}
}

func TestWithRange(t *testing.T) {
	m := mustNew(t, "power-law", map[string]float64{"p": 2})
	r, err := m.WithRange(5, 20)
	if err != nil {
		t.Fatal(err)
	}
	if r.Lo != 5 || r.Hi != 20 || m.Lo != 0 {
		t.Errorf("WithRange: copy (%g, %g), original Lo %g", r.Lo, r.Hi, m.Lo)
	}
	for _, c := range []struct {
		lo, hi float64
		want   string
	}{
		{5, 5, "empty"}, {20, 5, "empty"}, {math.NaN(), 5, "empty"}, {-1, 5, "leaves the domain"}, {1, 1e9, "leaves the domain"},
	} {
		if _, err := m.WithRange(c.lo, c.hi); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("WithRange(%g, %g): error %v, want %q", c.lo, c.hi, err, c.want)
		}
	}
}

func TestParamInterval(t *testing.T) {
	for _, c := range []struct {
		p    Param
		want string
	}{
		{Param{Min: 0, Max: math.Inf(1), MinOpen: true, MaxOpen: true}, "(0, +Inf)"},
		{Param{Min: 2, Max: math.Inf(1), MaxOpen: true}, "[2, +Inf)"},
		{Param{Min: -1, Max: 1}, "[-1, 1]"},
	} {
		if got := c.p.Interval(); got != c.want {
			t.Errorf("Interval() = %q, want %q", got, c.want)
		}
	}
}

// TestNewOnIsNewWithRange: NewOn on a range New and WithRange accept gives
// the model they give (property): the same range, parameters, potential
// and closed forms, for every family, on its default range and on a
// narrower one; and it checks parameters as New does.
func TestNewOnIsNewWithRange(t *testing.T) {
	for _, name := range Names() {
		f, _ := Lookup(name)
		given := map[string]float64{}
		for _, p := range f.Params {
			if math.IsNaN(p.Default) {
				given[p.Name] = map[string]float64{"alpha": 1, "p": 2, "f": 7, "mu": 10, "q": 1, "v": 20, "xi": 1e4, "gamma": 50}[p.Name]
			}
		}
		def, err := f.New(given)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		narrow, err := def.WithRange(def.Lo+0.25*(def.Hi-def.Lo), def.Lo+0.75*(def.Hi-def.Lo))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for _, want := range []*Model{def, narrow} {
			got, err := f.NewOn(given, want.Lo, want.Hi)
			if err != nil {
				t.Errorf("%s on (%g, %g): %v", name, want.Lo, want.Hi, err)
				continue
			}
			if got.Lo != want.Lo || got.Hi != want.Hi || got.Describe() != want.Describe() || (got.Native == nil) != (want.Native == nil) ||
				(got.Efolds == nil) != (want.Efolds == nil) || (got.EpsilonEnd == nil) != (want.EpsilonEnd == nil) {
				t.Errorf("%s: NewOn gives %s on (%g, %g), want %s on (%g, %g)", name, got.Describe(), got.Lo, got.Hi, want.Describe(), want.Lo, want.Hi)
				continue
			}
			for i := 1; i < 8; i++ {
				phi := want.Lo + (want.Hi-want.Lo)*float64(i)/8
				if g, w := got.At(phi), want.At(phi); g != w && !(g.V != g.V && w.V != w.V) {
					t.Errorf("%s: V(%g) = %+v, want %+v", name, phi, g, w)
				}
				if want.Efolds != nil && got.Efolds(want.Lo, phi) != want.Efolds(want.Lo, phi) {
					t.Errorf("%s: Efolds differ at %g", name, phi)
				}
			}
			if want.EpsilonEnd != nil && got.EpsilonEnd() != want.EpsilonEnd() {
				t.Errorf("%s: EpsilonEnd differs", name)
			}
		}
		if _, err := f.NewOn(map[string]float64{"nonsense": 1}, def.Lo, def.Hi); err == nil || !strings.Contains(err.Error(), "unknown parameter") {
			t.Errorf("%s: NewOn with an unknown parameter: %v", name, err)
		}
		if _, err := f.NewOn(given, def.Hi, def.Lo); err == nil {
			t.Errorf("%s: NewOn on an empty range: no error", name)
		}
	}
}
