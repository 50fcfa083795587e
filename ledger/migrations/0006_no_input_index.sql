-- 0006_no_input_index: no query asks which nodes consumed a node (lineage
-- walks upstream, through node_inputs' primary key), and nodes are never
-- deleted or renumbered (so the foreign key from node_inputs (input) needs
-- no child index): the index only cost every recorded input an insert.
DROP INDEX node_inputs_by_input;
