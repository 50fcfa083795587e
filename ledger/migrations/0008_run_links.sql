-- 0008_run_links: where a run came from. kind 'derived_from' (position 0)
-- names the run whose configuration this run's is, edited ("run --from");
-- kind 'part' names, in order, the shard runs that "merge" assembled into
-- this run of the whole study. The run named need not be in this ledger
-- (an exported run names the run it was derived from), so "other" is not
-- a foreign key. Supersedes runs.derived_from of 0007, copied here; that
-- column is no longer written.
CREATE TABLE run_links (
    run_id   TEXT NOT NULL REFERENCES runs (id),
    kind     TEXT NOT NULL CHECK (kind IN ('derived_from', 'part')),
    position INTEGER NOT NULL CHECK (position >= 0),
    other    TEXT NOT NULL CHECK (other <> '' AND other <> run_id),
    PRIMARY KEY (run_id, kind, position),
    CHECK (kind = 'part' OR position = 0)
) WITHOUT ROWID;

INSERT INTO run_links (run_id, kind, position, other)
    SELECT id, 'derived_from', 0, derived_from FROM runs WHERE derived_from IS NOT NULL;
