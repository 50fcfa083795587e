package study

import (
	"sort"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// MaxModelPoints bounds a study's model points.
const MaxModelPoints = 1_000_000_000

// modelGroup is one [[model]] table: a base specification and the
// parameters that fan out, as a product (first parameter slowest, in
// sorted order) or zipped. Points are made on demand, so that a scan of a
// million points costs its axes, not a million specifications.
type modelGroup struct {
	base     ModelSpec // family, label, field range (no parameters)
	axes     []axis
	zip      bool
	n        int
	defaults map[string]float64 // the family's defaults for parameters not given
	custom   *nodes.Custom      // the user-written model, parameters aside
}

// index returns, for point i, the index into each axis.
func (g *modelGroup) index(i int) []int {
	idx := make([]int, len(g.axes))
	if g.zip {
		for k := range g.axes {
			if g.axes[k].len() > 1 {
				idx[k] = i
			}
		}
		return idx
	}
	for k := len(g.axes) - 1; k >= 0; k-- {
		n := g.axes[k].len()
		idx[k] = i % n
		i /= n
	}
	return idx
}

func (g *modelGroup) make(idx []int) ModelSpec {
	m := g.base
	m.Params = make(map[string]float64, len(g.axes)+len(g.defaults))
	m.ParamText = make(map[string]string, len(g.axes)+len(g.defaults))
	for k := range g.axes {
		a := &g.axes[k]
		m.Params[a.name], m.ParamText[a.name] = a.at(idx[k])
	}
	for n, v := range g.defaults {
		m.Params[n], m.ParamText[n] = v, pipeline.FormatFloat(v)
	}
	if g.custom != nil {
		cu := *g.custom
		cu.Params = m.Params
		m.Custom = &cu
	}
	return m
}

// at returns point i of the group.
func (g *modelGroup) at(i int) ModelSpec { return g.make(g.index(i)) }

// eachProbe calls f with points that together hold every value of every
// list and the ends of every range with the points next to them
// (axis.probes), each with the other axes at their first values, one at a
// time; it stops at f's first error.
func (g *modelGroup) eachProbe(f func(ModelSpec) error) error {
	idx := make([]int, len(g.axes))
	for k := range g.axes {
		for _, j := range g.axes[k].probes() {
			clear(idx)
			if g.zip {
				for kk := range g.axes {
					if g.axes[kk].len() > 1 {
						idx[kk] = j
					}
				}
			}
			idx[k] = j
			if err := f(g.make(idx)); err != nil {
				return err
			}
		}
	}
	return nil
}

// has reports whether the group gives parameter n.
func (g *modelGroup) has(n string) bool {
	for _, a := range g.axes {
		if a.name == n {
			return true
		}
	}
	return false
}

// modelPoints are a study's model points: its groups in order, possibly
// restricted to a shard (global indices i with i mod shardN = shardI) and
// to a window of that sequence (a chunk).
type modelPoints struct {
	groups         []*modelGroup
	starts         []int // starts[k] is the first global index of groups[k]
	total          int
	shardI, shardN int // shardN 0: no shard
	lo, hi         int // window into the (sharded) sequence; hi -1: to the end
}

func newModelPoints(groups []*modelGroup) modelPoints {
	p := modelPoints{groups: groups, hi: -1}
	for _, g := range groups {
		p.starts = append(p.starts, p.total)
		p.total += g.n
	}
	return p
}

// seqLen is the length of the sharded sequence.
func (p modelPoints) seqLen() int {
	if p.shardN == 0 {
		return p.total
	}
	if p.shardI >= p.total {
		return 0
	}
	return (p.total - p.shardI + p.shardN - 1) / p.shardN
}

func (p modelPoints) len() int {
	hi := p.hi
	if hi < 0 {
		hi = p.seqLen()
	}
	return hi - p.lo
}

func (p modelPoints) at(j int) ModelSpec {
	k := p.lo + j
	if p.shardN > 0 {
		k = p.shardI + k*p.shardN
	}
	gi := sort.Search(len(p.starts), func(i int) bool { return p.starts[i] > k }) - 1
	return p.groups[gi].at(k - p.starts[gi])
}

// NumModels is the number of model points of the study (of its shard and
// chunk, when it is one).
func (s *Study) NumModels() int { return s.points.len() }

// ModelAt returns model point j, 0 <= j < NumModels().
func (s *Study) ModelAt(j int) ModelSpec { return s.points.at(j) }

// AllModels returns every model point (for small studies and tests).
func (s *Study) AllModels() []ModelSpec {
	out := make([]ModelSpec, s.NumModels())
	for j := range out {
		out[j] = s.ModelAt(j)
	}
	return out
}
