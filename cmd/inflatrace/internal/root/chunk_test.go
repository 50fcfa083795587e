package root

import (
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

// A study run in chunks gives the results of a run in one piece, in the
// same order, and a node met again in a later chunk (the same model point
// listed twice, far apart) is reused and linked to the run once.
func TestChunkedRunEqualsWhole(t *testing.T) {
	h := newHarness(t)
	whole := decodeRun(t, h.mustRun("run", demoPath(t), "--json"))
	saved := app.ChunkPoints
	app.ChunkPoints = 3
	defer func() { app.ChunkPoints = saved }()
	h2 := newHarness(t)
	chunked := decodeRun(t, h2.mustRun("run", demoPath(t), "--json"))
	if len(chunked.Results) != len(whole.Results) {
		t.Fatalf("%d results in chunks, %d whole", len(chunked.Results), len(whole.Results))
	}
	for i := range whole.Results {
		if whole.Results[i]["key"] != chunked.Results[i]["key"] || whole.Results[i]["label"] != chunked.Results[i]["label"] {
			t.Fatalf("result %d differs: %v vs %v", i, whole.Results[i]["label"], chunked.Results[i]["label"])
		}
	}
	study := customHead + "[[model]]\nfamily = \"t-model\"\nalpha = [1, 2, 3, 4, 1]\n"
	r := decodeRun(t, h2.mustRun("run", h2.write("dup.toml", study), "--json"))
	if len(r.Results) != 5 || r.Results[0]["key"] != r.Results[4]["key"] {
		t.Fatalf("duplicate point across chunks: %d results", len(r.Results))
	}
	out := h2.mustRun("show", r.Run, "--json")
	if len(out) == 0 {
		t.Fatal("show failed")
	}
}
