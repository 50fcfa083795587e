package pipeline

import (
	"math"
	"strings"
	"testing"
)

// The golden key pins the description format: if this test fails, the
// encoding of keys changed, every recorded node becomes a cache miss, and
// KeyVersion must be bumped deliberately.
func TestGoldenKey(t *testing.T) {
	params := Values{
		"family":      String("e-model"),
		"param:alpha": Float(1.0/3, UnitNone),
		"param:n":     Float(1, UnitNone),
		"field_hi":    Float(30, UnitMp),
	}
	inputs := []InputRef{{Stage: "canonical", Output: OutputID(Sum([]byte("upstream")))}}
	desc, err := Describe("inflatrace/test", "slowroll", 3, params, inputs)
	if err != nil {
		t.Fatal(err)
	}
	wantDesc := `inflatrace node key v1
tool "inflatrace/test"
stage slowroll
version 3
param family s "e-model"
param field_hi f 30 M_p
param param:alpha f 0.3333333333333333 1
param param:n f 1 1
input 0 canonical sha256:` + strings.TrimPrefix(Sum([]byte("upstream")), HashPrefix) + "\n"
	if desc != wantDesc {
		t.Fatalf("description changed:\n%s\nwant:\n%s", desc, wantDesc)
	}
	const wantKey = "sha256:5b5bfc89750ddfdd83b249c43c26b03ca700e948a92d00c2bd29bbaae695cd56"
	if got := KeyOf(desc); string(got) != wantKey {
		t.Fatalf("key = %s, want %s", got, wantKey)
	}
}

func TestKeyChangesWithEveryInfluence(t *testing.T) {
	base := Values{"x": Float(1, UnitMp), "s": String("a")}
	in := []InputRef{{Stage: "up", Output: OutputID(Sum([]byte("1")))}}
	ref, _ := Describe("tool/1", "st", 1, base, in)
	variants := map[string]func() (string, error){
		"tool":    func() (string, error) { return Describe("tool/2", "st", 1, base, in) },
		"stage":   func() (string, error) { return Describe("tool/1", "st2", 1, base, in) },
		"version": func() (string, error) { return Describe("tool/1", "st", 2, base, in) },
		"float value": func() (string, error) {
			return Describe("tool/1", "st", 1, Values{"x": Float(math.Nextafter(1, 2), UnitMp), "s": String("a")}, in)
		},
		"unit": func() (string, error) {
			return Describe("tool/1", "st", 1, Values{"x": Float(1, UnitGeV), "s": String("a")}, in)
		},
		"string": func() (string, error) {
			return Describe("tool/1", "st", 1, Values{"x": Float(1, UnitMp), "s": String("b")}, in)
		},
		"input": func() (string, error) {
			return Describe("tool/1", "st", 1, base, []InputRef{{Stage: "up", Output: OutputID(Sum([]byte("2")))}})
		},
	}
	for name, f := range variants {
		d, err := f()
		if err != nil {
			t.Fatal(err)
		}
		if KeyOf(d) == KeyOf(ref) {
			t.Errorf("changing the %s does not change the key", name)
		}
	}
	// The upstream node's key does not enter, only its output hash.
	in2 := []InputRef{{Stage: "up", Key: "sha256:other", Output: in[0].Output}}
	d2, _ := Describe("tool/1", "st", 1, base, in2)
	if KeyOf(d2) != KeyOf(ref) {
		t.Error("the upstream key entered the description; only its output hash should")
	}
}

func TestEncodeRoundTripAndRefusals(t *testing.T) {
	vs := Values{
		"a":   Float(0.1+0.2, UnitNone),
		"b":   Float(-1e-300, UnitGeV),
		"c":   String("line\nwith \"quotes\""),
		"n_s": Float(0.9649772222257963, UnitNone),
	}
	enc, err := vs.Encode()
	if err != nil {
		t.Fatal(err)
	}
	back, err := DecodeValues(enc)
	if err != nil {
		t.Fatal(err)
	}
	for n, v := range vs {
		if back[n] != v {
			t.Errorf("%s: %+v != %+v", n, back[n], v)
		}
	}
	for name, bad := range map[string]Values{
		"NaN":        {"x": Float(math.NaN(), UnitNone)},
		"Inf":        {"x": Float(math.Inf(1), UnitNone)},
		"no unit":    {"x": Float(1, "")},
		"space name": {"x y": Float(1, UnitNone)},
	} {
		if _, err := bad.Encode(); err == nil {
			t.Errorf("%s: encoded without error", name)
		}
	}
}
