package study

import (
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// Graph expands the study into the pipeline's DAG. Each compare node is a
// result, labelled "model(params) | history | constraint".
func (s *Study) Graph() (*pipeline.Graph, error) {
	g := &pipeline.Graph{}
	for j := 0; j < s.NumModels(); j++ {
		m := s.ModelAt(j)
		label := m.Describe()
		var mp pipeline.Values
		var err error
		if m.Custom != nil {
			mp, err = nodes.CustomParams(*m.Custom)
		} else {
			mp, err = nodes.ModelParams(m.Family, m.Params, m.FieldRange)
		}
		if err != nil {
			return nil, err
		}
		mi, err := g.Add(nodes.Model{}, mp, label)
		if err != nil {
			return nil, err
		}
		ci, err := g.Add(nodes.Canonical{}, pipeline.Values{}, label, mi)
		if err != nil {
			return nil, err
		}
		for _, sr := range s.SlowRoll {
			if err := s.expandHistories(g, label, sr, ci); err != nil {
				return nil, err
			}
		}
	}
	return g, nil
}

// expandHistories adds one slow-roll node below the canonical node ci,
// and its reheat and compare nodes.
func (s *Study) expandHistories(g *pipeline.Graph, label string, sr nodes.SlowRollParams, ci int) error {
	if len(s.SlowRoll) > 1 {
		label += " [" + sr.Method + "]"
	}
	si, err := g.Add(nodes.SlowRoll{}, sr.Values(), label, ci)
	if err != nil {
		return err
	}
	for _, h := range s.Histories {
		rp := nodes.ReheatParams(h.HistoryParams, s.As)
		hl := label + " | " + h.Describe()
		ri, err := g.Add(nodes.Reheat{}, rp, hl, si)
		if err != nil {
			return err
		}
		if h.Kind == nodes.HistoryBand {
			// A band spans many (n_s, r): it is a result of its own.
			g.MarkResult(hl, ri)
			continue
		}
		for _, c := range s.Constraints {
			cl := hl + " | " + c.Name
			ki, err := g.Add(nodes.Compare{}, nodes.GaussianParams(c), cl, ri)
			if err != nil {
				return err
			}
			g.MarkResult(cl, ki)
		}
		for _, ss := range s.SampleSets {
			cl := hl + " | " + ss.Name
			ki, err := g.Add(nodes.Compare{}, nodes.SamplesParams(ss.Name, ss.Citation, ss.Points), cl, ri)
			if err != nil {
				return err
			}
			g.MarkResult(cl, ki)
		}
		for _, f := range s.Forecasts {
			cl := hl + " | forecast " + f.Name
			ki, err := g.Add(nodes.Compare{}, nodes.ForecastParams(f), cl, ri)
			if err != nil {
				return err
			}
			g.MarkResult(cl, ki)
		}
	}
	return nil
}

// Shard keeps the i-th of n deterministic shares of the study's model
// points (1 <= i <= n): the points whose index in expansion order is
// i-1 modulo n. Every point belongs to exactly one shard, and the shares
// do not depend on anything but the configuration.
func (s *Study) Shard(i, n int) {
	s.wk = nil
	s.points.shardI, s.points.shardN = i-1, n
	s.points.lo, s.points.hi = 0, -1
}

// Chunks splits the study into studies of at most size model points each,
// in order (the first holds the first size points, and so on). Their
// graphs together are the study's graph, results in the same order.
func (s *Study) Chunks(size int) []*Study {
	n := s.NumModels()
	if size < 1 || n <= size {
		return []*Study{s}
	}
	if s.wk == nil {
		s.wk = &workCache{} // shared by the chunks: their keys hash the study once
	}
	var out []*Study
	for a := 0; a < n; a += size {
		c := *s
		c.points.lo, c.points.hi = s.points.lo+a, s.points.lo+min(a+size, n)
		out = append(out, &c)
	}
	return out
}

// NodeEstimate is the number of nodes the study's graph has at most: per
// model point, model, canonical and one slow-roll node per method, one
// reheat node per history and one compare node per constraint set or
// forecast below each (bands have none).
func (s *Study) NodeEstimate() int {
	per := len(s.Constraints) + len(s.SampleSets) + len(s.Forecasts)
	return s.NumModels() * (2 + len(s.SlowRoll)*(1+len(s.Histories)*(1+per)))
}
