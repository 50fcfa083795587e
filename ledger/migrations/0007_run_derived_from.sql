-- 0007_run_derived_from: the run a run was re-run from ("run --from RUN"
-- with edits), NULL for a run of a configuration given directly.
ALTER TABLE runs ADD COLUMN derived_from TEXT REFERENCES runs (id);
