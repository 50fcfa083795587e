-- 0017_packed_nodes: node rows of about a third of their former size.
--
-- Before, a node row held its tool, stage and version as text, its
-- parameters and outputs as canonical text (names, units, strings and
-- every float in decimal, the same lines again in every node of a stage),
-- a 30-character time, and the key in a 32-byte unique index: about 750
-- bytes a node. Now (see ledger/pack.go):
--
-- * kinds: each (tool, stage, version) once; a row names its kind.
-- * shapes: the canonical text of a set of values with its floats replaced
--   by slot references ("n_s f $3 1"); a row stores its parameters and its
--   outputs each as a shape and the slots' float64 bits, 8 bytes each (big
--   endian). The canonical text, of which keys and output hashes are
--   taken, is rebuilt exactly from them. shape_lines holds each shape line
--   by line, for the views. Rows from before keep their text (shape NULL).
-- * kp: the key's first 60 bits as an integer, indexed (a quarter of the
--   key index's size); the key itself is stored whole and compared.
-- * works.summary: deflated behind a zero byte (ledger/summary.go).
-- * recorded_at: Unix seconds (rows from before keep their text).
--
-- The table is node_rows; the view nodes shows every row as before (tool,
-- stage, version, parameters and outputs as text, floats in SQLite's own
-- decimal form), and node_values each value of the packed rows as a row
-- (name, kind, value as a number or text, unit), for the sqlite3 shell.
-- The tables that refer to nodes are rebuilt to refer to node_rows.

DROP VIEW run_nodes;
DROP VIEW run_results;

CREATE TABLE kinds (
    id            INTEGER PRIMARY KEY,
    tool          TEXT NOT NULL,
    stage         TEXT NOT NULL,
    stage_version INTEGER NOT NULL,
    UNIQUE (tool, stage, stage_version)
);
INSERT INTO kinds (tool, stage, stage_version)
    SELECT tool, stage, stage_version FROM node_kinds
    UNION SELECT tool, stage, stage_version FROM nodes
    ORDER BY 1, 2, 3;
DROP TABLE node_kinds;

CREATE TABLE shapes (
    id    INTEGER PRIMARY KEY,
    text  TEXT NOT NULL UNIQUE,  -- canonical text, floats as $<slot>
    slots INTEGER NOT NULL CHECK (slots >= 0)
);

CREATE TABLE shape_lines (
    shape   INTEGER NOT NULL REFERENCES shapes (id),
    line    INTEGER NOT NULL CHECK (line >= 0),
    name    TEXT NOT NULL,
    kind    TEXT NOT NULL CHECK (kind IN ('f', 's')),
    slot    INTEGER,  -- a float's slot; NULL: literal
    literal TEXT,     -- a string, or a float written into the shape
    unit    TEXT,     -- a float's unit
    PRIMARY KEY (shape, line)
) WITHOUT ROWID;

-- 2^(e-1075) for e = 1..2046: the scale of a float64 of biased exponent e
-- (e = 1 also scales the subnormals), so that the views can turn a slot's
-- 8 bytes into a number with no extension function.
CREATE TABLE pow2 (e INTEGER PRIMARY KEY, v REAL NOT NULL);
WITH RECURSIVE up(e, v) AS (SELECT 1075, 1.0 UNION ALL SELECT e + 1, v * 2.0 FROM up WHERE e < 2046),
               down(e, v) AS (SELECT 1074, 0.5 UNION ALL SELECT e - 1, v / 2.0 FROM down WHERE e > 1)
INSERT INTO pow2 (e, v) SELECT e, v FROM up UNION ALL SELECT e, v FROM down;

ALTER TABLE nodes RENAME TO nodes_v4;

CREATE TABLE node_rows (
    id            INTEGER PRIMARY KEY,  -- in insertion order
    kp            INTEGER NOT NULL,     -- the key's first 60 bits
    key           BLOB NOT NULL CHECK (length(key) = 32),
    kind          INTEGER NOT NULL REFERENCES kinds (id),
    params_shape  INTEGER REFERENCES shapes (id),  -- NULL: params is canonical text
    params        BLOB NOT NULL,
    description   TEXT,                 -- NULL: re-derived
    outputs_shape INTEGER REFERENCES shapes (id),  -- NULL: outputs is canonical text ('' when failed)
    outputs       BLOB NOT NULL,
    output_hash   BLOB,                 -- SHA-256 of the outputs' canonical text; NULL when failed
    status        TEXT NOT NULL CHECK (status IN ('ok', 'failed')),
    error         TEXT NOT NULL,        -- '' when ok
    duration_ns   INTEGER NOT NULL CHECK (duration_ns >= 0),
    recorded_at   INTEGER NOT NULL,     -- Unix seconds (text in rows from before)
    mac           BLOB,
    CHECK (status = 'failed' OR (length(output_hash) = 32 AND error = '')),
    CHECK (status = 'ok' OR (outputs = '' AND outputs_shape IS NULL AND output_hash IS NULL AND error <> ''))
);
CREATE INDEX node_rows_by_kp ON node_rows (kp);

INSERT INTO node_rows (id, kp, key, kind, params_shape, params, description, outputs_shape, outputs, output_hash, status, error, duration_ns, recorded_at, mac)
SELECT n.id, (instr('0123456789ABCDEF', substr(hex(n.key), 1, 1)) - 1) * 72057594037927936 + (instr('0123456789ABCDEF', substr(hex(n.key), 2, 1)) - 1) * 4503599627370496 + (instr('0123456789ABCDEF', substr(hex(n.key), 3, 1)) - 1) * 281474976710656 + (instr('0123456789ABCDEF', substr(hex(n.key), 4, 1)) - 1) * 17592186044416 + (instr('0123456789ABCDEF', substr(hex(n.key), 5, 1)) - 1) * 1099511627776 + (instr('0123456789ABCDEF', substr(hex(n.key), 6, 1)) - 1) * 68719476736 + (instr('0123456789ABCDEF', substr(hex(n.key), 7, 1)) - 1) * 4294967296 + (instr('0123456789ABCDEF', substr(hex(n.key), 8, 1)) - 1) * 268435456 + (instr('0123456789ABCDEF', substr(hex(n.key), 9, 1)) - 1) * 16777216 + (instr('0123456789ABCDEF', substr(hex(n.key), 10, 1)) - 1) * 1048576 + (instr('0123456789ABCDEF', substr(hex(n.key), 11, 1)) - 1) * 65536 + (instr('0123456789ABCDEF', substr(hex(n.key), 12, 1)) - 1) * 4096 + (instr('0123456789ABCDEF', substr(hex(n.key), 13, 1)) - 1) * 256 + (instr('0123456789ABCDEF', substr(hex(n.key), 14, 1)) - 1) * 16 + (instr('0123456789ABCDEF', substr(hex(n.key), 15, 1)) - 1) * 1,
       n.key, k.id, NULL, n.params, n.description, NULL, n.outputs, n.output_hash, n.status, n.error, n.duration_ns, n.recorded_at, n.mac
FROM nodes_v4 n JOIN kinds k ON k.tool = n.tool AND k.stage = n.stage AND k.stage_version = n.stage_version
ORDER BY n.id;

ALTER TABLE node_inputs RENAME TO node_inputs_v4;
CREATE TABLE node_inputs (
    node     INTEGER NOT NULL REFERENCES node_rows (id),
    position INTEGER NOT NULL CHECK (position >= 0),
    input    INTEGER NOT NULL REFERENCES node_rows (id),
    PRIMARY KEY (node, position)
) WITHOUT ROWID;
INSERT INTO node_inputs (node, position, input) SELECT node, position, input FROM node_inputs_v4;
DROP TABLE node_inputs_v4;
-- No index by input any more: no query asks what consumed a node, and
-- node rows are never deleted (the only use a foreign key has for it).

ALTER TABLE run_result_rows RENAME TO run_result_rows_v4;
ALTER TABLE run_node_links RENAME TO run_node_links_v4;
CREATE TABLE run_node_links (
    run_id      TEXT NOT NULL REFERENCES runs (id),
    ordinal     INTEGER NOT NULL CHECK (ordinal >= 0),
    node        INTEGER NOT NULL REFERENCES node_rows (id),
    action      TEXT NOT NULL CHECK (action IN ('computed', 'reused', 'failed')),
    duration_ns INTEGER NOT NULL CHECK (duration_ns >= 0),
    error       TEXT NOT NULL,
    PRIMARY KEY (run_id, ordinal),
    UNIQUE (run_id, node),
    CHECK ((action = 'failed') = (error <> ''))
) WITHOUT ROWID;
INSERT INTO run_node_links SELECT run_id, ordinal, node, action, duration_ns, error FROM run_node_links_v4;
CREATE TABLE run_result_rows (
    run_id  TEXT NOT NULL,
    ordinal INTEGER NOT NULL,
    label   TEXT NOT NULL,
    node    INTEGER NOT NULL,
    PRIMARY KEY (run_id, ordinal),
    FOREIGN KEY (run_id, node) REFERENCES run_node_links (run_id, node)
) WITHOUT ROWID;
INSERT INTO run_result_rows SELECT run_id, ordinal, label, node FROM run_result_rows_v4;
DROP TABLE run_result_rows_v4;
DROP TABLE run_node_links_v4;

ALTER TABLE quarantine RENAME TO quarantine_v4;
CREATE TABLE quarantine (
    id            INTEGER PRIMARY KEY,
    node          INTEGER NOT NULL REFERENCES node_rows (id),
    key           BLOB NOT NULL,
    params_shape  INTEGER,  -- as in node_rows: the row as it was found
    params        BLOB NOT NULL,
    outputs_shape INTEGER,
    outputs       BLOB NOT NULL,
    output_hash   BLOB,
    problem       TEXT NOT NULL,
    run_id        TEXT NOT NULL REFERENCES runs (id),
    found_at      TEXT NOT NULL
);
INSERT INTO quarantine (id, node, key, params, outputs, output_hash, problem, run_id, found_at)
    SELECT id, node, key, params, outputs, output_hash, problem, run_id, found_at FROM quarantine_v4;
DROP TABLE quarantine_v4;
CREATE INDEX quarantine_by_run ON quarantine (run_id);

DROP TABLE nodes_v4;

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
                THEN (SELECT n.duration_ns FROM node_rows n WHERE n.id = j.value) ELSE 0 END,
           CASE WHEN rw.action = 'computed' AND substr(w.actions, j.key + 1, 1) = 'f'
                THEN json_extract(w.errors, '$.n' || j.key) ELSE '' END
    FROM run_works rw JOIN works w ON w.id = rw.work, json_each(w.nodes) j;

-- The labelled results of each run (both layouts).
CREATE VIEW run_results (run_id, ordinal, label, node) AS
    SELECT run_id, ordinal, label, node FROM run_result_rows
    UNION ALL
    SELECT rw.run_id, rw.base + json_extract(j.value, '$[0]'), json_extract(j.value, '$[1]'), json_extract(j.value, '$[2]')
    FROM run_works rw JOIN works w ON w.id = rw.work, json_each(w.results) j;

-- Each value of each packed row: part 'params' or 'outputs', the line's
-- position in the canonical text, and the value as a number (kind 'f') or
-- text (kind 's'). A slot's 8 bytes become a number by the float64 rule:
-- sign, biased exponent e (scale pow2), 52-bit fraction.
CREATE VIEW node_values (node, part, line, name, kind, value, unit) AS
    SELECT v.node, v.part, v.line, v.name, v.kind,
           CASE WHEN v.kind = 's' THEN v.literal
                WHEN v.h IS NULL THEN CAST(v.literal AS REAL)
                ELSE (CASE WHEN ((instr('0123456789ABCDEF', substr(v.h, 1, 1)) - 1) * 256 + (instr('0123456789ABCDEF', substr(v.h, 2, 1)) - 1) * 16 + (instr('0123456789ABCDEF', substr(v.h, 3, 1)) - 1)) >= 2048 THEN -1.0 ELSE 1.0 END)
                   * (CASE WHEN ((instr('0123456789ABCDEF', substr(v.h, 1, 1)) - 1) * 256 + (instr('0123456789ABCDEF', substr(v.h, 2, 1)) - 1) * 16 + (instr('0123456789ABCDEF', substr(v.h, 3, 1)) - 1)) % 2048 = 0 THEN 0 ELSE 4503599627370496 END
                      + (instr('0123456789ABCDEF', substr(v.h, 4, 1)) - 1) * 281474976710656 + (instr('0123456789ABCDEF', substr(v.h, 5, 1)) - 1) * 17592186044416 + (instr('0123456789ABCDEF', substr(v.h, 6, 1)) - 1) * 1099511627776 + (instr('0123456789ABCDEF', substr(v.h, 7, 1)) - 1) * 68719476736 + (instr('0123456789ABCDEF', substr(v.h, 8, 1)) - 1) * 4294967296 + (instr('0123456789ABCDEF', substr(v.h, 9, 1)) - 1) * 268435456 + (instr('0123456789ABCDEF', substr(v.h, 10, 1)) - 1) * 16777216 + (instr('0123456789ABCDEF', substr(v.h, 11, 1)) - 1) * 1048576 + (instr('0123456789ABCDEF', substr(v.h, 12, 1)) - 1) * 65536 + (instr('0123456789ABCDEF', substr(v.h, 13, 1)) - 1) * 4096 + (instr('0123456789ABCDEF', substr(v.h, 14, 1)) - 1) * 256 + (instr('0123456789ABCDEF', substr(v.h, 15, 1)) - 1) * 16 + (instr('0123456789ABCDEF', substr(v.h, 16, 1)) - 1) * 1)
                   * (SELECT p.v FROM pow2 p WHERE p.e = max(1, ((instr('0123456789ABCDEF', substr(v.h, 1, 1)) - 1) * 256 + (instr('0123456789ABCDEF', substr(v.h, 2, 1)) - 1) * 16 + (instr('0123456789ABCDEF', substr(v.h, 3, 1)) - 1)) % 2048))
           END,
           v.unit
    FROM (SELECT n.id AS node, 'params' AS part, l.line, l.name, l.kind, l.literal, l.unit,
                 CASE WHEN l.slot IS NULL THEN NULL ELSE hex(substr(n.params, 8 * l.slot + 1, 8)) END AS h
          FROM node_rows n JOIN shape_lines l ON l.shape = n.params_shape
          UNION ALL
          SELECT n.id, 'outputs', l.line, l.name, l.kind, l.literal, l.unit,
                 CASE WHEN l.slot IS NULL THEN NULL ELSE hex(substr(n.outputs, 8 * l.slot + 1, 8)) END
          FROM node_rows n JOIN shape_lines l ON l.shape = n.outputs_shape) v;

-- Every node as before 0017: tool, stage and version by name, parameters
-- and outputs as text (a packed row's floats in SQLite's decimal form,
-- which may round the last digit; the canonical text is inflatrace's).
CREATE VIEW nodes (id, key, tool, stage, stage_version, params, description, outputs, output_hash, status, error, duration_ns, recorded_at, mac) AS
    SELECT n.id, n.key, k.tool, k.stage, k.stage_version,
           CASE WHEN n.params_shape IS NULL THEN CAST(n.params AS TEXT)
                ELSE (SELECT group_concat(t, char(10)) || char(10) FROM (SELECT v.name || ' ' || v.kind || ' ' ||
                        CASE v.kind WHEN 's' THEN '"' || v.value || '"' ELSE (CASE WHEN CAST(printf('%.15g', v.value) AS REAL) = v.value THEN printf('%.15g', v.value) ELSE printf('%.17g', v.value) END) || ' ' || v.unit END AS t
                      FROM node_values v WHERE v.node = n.id AND v.part = 'params' ORDER BY v.line)) END,
           n.description,
           CASE WHEN n.outputs_shape IS NULL THEN CAST(n.outputs AS TEXT)
                ELSE (SELECT group_concat(t, char(10)) || char(10) FROM (SELECT v.name || ' ' || v.kind || ' ' ||
                        CASE v.kind WHEN 's' THEN '"' || v.value || '"' ELSE (CASE WHEN CAST(printf('%.15g', v.value) AS REAL) = v.value THEN printf('%.15g', v.value) ELSE printf('%.17g', v.value) END) || ' ' || v.unit END AS t
                      FROM node_values v WHERE v.node = n.id AND v.part = 'outputs' ORDER BY v.line)) END,
           n.output_hash, n.status, n.error, n.duration_ns,
           CASE WHEN typeof(n.recorded_at) = 'integer' THEN strftime('%Y-%m-%dT%H:%M:%SZ', n.recorded_at, 'unixepoch') ELSE n.recorded_at END,
           n.mac
    FROM node_rows n JOIN kinds k ON k.id = n.kind;

-- Each result of each run with the outputs of its node, as a reader of
-- the ledger sees them.
CREATE VIEW results (run_id, ordinal, label, node, key, stage, outputs) AS
    SELECT r.run_id, r.ordinal, r.label, r.node, n.key, n.stage, n.outputs
    FROM run_results r JOIN nodes n ON n.id = r.node;

-- An edit made through the nodes view (by hand, in the sqlite3 shell) is
-- written to node_rows: a changed parameters or outputs text replaces the
-- packed values with that text. Reads check every row as before, so an
-- edit is found and never served; the view only keeps the old layout's
-- way of making one.
CREATE TRIGGER nodes_edit INSTEAD OF UPDATE ON nodes BEGIN
    INSERT OR IGNORE INTO kinds (tool, stage, stage_version) VALUES (NEW.tool, NEW.stage, NEW.stage_version);
    UPDATE node_rows SET
        key = NEW.key,
        kind = (SELECT k.id FROM kinds k WHERE k.tool = NEW.tool AND k.stage = NEW.stage AND k.stage_version = NEW.stage_version),
        params_shape = CASE WHEN NEW.params IS OLD.params THEN params_shape END,
        params = CASE WHEN NEW.params IS OLD.params THEN params ELSE NEW.params END,
        description = NEW.description,
        outputs_shape = CASE WHEN NEW.outputs IS OLD.outputs THEN outputs_shape END,
        outputs = CASE WHEN NEW.outputs IS OLD.outputs THEN outputs ELSE NEW.outputs END,
        output_hash = NEW.output_hash, status = NEW.status, error = NEW.error,
        duration_ns = NEW.duration_ns, mac = NEW.mac
    WHERE id = OLD.id;
END;
