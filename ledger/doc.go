// Package ledger is inflatrace's provenance store: an SQLite database that
// records every run, every node a run computed, reused or failed, and the
// labelled results of each run. It implements pipeline.Recorder, so the
// engine's cache lookups and writes go through it, and it answers the
// queries the command line needs (runs, one run's nodes and results, a
// node, a node's lineage).
//
// # Design
//
// One exported method is one transaction. Every write the engine asks for
// (a node, its inputs and the run's link to it) commits together or not at
// all, and a read sees one consistent snapshot. Transactions begin
// IMMEDIATE, so two processes sharing a ledger wait for each other (up to
// the busy timeout) instead of failing on a lock upgrade. Within a process
// the ledger holds a single connection: SQLite admits one writer at a time
// anyway, and the connection pool then serialises the engine's goroutines
// without any lock contention of their own. Reads are short transactions
// too, so a listing never waits long behind a running pipeline.
//
// The connection settings are part of correctness, not tuning: WAL (so
// readers do not block the writer), foreign keys (so an input, a run link or
// a result can never name a node that is not there) and a busy timeout. They
// are set through the DSN and read back with PRAGMA after opening; Open
// fails if any is not in effect rather than run with weaker guarantees.
//
// The schema lives in embedded, numbered migrations (migrations/NNNN_name.sql).
// Each is applied in its own transaction together with its row in
// schema_migrations, so a crash leaves either the old schema or the new one.
// A database whose recorded version is newer than this code knows is
// refused: an old binary must not write into a schema it does not
// understand.
//
// The ledger trusts nothing it is handed. Before a node is written its key
// is checked against the hash of its description, the description against
// the record's stage, version, parameters and inputs, its output hash
// against the hash of its canonical outputs, and each input against the
// upstream row it names. A node key that is recorded as ok is immutable: a
// second computation must reproduce its output hash or is refused as a
// conflict, and a later failure is recorded against the run only. The one
// update allowed to a node row is failed to ok, since a failure is not a
// result. Reads check the same hashes again, so a damaged row surfaces as
// an error (ErrIntegrity) and never as a wrong cached answer: a node's
// description is not stored but re-derived on every read from its tool,
// stage, version, parameters and inputs, and must hash to its key. A row
// copied from the first layout keeps its stored description, checked the
// same way; one in an older key format (pipeline.KeyVersion has moved on)
// is still readable on its key and output hashes alone.
//
// # Layout for large scans
//
// Node keys are SHA-256 hashes, so an index on them takes its inserts at
// random places. Only one index does (the node key's, over 32-byte blobs):
// nodes have integer ids in insertion order, and inputs, run links and
// results refer to those ids, so their indexes grow at their ends and a
// batch of thousands of nodes rewrites few pages (migration 0005).
//
// Times are stored as UTC RFC 3339 text with a fixed nine-digit fraction, so
// the text order is the time order. The clock used for recorded_at and
// applied_at is injected (WithClock); the run's own start and finish times
// come from the caller.
//
// Failures that a caller may want to map to an exit code are sentinel
// errors, wrapped with context: ErrNotFound, ErrAmbiguous, ErrIntegrity and
// ErrSchemaTooNew.
package ledger
