package nodes

import (
	"reflect"
	"testing"
)

// TestInferParamsRoundTrip: an inference's parameters decode to the same
// specification (priors sorted by name), so that the node recomputed by
// verify is the node that was recorded.
func TestInferParamsRoundTrip(t *testing.T) {
	for _, free := range []bool{false, true} {
		s := inferBench(free)
		vs, err := InferParams(s)
		if err != nil {
			t.Fatal(err)
		}
		if err := inferSpec.CheckParams(vs); err != nil {
			t.Fatalf("parameters refused by the stage's declaration: %v", err)
		}
		got, err := inferFrom(vs)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, s) {
			t.Errorf("round trip:\n got %+v\nwant %+v", got, s)
		}
	}
}
