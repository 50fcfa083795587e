package study

import (
	"crypto/sha256"
	"encoding/hex"
	"math"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

// graphDigest is the hash of everything a graph's evaluation depends on:
// each node's stage, version, parameters and inputs, and each result's
// label and node.
func graphDigest(t *testing.T, g *pipeline.Graph) string {
	t.Helper()
	h := sha256.New()
	for _, n := range g.Nodes {
		enc, err := n.Params.Encode()
		if err != nil {
			t.Fatal(err)
		}
		sp := n.Stage.Spec()
		h.Write([]byte(sp.Name + "/" + strconv.Itoa(sp.Version) + "\n"))
		h.Write(enc)
		for _, in := range n.Inputs {
			h.Write([]byte(" " + strconv.Itoa(in)))
		}
		h.Write([]byte("\n"))
	}
	for _, r := range g.Results {
		h.Write([]byte(r.Label + "@" + strconv.Itoa(r.Node) + "\n"))
	}
	return hex.EncodeToString(h.Sum(nil))
}

const workBase = `[slow_roll]
method = "first"

[normalisation]
A_s = 2.1e-9

[[reheating]]
history = "temperature"
w_reh = 0
T_reh_GeV = 1e9

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = {log = [0.01, 100], points = 12}
`

// A work key must determine its graph: over edits of every section, two
// chunks with one work key have identical graphs (property; the graph is
// the ground truth the key stands for: a key shared by two graphs would
// serve one's results for the other). The converse is not required (a
// key that differs where the graphs agree costs a recomputation, never a
// wrong answer), but edits the study's meaning ignores (a comment, a
// title, 0 written 0.0) must keep the key.
func TestWorkKeyDeterminesGraph(t *testing.T) {
	variants := map[string]string{
		"base":             workBase,
		"comment":          "# a comment changes nothing\n" + workBase,
		"reordered title":  strings.Replace(workBase, "[slow_roll]", "title = \"x\"\n\n[slow_roll]", 1),
		"more points":      strings.Replace(workBase, "points = 12", "points = 13", 1),
		"range end":        strings.Replace(workBase, "[0.01, 100]", "[0.01, 99]", 1),
		"w_reh":            strings.Replace(workBase, "w_reh = 0", "w_reh = \"1/3\"", 1),
		"w_reh written":    strings.Replace(workBase, "w_reh = 0", "w_reh = 0.0", 1),
		"T_reh":            strings.Replace(workBase, "1e9", "1e10", 1),
		"A_s":              strings.Replace(workBase, "2.1e-9", "2.2e-9", 1),
		"method":           strings.Replace(workBase, `"first"`, `"second"`, 1),
		"constraint":       strings.Replace(workBase, "cmb-combined-2025", "planck2018-bk18", 1),
		"family":           strings.Replace(workBase, "e-model", "t-model", 1),
		"label":            strings.Replace(workBase, "family = \"e-model\"", "family = \"e-model\"\nlabel = \"E\"", 1),
		"default written":  strings.Replace(workBase, "points = 12}", "points = 12}\nn = 1", 1),
		"list":             strings.Replace(workBase, "{log = [0.01, 100], points = 12}", "[0.01, 0.1, 1]", 1),
		"list as fraction": strings.Replace(workBase, "{log = [0.01, 100], points = 12}", "[0.01, 0.1, \"1/1\"]", 1),
		"forecast":         workBase + "\n[[forecast]]\nuse = \"tern-b\"\n",
		"second model":     workBase + "\n[[model]]\nfamily = \"t-model\"\nalpha = 1\n",
	}
	dir := t.TempDir()
	type chunk struct {
		name, key, graph string
	}
	var all []chunk
	for name, text := range variants {
		s, err := Parse(filepath.Join(dir, "s.toml"), []byte(text), dir)
		if err != nil {
			t.Logf("%s: %v (variant skipped)", name, err)
			continue
		}
		for size := range []int{0, 5} {
			for ci, c := range s.Chunks([]int{1000, 5}[size]) {
				k, err := c.WorkKey("inflatrace/test")
				if err != nil {
					t.Fatal(err)
				}
				g, err := c.Graph()
				if err != nil {
					t.Fatal(err)
				}
				all = append(all, chunk{name + "/" + strconv.Itoa(size) + "/" + strconv.Itoa(ci), string(k), graphDigest(t, g)})
			}
		}
	}
	distinct := map[string]bool{}
	for _, c := range all {
		distinct[c.graph] = true
	}
	if len(all) < 30 || len(distinct) < 15 {
		t.Fatalf("only %d chunks: variants failed to parse", len(all))
	}
	for i := range all {
		for j := i + 1; j < len(all); j++ {
			a, b := all[i], all[j]
			if a.key == b.key && a.graph != b.graph {
				t.Errorf("%s and %s: one work key, different graphs", a.name, b.name)
			}
			va, _, _ := strings.Cut(a.name, "/")
			vb, _, _ := strings.Cut(b.name, "/")
			ra, rb := a.name[len(va):], b.name[len(vb):]
			same := map[string]bool{"comment": true, "reordered title": true, "w_reh written": true}
			if va == "base" && same[vb] && ra == rb && a.key != b.key {
				t.Errorf("%s and %s: the edit changes nothing, but the work key changed", a.name, b.name)
			}
		}
	}
	// The tool identity enters the key.
	s, _ := Parse(filepath.Join(dir, "s.toml"), []byte(workBase), dir)
	k1, _ := s.WorkKey("inflatrace/1")
	k2, _ := s.WorkKey("inflatrace/2")
	if k1 == k2 {
		t.Error("the work key does not depend on the tool identity")
	}
	// Shards of one study differ from each other and from the whole.
	keys := map[pipeline.WorkID]bool{}
	for i := 1; i <= 3; i++ {
		sh, _ := Parse(filepath.Join(dir, "s.toml"), []byte(workBase), dir)
		sh.Shard(i, 3)
		k, _ := sh.WorkKey("inflatrace/1")
		keys[k] = true
	}
	keys[k1] = true
	if len(keys) != 4 {
		t.Errorf("3 shards and the whole study give %d distinct keys, want 4", len(keys))
	}
}

// EncodeResults and DecodeResults round-trip every field (property), the
// encoding is deterministic, and damaged data is refused.
func TestResultsSummaryRoundTrip(t *testing.T) {
	f := func(x float64) *float64 { return &x }
	b := func(v bool) *bool { return &v }
	key := pipeline.HashPrefix + strings.Repeat("ab", 32)
	rs := []Result{
		{Label: "e-model(alpha=1/3) | w=0 | set", Model: "e-model", Params: map[string]float64{"alpha": 1.0 / 3, "n": 1},
			Method: "first", End: "epsilon_V = 1", NStarDef: "x", Reheating: "w=0", NStar: 54.2, PhiStar: 5.1, PhiEnd: 0.7,
			Ns: 0.9657, R: 3.1e-3, AlphaS: -6e-4, Nt: -3.9e-4, EnergyScaleGeV: f(1.6e16), HStarGeV: f(2e13), TRehGeV: f(1e9),
			TMaxGeV: f(1e15), WReh: f(0), NReh: f(12.5), BelowBBN: b(false), Constraint: "set", DeltaChi2: f(1.2), NSigma: f(0.6),
			Inside68: b(true), Inside95: b(true), R95: f(0.036), ExceedsR95: b(false), Key: key},
		{Label: "custom", Model: "custom", Params: map[string]float64{}, Potential: "V0*(1-exp(-x))^2", Kinetic: "1",
			Ns: math.NaN(), R: math.Inf(1), DetectionSigma: f(3.2), Detected5Sigma: b(false), Error: "slow-roll: failed", Key: ""},
		{Label: "band", Model: "t-model", Params: map[string]float64{"alpha": 7.0 / 3}, Band: &Band{Points: 400,
			NStar: [2]float64{45, 60}, Ns: [2]float64{0.95, 0.97}, R: [2]float64{1e-3, 2e-3}, WAtNStar: [2]float64{-1.0 / 3, 1},
			TRehAtNStarGeV: [2]float64{1e-2, 1e15}, TMaxGeV: 1e15, NsAtNStar: [2]float64{0.95, 0.97}, RAtNStar: [2]float64{2e-3, 1e-3}}, Key: key},
	}
	enc, err := EncodeResults(rs)
	if err != nil {
		t.Fatal(err)
	}
	for range 5 { // map order varies between calls: the bytes must not
		again, _ := EncodeResults(rs)
		if string(again) != string(enc) {
			t.Fatal("EncodeResults is not deterministic")
		}
	}
	got, err := DecodeResults(enc)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(rs) {
		t.Fatalf("%d results back, want %d", len(got), len(rs))
	}
	for i := range rs {
		w, g := rs[i], got[i]
		// NaN is not equal to itself: compare its bits.
		if math.Float64bits(w.Ns) != math.Float64bits(g.Ns) {
			t.Errorf("result %d: n_s bits %x, want %x", i, math.Float64bits(g.Ns), math.Float64bits(w.Ns))
		}
		w.Ns, g.Ns = 0, 0
		if !reflect.DeepEqual(w, g) {
			t.Errorf("result %d:\n got %+v\nwant %+v", i, g, w)
		}
	}
	for _, cut := range []int{0, 10, len(enc) / 2, len(enc) - 1} {
		if _, err := DecodeResults(enc[:cut]); err == nil {
			t.Errorf("a summary cut to %d of %d bytes decodes", cut, len(enc))
		}
	}
	if _, err := DecodeResults(append(append([]byte{}, enc...), 0)); err == nil {
		t.Error("a summary with a trailing byte decodes")
	}
}
