package study

import (
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/inflatrace/inflatrace/pipeline"
)

// SummaryFormat names the layout EncodeResults writes: the summary a
// recorded work keeps of its results, so that a run reusing the work, or a
// reader of a run, reports them without reading and assembling their
// lineages.
const SummaryFormat = "inflatrace-results/1"

// EncodeResults writes results in a compact, deterministic binary layout:
// the format name, a table of the strings the results share (model,
// method, reheating, constraint, parameter names, ...), then each result:
// its label, key (32 bytes), strings as table indices, parameters (sorted
// by name), its always-present floats as IEEE 754 bits, a mask of its
// optional floats and booleans followed by those present, and its band.
// Row is not written (commands set it). The same results always give the
// same bytes.
func EncodeResults(results []Result) ([]byte, error) {
	table := map[string]int{}
	var strs []string
	idx := func(s string) int {
		if i, ok := table[s]; ok {
			return i
		}
		table[s] = len(strs)
		strs = append(strs, s)
		return len(strs) - 1
	}
	body := make([]byte, 0, 256*len(results))
	names := make([]string, 0, 4)
	for _, r := range results {
		body = appendString(body, r.Label)
		if r.Key == "" {
			body = append(body, 0)
		} else {
			k, err := rawDigest(r.Key)
			if err != nil {
				return nil, fmt.Errorf("result %q: key: %w", r.Label, err)
			}
			body = append(body, 32)
			body = append(body, k...)
		}
		for _, s := range [...]string{r.Model, r.Potential, r.Kinetic, r.Method, r.End, r.NStarDef, r.Reheating, r.Constraint, r.Error} {
			body = binary.AppendUvarint(body, uint64(idx(s)))
		}
		names = names[:0]
		for n := range r.Params {
			names = append(names, n)
		}
		sort.Strings(names)
		body = binary.AppendUvarint(body, uint64(len(names)))
		for _, n := range names {
			body = binary.AppendUvarint(body, uint64(idx(n)))
			body = appendFloat(body, r.Params[n])
		}
		for _, x := range [...]float64{r.NStar, r.PhiStar, r.PhiEnd, r.Ns, r.R, r.AlphaS, r.Nt} {
			body = appendFloat(body, x)
		}
		opt := r.optionalFloats()
		var mask uint64
		for i, p := range opt {
			if *p != nil {
				mask |= 1 << i
			}
		}
		bools := r.optionalBools()
		for i, p := range bools {
			if *p != nil {
				mask |= 1 << (len(opt) + 2*i)
				if **p {
					mask |= 1 << (len(opt) + 2*i + 1)
				}
			}
		}
		if r.Band != nil {
			mask |= 1 << (len(opt) + 2*len(bools))
		}
		body = binary.AppendUvarint(body, mask)
		for _, p := range opt {
			if *p != nil {
				body = appendFloat(body, **p)
			}
		}
		if b := r.Band; b != nil {
			body = binary.AppendUvarint(body, uint64(b.Points))
			for _, x := range b.floats() {
				body = appendFloat(body, *x)
			}
		}
	}
	out := make([]byte, 0, len(body)+64+16*len(strs))
	out = append(out, SummaryFormat...)
	out = append(out, '\n')
	out = binary.AppendUvarint(out, uint64(len(strs)))
	for _, s := range strs {
		out = appendString(out, s)
	}
	out = binary.AppendUvarint(out, uint64(len(results)))
	return append(out, body...), nil
}

// DecodeResults reads what EncodeResults wrote.
func DecodeResults(data []byte) ([]Result, error) {
	d := decoder{b: data}
	if len(data) < len(SummaryFormat)+1 || string(data[:len(SummaryFormat)]) != SummaryFormat || data[len(SummaryFormat)] != '\n' {
		return nil, fmt.Errorf("results summary: not in the %s layout", SummaryFormat)
	}
	d.b = d.b[len(SummaryFormat)+1:]
	strs := make([]string, d.count())
	for i := range strs {
		strs[i] = d.str()
	}
	str := func() string {
		i := d.count()
		if i >= len(strs) {
			d.fail()
			return ""
		}
		return strs[i]
	}
	out := make([]Result, d.count())
	for k := range out {
		r := &out[k]
		r.Label = d.str()
		switch n := d.byte(); n {
		case 0:
		case 32:
			var hx [len(pipeline.HashPrefix) + 64]byte
			copy(hx[:], pipeline.HashPrefix)
			hex.Encode(hx[len(pipeline.HashPrefix):], d.bytes(32))
			r.Key = string(hx[:])
		default:
			d.fail()
		}
		for _, p := range [...]*string{&r.Model, &r.Potential, &r.Kinetic, &r.Method, &r.End, &r.NStarDef, &r.Reheating, &r.Constraint, &r.Error} {
			*p = str()
		}
		n := d.count()
		r.Params = make(map[string]float64, n)
		for range n {
			name := str()
			r.Params[name] = d.float()
		}
		for _, p := range [...]*float64{&r.NStar, &r.PhiStar, &r.PhiEnd, &r.Ns, &r.R, &r.AlphaS, &r.Nt} {
			*p = d.float()
		}
		mask := d.uvarint()
		opt := r.optionalFloats()
		for i, p := range opt {
			if mask&(1<<i) != 0 {
				x := d.float()
				*p = &x
			}
		}
		bools := r.optionalBools()
		for i, p := range bools {
			if mask&(1<<(len(opt)+2*i)) != 0 {
				v := mask&(1<<(len(opt)+2*i+1)) != 0
				*p = &v
			}
		}
		if mask&(1<<(len(opt)+2*len(bools))) != 0 {
			r.Band = &Band{Points: d.count()}
			for _, x := range r.Band.floats() {
				*x = d.float()
			}
		}
		if d.err != nil {
			return nil, fmt.Errorf("results summary: result %d: %w", k, d.err)
		}
	}
	if d.err == nil && len(d.b) != 0 {
		d.err = fmt.Errorf("%d bytes after the last result", len(d.b))
	}
	if d.err != nil {
		return nil, fmt.Errorf("results summary: %w", d.err)
	}
	return out, nil
}

// optionalFloats are the result's optional floats, in layout order.
func (r *Result) optionalFloats() [11]**float64 {
	return [...]**float64{&r.PhiEndSlowRoll, &r.EnergyScaleGeV, &r.HStarGeV, &r.TRehGeV, &r.TMaxGeV, &r.WReh, &r.NReh,
		&r.DeltaChi2, &r.NSigma, &r.R95, &r.DetectionSigma}
}

// optionalBools are the result's optional booleans, in layout order.
func (r *Result) optionalBools() [5]**bool {
	return [...]**bool{&r.BelowBBN, &r.Inside68, &r.Inside95, &r.ExceedsR95, &r.Detected5Sigma}
}

func (b *Band) floats() [15]*float64 {
	return [...]*float64{&b.NStar[0], &b.NStar[1], &b.Ns[0], &b.Ns[1], &b.R[0], &b.R[1], &b.WAtNStar[0], &b.WAtNStar[1],
		&b.TRehAtNStarGeV[0], &b.TRehAtNStarGeV[1], &b.TMaxGeV, &b.NsAtNStar[0], &b.NsAtNStar[1], &b.RAtNStar[0], &b.RAtNStar[1]}
}

func appendString(b []byte, s string) []byte {
	b = binary.AppendUvarint(b, uint64(len(s)))
	return append(b, s...)
}

func appendFloat(b []byte, x float64) []byte {
	return binary.LittleEndian.AppendUint64(b, math.Float64bits(x))
}

// rawDigest is a prefixed SHA-256 hex digest as its 32 bytes.
func rawDigest(h string) ([]byte, error) {
	if err := pipeline.ParseHash(h); err != nil {
		return nil, err
	}
	out := make([]byte, 32)
	for i := range out {
		out[i] = unhex(h[len(pipeline.HashPrefix)+2*i])<<4 | unhex(h[len(pipeline.HashPrefix)+2*i+1])
	}
	return out, nil
}

func unhex(c byte) byte {
	switch {
	case c >= 'a':
		return c - 'a' + 10
	case c >= 'A':
		return c - 'A' + 10
	}
	return c - '0'
}

// decoder reads a summary, remembering its first error.
type decoder struct {
	b   []byte
	err error
}

var errShort = errors.New("truncated")

func (d *decoder) fail() {
	if d.err == nil {
		d.err = errors.New("malformed")
	}
	d.b = nil
}

func (d *decoder) uvarint() uint64 {
	v, n := binary.Uvarint(d.b)
	if n <= 0 {
		if d.err == nil {
			d.err = errShort
		}
		d.b = nil
		return 0
	}
	d.b = d.b[n:]
	return v
}

// count is a uvarint bounded by what is left to read (a count or an index
// can never exceed the bytes that follow by much).
func (d *decoder) count() int {
	v := d.uvarint()
	if v > uint64(len(d.b))+1<<20 {
		d.fail()
		return 0
	}
	return int(v)
}

func (d *decoder) bytes(n int) []byte {
	if len(d.b) < n {
		if d.err == nil {
			d.err = errShort
		}
		d.b = nil
		return make([]byte, n)
	}
	out := d.b[:n]
	d.b = d.b[n:]
	return out
}

func (d *decoder) byte() byte { return d.bytes(1)[0] }

func (d *decoder) str() string { return string(d.bytes(d.count())) }

func (d *decoder) float() float64 {
	return math.Float64frombits(binary.LittleEndian.Uint64(d.bytes(8)))
}
