-- 0008_run_parts: the runs a run assembles, in order: the shard runs of a
-- study that "merge" assembled into one run of the whole study.
CREATE TABLE run_parts (
    run_id   TEXT NOT NULL REFERENCES runs (id),
    position INTEGER NOT NULL CHECK (position >= 0),
    part     TEXT NOT NULL REFERENCES runs (id),
    PRIMARY KEY (run_id, position),
    CHECK (part <> run_id)
) WITHOUT ROWID;
