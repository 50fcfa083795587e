// Package study reads an inflatrace study configuration (TOML), checks it
// with errors that name the file, line and column, expands it into the
// pipeline's DAG of stage nodes, and assembles reported results from the
// outputs along each result's lineage.
//
// Expansion: every list-valued model parameter fans out (the cartesian
// product within one [[model]] table); each model gets one model,
// canonical and slow-roll node; each reheating history (each fixed N*
// separately) one reheat node below it; each constraint set one compare
// node below that, which is a result. Nodes with identical stage,
// parameters and inputs are shared.
package study
