-- 0013_quarantine: node rows found edited (their outputs no longer hash
-- to their output hash, or their fields no longer describe their key)
-- when a run looked them up. The run took such a row as missing, computed
-- the node again and rewrote the row with what it computed; the row as it
-- was found is kept here, with what was wrong with it, for an audit.
CREATE TABLE quarantine (
    id          INTEGER PRIMARY KEY,
    node        INTEGER NOT NULL REFERENCES nodes (id),
    key         BLOB NOT NULL,
    params      TEXT NOT NULL,
    outputs     TEXT NOT NULL,
    output_hash BLOB,
    problem     TEXT NOT NULL,
    run_id      TEXT NOT NULL REFERENCES runs (id),
    found_at    TEXT NOT NULL
);
CREATE INDEX quarantine_by_run ON quarantine (run_id);
