-- 0002_tags: names for runs ("paper-v1", "referee-2"), usable wherever a run
-- id is accepted. A name points at one run; a run may have several names.
CREATE TABLE tags (
    name       TEXT PRIMARY KEY NOT NULL CHECK (name <> ''),
    run_id     TEXT NOT NULL REFERENCES runs (id),
    created_at TEXT NOT NULL
) WITHOUT ROWID;

CREATE INDEX tags_by_run ON tags (run_id);
