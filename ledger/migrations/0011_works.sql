-- 0011_works: runs recorded as sequences of works.
--
-- A work is a unit of a run whose whole graph is fixed by a key the front
-- end computes before evaluating anything (a chunk of a study's points:
-- their parameters, the settings, every stage's version, the tool). Its
-- row lists its nodes (ids, in graph order, each once) with what the run
-- that evaluated it did with each, its results and a summary of them (the
-- front end's assembled results), so that a run reusing the work links
-- one row instead of a row per node and per result, and reports without
-- reading the nodes. A work with a failed or skipped node has no key: it
-- is a run's membership only, never reused whole.
--
-- digest is the SHA-256 of the work's account (key, span, each node's key,
-- output hash, status and action, each result, the summary; see
-- ledger/work.go), recomputed from the node rows by verify and by every
-- merge and import; row_check is the SHA-256 of the row's own columns,
-- checked on every read (a look-up does not read the work's nodes).
--
-- The per-node and per-result link tables of earlier runs are kept under
-- new names; run_nodes and run_results become views over both layouts, so
-- that a reader (the sqlite3 shell included) sees every run's nodes and
-- results as before.

ALTER TABLE run_results RENAME TO run_result_rows;
ALTER TABLE run_nodes RENAME TO run_node_links;

CREATE TABLE works (
    id          INTEGER PRIMARY KEY,
    key         BLOB UNIQUE CHECK (key IS NULL OR length(key) = 32),
    nodes       TEXT NOT NULL,  -- JSON array of node ids, in graph order
    actions     TEXT NOT NULL,  -- a letter per node: c computed, r reused, f failed
    results     TEXT NOT NULL,  -- JSON array of [offset, label, node id]
    span        INTEGER NOT NULL CHECK (span >= 0),  -- result ordinals taken, failed included
    errors      TEXT NOT NULL,  -- JSON object: "n<position>" -> the run's error for a failed node
    summary     BLOB NOT NULL,
    digest      BLOB NOT NULL CHECK (length(digest) = 32),
    row_check   BLOB NOT NULL CHECK (length(row_check) = 32),
    recorded_at TEXT NOT NULL
);

-- The works of a run, in order. base is the run's ordinal of the work's
-- first result, node_base that of its first node.
CREATE TABLE run_works (
    run_id    TEXT NOT NULL REFERENCES runs (id),
    position  INTEGER NOT NULL CHECK (position >= 0),
    work      INTEGER NOT NULL REFERENCES works (id),
    base      INTEGER NOT NULL CHECK (base >= 0),
    node_base INTEGER NOT NULL CHECK (node_base >= 0),
    action    TEXT NOT NULL CHECK (action IN ('computed', 'reused')),
    PRIMARY KEY (run_id, position)
) WITHOUT ROWID;

-- Child-key index for the foreign key, and for "which runs used this work".
CREATE INDEX run_works_by_work ON run_works (work);

-- What each run did with each node it touched (both layouts).
CREATE VIEW run_nodes (run_id, ordinal, node, action, duration_ns, error) AS
    SELECT run_id, ordinal, node, action, duration_ns, error FROM run_node_links
    UNION ALL
    SELECT rw.run_id, rw.node_base + j.key, j.value,
           CASE WHEN rw.action = 'reused' THEN 'reused'
                ELSE CASE substr(w.actions, j.key + 1, 1)
                     WHEN 'c' THEN 'computed' WHEN 'r' THEN 'reused' ELSE 'failed' END
           END,
           CASE WHEN rw.action = 'computed' AND substr(w.actions, j.key + 1, 1) <> 'r'
                THEN (SELECT n.duration_ns FROM nodes n WHERE n.id = j.value) ELSE 0 END,
           CASE WHEN rw.action = 'computed' AND substr(w.actions, j.key + 1, 1) = 'f'
                THEN json_extract(w.errors, '$.n' || j.key) ELSE '' END
    FROM run_works rw JOIN works w ON w.id = rw.work, json_each(w.nodes) j;

-- The labelled results of each run (both layouts).
CREATE VIEW run_results (run_id, ordinal, label, node) AS
    SELECT run_id, ordinal, label, node FROM run_result_rows
    UNION ALL
    SELECT rw.run_id, rw.base + json_extract(j.value, '$[0]'), json_extract(j.value, '$[1]'), json_extract(j.value, '$[2]')
    FROM run_works rw JOIN works w ON w.id = rw.work, json_each(w.results) j;
