-- 0009_run_seals: a finished run's seal, the SHA-256 of its canonical
-- account (configuration hash, status, error, links, ordered results and
-- every node it linked with what it did with each; see ledger/seal.go).
-- NULL for a run still running, and for runs finished before seals.
ALTER TABLE runs ADD COLUMN seal TEXT;
