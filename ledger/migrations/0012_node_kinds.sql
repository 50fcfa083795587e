-- 0012_node_kinds: the (tool, stage, version) of which the ledger holds
-- nodes. A key is described with its tool, stage and version, so a node
-- of a kind the ledger has never held cannot be recorded: a run skips
-- looking such keys up (a cold scan of a new study or a new release looks
-- up nothing). Written with the nodes (insertNodeIn; a batch once per kind
-- it holds: a trigger would cost every node insert a statement).
CREATE TABLE node_kinds (
    tool          TEXT NOT NULL,
    stage         TEXT NOT NULL,
    stage_version INTEGER NOT NULL,
    PRIMARY KEY (tool, stage, stage_version)
) WITHOUT ROWID;

INSERT OR IGNORE INTO node_kinds (tool, stage, stage_version)
    SELECT DISTINCT tool, stage, stage_version FROM nodes;
