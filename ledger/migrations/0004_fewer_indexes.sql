-- 0004_fewer_indexes: no query asks which runs used a node, and nodes are
-- never deleted (so the foreign key from run_nodes needs no child index):
-- the index on run_nodes (key) only slowed every link of a node to a run.
DROP INDEX run_nodes_by_key;
