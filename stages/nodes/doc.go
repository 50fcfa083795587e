// Package nodes adapts the numerical stage packages (model, canonical,
// slowroll, reheat, compare) to pipeline.Stage. Each adapter declares its
// name, version and parameters, decodes its parameters and its upstream
// outputs into the numerical package's types, calls it, and encodes the
// result as unit-labelled pipeline.Values. No numerics live here.
//
// The model specification (family, parameters, field range) is carried
// forward in the outputs of the model, canonical and slow-roll nodes, so
// that each node can rebuild the model from its direct input alone.
package nodes

import "github.com/inflatrace/inflatrace/pipeline"

// Stage names, stable across releases: they are part of every key.
const (
	ModelStage     = "model"
	CanonicalStage = "canonical"
	SlowRollStage  = "slowroll"
	ReheatStage    = "reheat"
	CompareStage   = "compare"
)

// Stages returns every stage, by name, as the engine and the audit tools
// know them.
func Stages() map[string]pipeline.Stage {
	return map[string]pipeline.Stage{
		ModelStage:     Model{},
		CanonicalStage: Canonical{},
		SlowRollStage:  SlowRoll{},
		ReheatStage:    Reheat{},
		CompareStage:   Compare{},
		InferStage:     Infer{},
	}
}
