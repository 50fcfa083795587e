package pipeline

import (
	"math"
	"math/rand/v2"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// referenceEncode is the canonical text written the plain way (one string
// per line, joined), as the format documented on Encode and Describe
// states it; the fast encoders must match it byte for byte.
func referenceEncode(vs Values, prefix string) string {
	var names []string
	for n := range vs {
		names = append(names, n)
	}
	sort.Strings(names)
	var lines []string
	for _, n := range names {
		v := vs[n]
		if v.Kind == KindFloat {
			lines = append(lines, prefix+n+" f "+strconv.FormatFloat(v.Float, 'g', -1, 64)+" "+v.Unit+"\n")
		} else {
			lines = append(lines, prefix+n+" s "+strconv.Quote(v.Str)+"\n")
		}
	}
	return strings.Join(lines, "")
}

func randomValues(r *rand.Rand) Values {
	vs := Values{}
	units := []string{UnitNone, UnitMp, UnitGeV, UnitPerMpc, "param-unit"}
	strs := []string{"", "e-model", "line\nwith \"quotes\"", "ünïcode ✓", "\x00\x7f"}
	for i := 0; i < r.IntN(40); i++ {
		name := "v" + strconv.Itoa(r.IntN(1000))
		if r.IntN(4) == 0 {
			vs[name] = String(strs[r.IntN(len(strs))])
			continue
		}
		x := math.Float64frombits(r.Uint64())
		if math.IsNaN(x) || math.IsInf(x, 0) {
			x = r.NormFloat64() * math.Pow(10, float64(r.IntN(40)-20))
		}
		vs[name] = Float(x, units[r.IntN(len(units))])
	}
	return vs
}

// Encode and Describe write exactly the documented text, for random sets
// of every size (including more names than the encoders' stack buffer).
func TestEncodeMatchesReference(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 500; trial++ {
		vs := randomValues(r)
		enc, err := vs.Encode()
		if err != nil {
			t.Fatal(err)
		}
		if want := referenceEncode(vs, ""); string(enc) != want {
			t.Fatalf("Encode:\n%q\nwant\n%q", enc, want)
		}
		in := []InputRef{{Stage: "up", Output: OutputID(Sum(enc))}, {Stage: "up2", Output: OutputID(Sum([]byte("x")))}}
		desc, err := Describe("tool/1", "st", 7, vs, in)
		if err != nil {
			t.Fatal(err)
		}
		want := "inflatrace node key v1\ntool \"tool/1\"\nstage st\nversion 7\n" + referenceEncode(vs, "param ") +
			"input 0 up " + string(in[0].Output) + "\ninput 1 up2 " + string(in[1].Output) + "\n"
		if desc != want {
			t.Fatalf("Describe:\n%s\nwant\n%s", desc, want)
		}
		if d2, k, _ := describe("tool/1", "st", 7, vs, in, true); d2 != desc || k != KeyOf(want) {
			t.Fatalf("describe's key %s is not the hash of its description", k)
		}
	}
}

func TestParseHashRefusals(t *testing.T) {
	good := Sum([]byte("x"))
	if err := ParseHash(good); err != nil {
		t.Fatal(err)
	}
	for _, bad := range []string{good[len(HashPrefix):], good[:len(good)-1], good[:len(good)-1] + "g", good[:10] + "Z" + good[11:]} {
		if ParseHash(bad) == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// The encoders allocate little: a typical output set is encoded into one
// buffer, hashed into one string, and a description is one buffer plus
// its key. (Counts, not times: a property of the code that could regress.)
func TestEncodingAllocations(t *testing.T) {
	outs := Values{}
	for i := 0; i < 12; i++ {
		outs["out_"+strconv.Itoa(i)] = Float(float64(i)/7, UnitNone)
	}
	outs["method"] = String("first-order")
	params := Values{"family": String("e-model"), "param:alpha": Float(1.0/3, UnitNone), "field_hi": Float(30, UnitMp)}
	in := []InputRef{{Stage: "canonical", Output: OutputID(Sum([]byte("u")))}}
	for _, c := range []struct {
		name string
		max  float64
		f    func()
	}{
		{"Encode", 1, func() { outs.Encode() }},
		{"OutputHash", 2, func() { OutputHash(outs) }},
		{"Describe", 1, func() { Describe("inflatrace/t", "slowroll", 3, params, in) }},
		{"describe with its key", 2, func() { describe("inflatrace/t", "slowroll", 3, params, in, true) }},
		{"Sum", 1, func() { Sum([]byte("abc")) }},
	} {
		if got := testing.AllocsPerRun(100, c.f); got > c.max {
			t.Errorf("%s: %g allocations, want at most %g", c.name, got, c.max)
		}
	}
}

func BenchmarkDescribeAndKey(b *testing.B) {
	params := Values{"family": String("e-model"), "param:alpha": Float(1.0/3, UnitNone), "field_hi": Float(30, UnitMp)}
	in := []InputRef{{Stage: "canonical", Output: OutputID(Sum([]byte("u")))}}
	b.ReportAllocs()
	for b.Loop() {
		describe("inflatrace/t", "slowroll", 3, params, in, true)
	}
}

func BenchmarkOutputHash(b *testing.B) {
	outs := Values{}
	for i := 0; i < 12; i++ {
		outs["out_"+strconv.Itoa(i)] = Float(float64(i)/7, UnitNone)
	}
	b.ReportAllocs()
	for b.Loop() {
		OutputHash(outs)
	}
}
