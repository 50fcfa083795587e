package ledger

import (
	"context"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

// packCases are value sets whose canonical text must survive packing
// bit for bit: the float64 edge cases (IEEE 754: signed zero, subnormals,
// the largest finite), integers written into the shape, repeated floats
// sharing a slot, and strings that look like slot references.
func packCases() []pipeline.Values {
	cases := []pipeline.Values{
		{},
		{"a": num(0.1), "b": num(0.1), "c": num(-0.1)},
		{"zero": num(0), "negzero": num(math.Copysign(0, -1)), "one": num(1), "m": num(-64), "big": num(65), "half": num(0.5)},
		{"sub": num(5e-324), "subneg": num(-2.2250738585072e-310), "min": num(2.2250738585072014e-308), "max": num(math.MaxFloat64), "neg": num(-1e300)},
		{"s": pipeline.String("x f $1 1\n$0 \"q\" \x00 é"), "t": pipeline.String(""), "f": pipeline.Float(3.5, pipeline.UnitGeV)},
		{"N_star": pipeline.Float(54.19143497773111, "1"), "T": pipeline.Float(1.127434794849603e+15, pipeline.UnitGeV), "k": pipeline.Float(0.05, pipeline.UnitPerMpc)},
	}
	r := rand.New(rand.NewPCG(1, 2))
	for range 200 {
		vs := pipeline.Values{}
		for j := range 1 + r.IntN(30) {
			name := "v" + strconv.Itoa(j)
			switch r.IntN(5) {
			case 0:
				vs[name] = num(float64(r.IntN(200) - 100))
			case 1:
				vs[name] = num(math.Float64frombits(r.Uint64()&^(0x7ff<<52) | uint64(r.IntN(0x7ff))<<52))
			case 2:
				vs[name] = pipeline.String(strconv.Itoa(r.IntN(4)))
			default:
				vs[name] = pipeline.Float(r.NormFloat64()*math.Pow(10, float64(r.IntN(40)-20)), pipeline.UnitMp)
			}
		}
		cases = append(cases, vs)
	}
	return cases
}

// packValues packs vs from its own canonical text.
func packValues(vs pipeline.Values) (packed, error) {
	text, err := vs.Encode()
	if err != nil {
		return packed{}, err
	}
	return packText(string(text), vs, false, nil)
}

// TestPackRoundTrip: the shape and slots of a set give back its canonical
// text exactly (a property: any difference would change an output hash).
func TestPackRoundTrip(t *testing.T) {
	for i, vs := range packCases() {
		want, err := vs.Encode()
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		p, err := packValues(vs)
		if err != nil {
			t.Fatalf("case %d: pack: %v", i, err)
		}
		sh, err := parseShape(p.shape)
		if err != nil {
			t.Fatalf("case %d: shape %q: %v", i, p.shape, err)
		}
		if sh.slots != len(p.slots) {
			t.Fatalf("case %d: shape has %d slots, packing gave %d", i, sh.slots, len(p.slots))
		}
		got, err := sh.unpack(p.slotBytes())
		if err != nil {
			t.Fatalf("case %d: unpack: %v", i, err)
		}
		if got != string(want) {
			t.Fatalf("case %d: unpacked\n%q\nwant\n%q", i, got, want)
		}
	}
}

// TestPackSharesShapes: points of a scan that differ only in their floats
// share one shape, and equal floats of one set one slot.
func TestPackSharesShapes(t *testing.T) {
	a, _ := packValues(pipeline.Values{"alpha": num(0.3), "n": num(1), "x": num(0.3)})
	b, _ := packValues(pipeline.Values{"alpha": num(0.7), "n": num(1), "x": num(0.7)})
	if a.shape != b.shape {
		t.Fatalf("shapes differ:\n%s\n%s", a.shape, b.shape)
	}
	if len(a.slots) != 1 {
		t.Fatalf("%d slots for one distinct non-integer float, want 1", len(a.slots))
	}
	if bad, err := parseShape("x f $ 1\n"); err == nil {
		t.Fatalf("a slot reference without a number parsed: %+v", bad)
	}
	sh, _ := parseShape("x f $0 1\n")
	if _, err := sh.unpack([]byte{1, 2, 3}); err == nil {
		t.Fatal("3 bytes unpacked into a one-slot shape")
	}
}

// TestValuesViewDecodesFloats: the node_values view, which turns a slot's
// 8 bytes into a number in plain SQL (sign, exponent, fraction: IEEE 754
// binary64), gives every float back exactly, subnormals and signed zero
// included, and the nodes view shows every row's values as text.
func TestValuesViewDecodesFloats(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	run := beginRun(t, l, "view", testClock)
	var want []float64
	for _, vs := range packCases()[:60] {
		outs := pipeline.Values{}
		for n, v := range vs {
			if v.Kind == pipeline.KindFloat {
				outs[n] = v
			}
		}
		if len(outs) == 0 {
			continue
		}
		rec := mkNode(t, "view", pipeline.Values{"i": num(float64(len(want)))}, outs)
		record(t, l, run, rec, pipeline.Computed)
		for _, n := range outs.Names() {
			want = append(want, outs[n].Float)
		}
	}
	rows, err := l.db.QueryContext(ctx, `SELECT v.value FROM node_values v WHERE v.part = 'outputs' ORDER BY v.node, v.line`)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	i := 0
	for rows.Next() {
		var got float64
		if err := rows.Scan(&got); err != nil {
			t.Fatal(err)
		}
		if i >= len(want) {
			t.Fatalf("more values in the view than recorded (%d)", len(want))
		}
		if math.Float64bits(got) != math.Float64bits(want[i]) && !(got == 0 && want[i] == 0) {
			t.Fatalf("value %d: the view gives %v (%x), recorded %v (%x)", i, got, math.Float64bits(got), want[i], math.Float64bits(want[i]))
		}
		i++
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	if i != len(want) {
		t.Fatalf("the view gives %d values, recorded %d", i, len(want))
	}
	var n int
	if err := l.db.QueryRowContext(ctx, `SELECT count(*) FROM nodes WHERE stage = 'view' AND outputs LIKE '%f%' AND params LIKE 'i f %'`).Scan(&n); err != nil {
		t.Fatal(err)
	}
	if n == 0 {
		t.Fatal("the nodes view shows no row's values")
	}
}

// TestPackStrictRefusesOtherText: strict packing accepts only the exact
// canonical text of the values (what a key was described with), so a
// record whose description and parameters disagree is refused.
func TestPackStrictRefusesOtherText(t *testing.T) {
	vs := pipeline.Values{"a": num(1), "b": num(0.25), "s": pipeline.String("x")}
	good, _ := vs.Encode()
	if _, err := packText(string(good), vs, true, nil); err != nil {
		t.Fatalf("canonical text refused: %v", err)
	}
	for _, bad := range []string{
		"a f 1.0 1\nb f 0.25 1\ns s \"x\"\n",        // not the shortest form
		"b f 0.25 1\na f 1 1\ns s \"x\"\n",          // out of order
		"a f 1 1\nb f 0.25 1\n",                     // a value missing
		"a f 1 1\nb f 0.25 GeV\ns s \"x\"\n",        // another unit
		"a f 1 1\nb f 0.5 1\ns s \"x\"\n",           // another value
		"a f 1 1\nb f 0.25 1\ns s \"y\"\n",          // another string
		"a f 1 1\na f 1 1\nb f 0.25 1\ns s \"x\"\n", // a repeated name
	} {
		if _, err := packText(bad, vs, true, nil); err == nil {
			t.Errorf("strict packing accepted %q", bad)
		}
	}
}
