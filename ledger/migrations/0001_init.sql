-- 0001_init: the initial ledger schema.
--
-- Times are UTC RFC 3339 text with a fixed nine-digit fraction, so that text
-- order is time order. Durations are integer nanoseconds. Values (params,
-- outputs) are the canonical text written by pipeline.Values.Encode; hashes
-- carry their algorithm prefix ("sha256:").

-- Marks the file as an inflatrace ledger ("inft"), so that Open refuses a
-- database that belongs to something else.
PRAGMA application_id = 1768842868;

-- One row per invocation of a configuration.
CREATE TABLE runs (
    id           TEXT PRIMARY KEY NOT NULL CHECK (id <> ''),
    started_at   TEXT NOT NULL,
    finished_at  TEXT,                -- NULL while running
    tool_version TEXT NOT NULL,
    config_path  TEXT NOT NULL,       -- as given by the user; informational
    config_text  TEXT NOT NULL,       -- the exact configuration bytes
    config_hash  TEXT NOT NULL,       -- prefixed SHA-256 of config_text
    status       TEXT NOT NULL CHECK (status IN ('running', 'succeeded', 'failed')),
    error        TEXT NOT NULL DEFAULT '',
    CHECK ((status = 'running') = (finished_at IS NULL))
);

-- Runs are listed newest first and "latest" resolves through this index.
CREATE INDEX runs_by_start ON runs (started_at);

-- One row per node key: the content-addressed cache. A failed row carries
-- its error and no outputs; it may later become ok (the only update allowed),
-- an ok row never changes. An ordinary rowid table: its rows are large
-- (description and outputs), which WITHOUT ROWID stores poorly.
CREATE TABLE nodes (
    key           TEXT PRIMARY KEY NOT NULL,
    stage         TEXT NOT NULL,
    stage_version INTEGER NOT NULL,
    params        TEXT NOT NULL,      -- canonical text of the parameters
    description   TEXT NOT NULL,      -- the text key is the hash of
    outputs       TEXT NOT NULL,      -- canonical text of the outputs; '' when failed
    output_hash   TEXT NOT NULL,      -- hash of outputs; '' when failed
    status        TEXT NOT NULL CHECK (status IN ('ok', 'failed')),
    error         TEXT NOT NULL,      -- '' when ok
    duration_ns   INTEGER NOT NULL CHECK (duration_ns >= 0),
    recorded_at   TEXT NOT NULL,      -- when this row's current content was written
    CHECK (status = 'failed' OR (output_hash <> '' AND error = '')),
    CHECK (status = 'ok' OR (outputs = '' AND output_hash = '' AND error <> ''))
);

-- The upstream nodes of a node, in declared order, with the output hash
-- each contributed to the node's key.
CREATE TABLE node_inputs (
    key               TEXT NOT NULL REFERENCES nodes (key),
    position          INTEGER NOT NULL CHECK (position >= 0),
    input_key         TEXT NOT NULL REFERENCES nodes (key),
    input_stage       TEXT NOT NULL,
    input_output_hash TEXT NOT NULL,
    PRIMARY KEY (key, position)
) WITHOUT ROWID;

-- Child-key index for the foreign key, and for "what consumed this node".
CREATE INDEX node_inputs_by_input ON node_inputs (input_key);

-- What each run did with each node it touched, in the order it touched them.
CREATE TABLE run_nodes (
    run_id      TEXT NOT NULL REFERENCES runs (id),
    key         TEXT NOT NULL REFERENCES nodes (key),
    action      TEXT NOT NULL CHECK (action IN ('computed', 'reused', 'failed')),
    duration_ns INTEGER NOT NULL CHECK (duration_ns >= 0),
    error       TEXT NOT NULL,
    ordinal     INTEGER NOT NULL CHECK (ordinal >= 0),
    PRIMARY KEY (run_id, key),
    UNIQUE (run_id, ordinal),
    CHECK ((action = 'failed') = (error <> ''))
) WITHOUT ROWID;

-- Child-key index for the foreign key, and for "which runs used this node".
CREATE INDEX run_nodes_by_key ON run_nodes (key);

-- The labelled results of a run; each must be a node the run touched.
CREATE TABLE run_results (
    run_id  TEXT NOT NULL,
    ordinal INTEGER NOT NULL,
    label   TEXT NOT NULL,
    key     TEXT NOT NULL,
    PRIMARY KEY (run_id, ordinal),
    FOREIGN KEY (run_id, key) REFERENCES run_nodes (run_id, key)
) WITHOUT ROWID;
