package reheat

import (
	"reflect"
	"testing"
)

// A band told to report its progress reports once per history, counting
// up by one to NW*NT, and gives the same result, to the bit, as without reporting
// (property: reporting is output only).
func TestBandProgress(t *testing.T) {
	ev := starobinskyEv(t)
	h := DefaultHistory()
	s := BandSettings{WMin: 0, WMax: 1, NW: 4, NT: 30}
	plain, err := Band(ev, h, s)
	if err != nil {
		t.Fatal(err)
	}
	var calls, last int64
	s.Progress = func(done, total int64) {
		calls++
		if total != 4*30 {
			t.Fatalf("total %d, want %d", total, 4*30)
		}
		if done != last+1 {
			t.Fatalf("done went from %d to %d", last, done)
		}
		last = done
	}
	told, err := Band(ev, h, s)
	if err != nil {
		t.Fatal(err)
	}
	if calls != 4*30 || last != 4*30 {
		t.Errorf("%d reports ending at %d, want %d ending at %d", calls, last, 4*30, 4*30)
	}
	if !reflect.DeepEqual(plain, told) {
		t.Errorf("reporting changed the band: %+v, want %+v", told, plain)
	}
}
