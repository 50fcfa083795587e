package ledger

import "errors"

// ErrNotFound is wrapped by errors about a run, node or reference that the
// ledger does not hold.
var ErrNotFound = errors.New("not found")

// ErrAmbiguous is wrapped by ResolveRun when a prefix matches several runs.
var ErrAmbiguous = errors.New("ambiguous")

// ErrIntegrity is wrapped by errors about data that fails a consistency
// check: a key that is not the hash of its description, an output hash that
// is not the hash of its outputs, conflicting outputs for one key, or a
// stored row that no longer matches its hashes.
var ErrIntegrity = errors.New("integrity check failed")

// ErrSchemaTooNew is wrapped by Open when the database was migrated by a
// newer inflatrace than this one.
var ErrSchemaTooNew = errors.New("ledger schema is newer than this program")
