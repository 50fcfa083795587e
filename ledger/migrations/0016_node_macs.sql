-- 0016_node_macs: a node's authentication code under its recording
-- user's secret key (HMAC-SHA256, truncated to 128 bits, of its key, status and output hash; see
-- ledger/mac.go). A run reuses a node only when the code is its user's:
-- a row edited consistently (outputs and output hash rewritten) by anyone
-- without the key, or merged from a ledger the user has not vouched for,
-- is computed again instead. NULL: no code (written before codes, merged
-- and not vouched for, or by a ledger opened without a key).
ALTER TABLE nodes ADD COLUMN mac BLOB;

-- The same for works: a work is reused whole only when it carries its
-- user's code over its digest (recorded by them, or vouched for).
ALTER TABLE works ADD COLUMN mac BLOB;
