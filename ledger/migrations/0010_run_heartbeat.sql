-- 0010_run_heartbeat: when a running run last said it was alive. A run
-- whose heartbeat is older than the stale limit is closed as interrupted
-- by the next run (or "runs --close-stale"), wherever its process ran.
ALTER TABLE runs ADD COLUMN heartbeat_at TEXT;
