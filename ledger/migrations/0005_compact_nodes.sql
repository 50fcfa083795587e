-- 0005_compact_nodes: a layout for scans of millions of nodes.
--
-- Node keys are SHA-256 hashes, so every index keyed on them takes its
-- inserts at random places; in the first layout five indexes were (the
-- node key, each node's inputs by key and by input key, each run's links by
-- key), and a batch of a few hundred nodes rewrote a page of each of them
-- per node once the ledger outgrew the page cache. Here a node has an
-- integer id given in insertion order, inputs, run links and results refer
-- to it by id (so those indexes grow at their ends), and the one random
-- index, the node key's, holds 32-byte blobs instead of 71-character text.
--
-- Keys and output hashes are stored as the 32 raw bytes of the digest
-- (printed with their "sha256:" prefix as before). A node row keeps the
-- tool identity it was described with; its description, the text its key
-- is the hash of, is no longer stored but re-derived on every read from the
-- tool, stage, version, parameters and inputs (whose stage and output hash
-- are those of the input rows, which never change once ok), and checked
-- against the key. Rows copied from the first layout keep their stored
-- description (and an empty tool), checked as before.

DROP INDEX node_inputs_by_input;
ALTER TABLE run_results RENAME TO run_results_v1;
ALTER TABLE run_nodes RENAME TO run_nodes_v1;
ALTER TABLE node_inputs RENAME TO node_inputs_v1;
ALTER TABLE nodes RENAME TO nodes_v1;

CREATE TABLE nodes (
    id            INTEGER PRIMARY KEY,  -- in insertion order
    key           BLOB NOT NULL UNIQUE CHECK (length(key) = 32),
    tool          TEXT NOT NULL,        -- the tool identity in the description
    stage         TEXT NOT NULL,
    stage_version INTEGER NOT NULL,
    params        TEXT NOT NULL,        -- canonical text of the parameters
    description   TEXT,                 -- NULL: re-derived (see above)
    outputs       TEXT NOT NULL,        -- canonical text of the outputs; '' when failed
    output_hash   BLOB,                 -- SHA-256 of outputs; NULL when failed
    status        TEXT NOT NULL CHECK (status IN ('ok', 'failed')),
    error         TEXT NOT NULL,        -- '' when ok
    duration_ns   INTEGER NOT NULL CHECK (duration_ns >= 0),
    recorded_at   TEXT NOT NULL,        -- when this row's current content was written
    CHECK (status = 'failed' OR (length(output_hash) = 32 AND error = '')),
    CHECK (status = 'ok' OR (outputs = '' AND output_hash IS NULL AND error <> ''))
);

-- The upstream nodes of a node, in declared order.
CREATE TABLE node_inputs (
    node     INTEGER NOT NULL REFERENCES nodes (id),
    position INTEGER NOT NULL CHECK (position >= 0),
    input    INTEGER NOT NULL REFERENCES nodes (id),
    PRIMARY KEY (node, position)
) WITHOUT ROWID;

-- Child-key index for the foreign key, and for "what consumed this node".
CREATE INDEX node_inputs_by_input ON node_inputs (input);

-- What each run did with each node it touched, in the order it touched them.
CREATE TABLE run_nodes (
    run_id      TEXT NOT NULL REFERENCES runs (id),
    ordinal     INTEGER NOT NULL CHECK (ordinal >= 0),
    node        INTEGER NOT NULL REFERENCES nodes (id),
    action      TEXT NOT NULL CHECK (action IN ('computed', 'reused', 'failed')),
    duration_ns INTEGER NOT NULL CHECK (duration_ns >= 0),
    error       TEXT NOT NULL,
    PRIMARY KEY (run_id, ordinal),
    UNIQUE (run_id, node),
    CHECK ((action = 'failed') = (error <> ''))
) WITHOUT ROWID;

-- The labelled results of a run; each must be a node the run touched.
CREATE TABLE run_results (
    run_id  TEXT NOT NULL,
    ordinal INTEGER NOT NULL,
    label   TEXT NOT NULL,
    node    INTEGER NOT NULL,
    PRIMARY KEY (run_id, ordinal),
    FOREIGN KEY (run_id, node) REFERENCES run_nodes (run_id, node)
) WITHOUT ROWID;

INSERT INTO nodes (id, key, tool, stage, stage_version, params, description, outputs, output_hash, status, error, duration_ns, recorded_at)
SELECT rowid, unhex(substr(key, 8)), '', stage, stage_version, params, description, outputs,
       CASE WHEN output_hash = '' THEN NULL ELSE unhex(substr(output_hash, 8)) END,
       status, error, duration_ns, recorded_at
FROM nodes_v1 ORDER BY rowid;

INSERT INTO node_inputs (node, position, input)
SELECT n.id, ni.position, u.id
FROM node_inputs_v1 ni
JOIN nodes n ON n.key = unhex(substr(ni.key, 8))
JOIN nodes u ON u.key = unhex(substr(ni.input_key, 8));

INSERT INTO run_nodes (run_id, ordinal, node, action, duration_ns, error)
SELECT rn.run_id, rn.ordinal, n.id, rn.action, rn.duration_ns, rn.error
FROM run_nodes_v1 rn JOIN nodes n ON n.key = unhex(substr(rn.key, 8));

INSERT INTO run_results (run_id, ordinal, label, node)
SELECT rr.run_id, rr.ordinal, rr.label, n.id
FROM run_results_v1 rr JOIN nodes n ON n.key = unhex(substr(rr.key, 8));

DROP TABLE run_results_v1;
DROP TABLE run_nodes_v1;
DROP TABLE node_inputs_v1;
DROP TABLE nodes_v1;
