-- 0003_run_owner: which process runs a run ("host:pid"), so that a run left
-- "running" by a process that was killed can be recognised and closed.
ALTER TABLE runs ADD COLUMN owner TEXT NOT NULL DEFAULT '';
