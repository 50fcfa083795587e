package study

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"hash"
	"math"
	"sort"
	"strconv"
	"sync"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// WorkKeyVersion is the version of the work description (WorkKey). Bump it
// whenever Graph or expandHistories change what graph a study gives, or
// the points a model group makes (modelGroup.make, the ranges' values):
// a work key must determine its graph.
const WorkKeyVersion = 2

// workCache holds the part of a work key that every chunk of a study
// shares (settings, stage versions, model groups), hashed once.
type workCache struct {
	once sync.Once
	tool string
	sum  [sha256.Size]byte
}

// WorkKey is the key of the study's graph as one unit of work
// (pipeline.WorkID), computed without building the graph: the SHA-256 of a
// description of everything Graph reads — the work key version, the tool
// identity, every stage's name and version, the parameters (as the nodes
// will carry them) and labels of every slow-roll method, reheating history,
// constraint set, sample set and forecast, A_s, every model group (family,
// label, field range, user-written model, each axis's values and texts,
// defaults) and the window of points (shard and chunk). Two studies with
// one work key give the same graph, so a recorded work can be reused
// whole. It costs the study's axes once and a few bytes per chunk.
func (s *Study) WorkKey(tool string) (pipeline.WorkID, error) {
	if s.wk == nil {
		s.wk = &workCache{}
	}
	var err error
	s.wk.once.Do(func() {
		s.wk.tool = tool
		s.wk.sum, err = s.sharedDigest(tool)
	})
	if err != nil {
		s.wk = nil // try again next time, and fail again
		return "", err
	}
	if s.wk.tool != tool {
		sum, err := s.sharedDigest(tool)
		if err != nil {
			return "", err
		}
		return s.windowKey(sum), nil
	}
	return s.windowKey(s.wk.sum), nil
}

// windowKey adds the chunk's window to the shared digest.
func (s *Study) windowKey(shared [sha256.Size]byte) pipeline.WorkID {
	h := sha256.New()
	h.Write(shared[:])
	p := s.points
	w := newWriter(h)
	w.line("window", p.shardI, p.shardN, p.lo, p.hi, p.total)
	return pipeline.WorkID(pipeline.HashPrefix + hex.EncodeToString(h.Sum(nil)))
}

// sharedDigest hashes the description of everything but the window.
func (s *Study) sharedDigest(tool string) ([sha256.Size]byte, error) {
	h := sha256.New()
	w := newWriter(h)
	w.line("inflatrace work key v"+strconv.Itoa(WorkKeyVersion), strconv.Quote(tool))
	for _, st := range []pipeline.Stage{nodes.Model{}, nodes.Canonical{}, nodes.SlowRoll{}, nodes.Reheat{}, nodes.Compare{}} {
		sp := st.Spec()
		w.line("stage", sp.Name, sp.Version)
	}
	values := func(tag string, vs pipeline.Values, label string) error {
		enc, err := vs.Encode()
		if err != nil {
			return err
		}
		w.line(tag, strconv.Quote(label), len(enc))
		h.Write(enc)
		return nil
	}
	var sum [sha256.Size]byte
	for _, sr := range s.SlowRoll {
		if err := values("slow_roll", sr.Values(), sr.Method); err != nil {
			return sum, err
		}
	}
	w.line("A_s", w.float(s.As))
	for _, hs := range s.Histories {
		if err := values("history", nodes.ReheatParams(hs.HistoryParams, s.As), hs.Describe()); err != nil {
			return sum, err
		}
		w.line("kind", strconv.Quote(string(hs.Kind)))
	}
	for _, c := range s.Constraints {
		if err := values("constraint", nodes.GaussianParams(c), c.Name); err != nil {
			return sum, err
		}
	}
	for _, ss := range s.SampleSets {
		if err := values("samples", nodes.SamplesParams(ss.Name, ss.Citation, ss.Points), ss.Name); err != nil {
			return sum, err
		}
	}
	for _, f := range s.Forecasts {
		if err := values("forecast", nodes.ForecastParams(f), f.Name); err != nil {
			return sum, err
		}
	}
	p := s.points
	w.line("points", p.total, len(p.groups))
	for gi, g := range p.groups {
		b := g.base
		w.line("group", gi, p.starts[gi], g.n, g.zip, strconv.Quote(b.Family), strconv.Quote(b.Label), len(b.FieldRange))
		for _, x := range b.FieldRange {
			w.line("field_range", w.float(x))
		}
		if c := g.custom; c != nil {
			w.line("custom", strconv.Quote(c.Potential), strconv.Quote(c.Kinetic), strconv.Quote(c.Field),
				w.float(c.DomainLo), w.float(c.DomainHi), w.float(c.Origin), w.float(c.SearchLo), w.float(c.SearchHi))
			w.floats("custom_params", c.Params)
		}
		if b.Custom != nil {
			w.line("base_custom", strconv.Quote(b.Custom.Potential))
		}
		w.floats("base_params", b.Params)
		w.floats("defaults", g.defaults)
		for _, a := range g.axes {
			if r := a.rng; r != nil {
				// A range by its definition: its points and their texts are
				// a function of it (valueRange.at, text).
				w.line("range", strconv.Quote(a.name), r.log, w.float(r.a), w.float(r.b), r.n)
				continue
			}
			w.line("axis", strconv.Quote(a.name), len(a.xs), len(a.texts))
			var buf []byte
			for i, x := range a.xs {
				buf = binary.LittleEndian.AppendUint64(buf[:0], math.Float64bits(x))
				buf = binary.AppendUvarint(buf, uint64(len(a.texts[i])))
				h.Write(buf)
				h.Write([]byte(a.texts[i]))
			}
		}
	}
	copy(sum[:], h.Sum(nil))
	return sum, nil
}

// descWriter writes description lines into a hash.
type descWriter struct {
	h   hash.Hash
	buf []byte
}

func newWriter(h hash.Hash) *descWriter { return &descWriter{h: h} }

// line writes its parts separated by spaces: strings as given, ints in
// decimal, booleans as 0/1.
func (w *descWriter) line(parts ...any) {
	b := w.buf[:0]
	for i, p := range parts {
		if i > 0 {
			b = append(b, ' ')
		}
		switch v := p.(type) {
		case string:
			b = append(b, v...)
		case int:
			b = strconv.AppendInt(b, int64(v), 10)
		case bool:
			if v {
				b = append(b, '1')
			} else {
				b = append(b, '0')
			}
		default:
			panic("study: work description part of an unexpected type")
		}
	}
	b = append(b, '\n')
	w.h.Write(b)
	w.buf = b
}

// float writes x exactly (hexadecimal mantissa and exponent; infinities
// and NaN by name).
func (w *descWriter) float(x float64) string { return strconv.FormatFloat(x, 'x', -1, 64) }

// floats writes a map of floats in name order.
func (w *descWriter) floats(tag string, m map[string]float64) {
	names := make([]string, 0, len(m))
	for n := range m {
		names = append(names, n)
	}
	sort.Strings(names)
	w.line(tag, len(names))
	for _, n := range names {
		w.line(strconv.Quote(n), w.float(m[n]))
	}
}
