package pipeline

import (
	"context"
	"fmt"
)

// ParamSpec declares one parameter of a stage.
type ParamSpec struct {
	Name string
	Kind Kind
	// Unit is the unit a float parameter must carry ("1" when
	// dimensionless); empty for strings. Empty with KindFloat means the
	// unit varies by node (for example a model family's own parameters).
	Unit string
	// Optional parameters may be absent from a node.
	Optional bool
}

// Spec is what a stage declares about itself.
type Spec struct {
	// Name is the stage's stable name, part of every key.
	Name string
	// Version is bumped whenever the stage's numerics change; it is part of
	// every key, so a bump invalidates exactly this stage's nodes and, when
	// their outputs change, everything downstream.
	Version int
	// Params lists the declared parameters. When OpenParams is set, nodes
	// may carry further float parameters whose names start with one of the
	// given prefixes (a model family's parameters, "param:alpha").
	Params     []ParamSpec
	OpenParams []string
	// Inputs names the upstream stages, in the order Run receives them.
	Inputs []string
}

// Stage is one declared step of the pipeline. Run is a pure function of its
// parameters and its inputs' outputs: it must not read clocks, files or the
// environment, so that its key captures every influence on its result.
type Stage interface {
	Spec() Spec
	Run(ctx context.Context, params Values, inputs []Values) (Values, error)
}

// CheckParams checks a node's parameters against the stage's declaration.
func (s Spec) CheckParams(params Values) error {
	matched := 0
	for _, p := range s.Params {
		v, ok := params[p.Name]
		if !ok {
			if p.Optional {
				continue
			}
			return fmt.Errorf("stage %s: missing parameter %q", s.Name, p.Name)
		}
		matched++
		if v.Kind != p.Kind {
			return fmt.Errorf("stage %s: parameter %q has the wrong kind", s.Name, p.Name)
		}
		if p.Kind == KindFloat && p.Unit != "" && v.Unit != p.Unit {
			return fmt.Errorf("stage %s: parameter %q in %q, want %q", s.Name, p.Name, v.Unit, p.Unit)
		}
	}
	if matched == len(params) {
		return nil
	}
	// Some names are not declared: each must be open, and the first that
	// is not (in name order) is reported.
	for _, n := range params.Names() {
		if s.declares(n) {
			continue
		}
		if hasAnyPrefix(n, s.OpenParams) && params[n].Kind == KindFloat {
			continue
		}
		return fmt.Errorf("stage %s: undeclared parameter %q", s.Name, n)
	}
	return nil
}

func (s Spec) declares(name string) bool {
	for _, p := range s.Params {
		if p.Name == name {
			return true
		}
	}
	return false
}

func hasAnyPrefix(s string, prefixes []string) bool {
	for _, p := range prefixes {
		if len(s) > len(p) && s[:len(p)] == p {
			return true
		}
	}
	return false
}
