// Package pipeline is inflatrace's engine: stages declared through the Stage
// interface, content-hashed node keys, a DAG built from nodes, and a bounded
// parallel scheduler that reuses any node whose key a Recorder already holds.
//
// The design follows the Go toolchain's build cache. A node's key is the
// SHA-256 of a written description of every influence on its computation:
// the tool's identity, the stage name and version, each parameter (sorted,
// floats in shortest round-trip form, units explicit) and each upstream
// node's *output* hash. Because downstream keys chain on upstream outputs,
// an upstream recomputation that yields identical bytes invalidates nothing
// below it. Printed hashes carry their algorithm ("sha256:...").
//
// The package knows stages only through Stage and storage only through
// Recorder; it imports no SQLite, CLI or configuration code.
package pipeline
