-- 0015_unverified_runs: runs imported from an archive that was unsigned
-- or signed by a key the importing user does not trust (accepted with
-- --allow-unsigned or --allow-untrusted). Such a run's numbers are the
-- archive's word only until "verify RUN" has recomputed every node and
-- found them as recorded, which removes its row here.
CREATE TABLE unverified_runs (
    run_id TEXT PRIMARY KEY NOT NULL REFERENCES runs (id),
    reason TEXT NOT NULL,
    since  TEXT NOT NULL
) WITHOUT ROWID;
