-- 0014_seal_signatures: a finished run's seal signed by the key of the
-- user whose inflatrace wrote it (an OpenSSH signature, armored, of
-- ledger.SealMessage); NULL for runs sealed without a key and for runs
-- finished before seals were signed. verify --all checks it against the
-- keys the user trusts: a seal recomputed after an edit no longer matches
-- its signature.
ALTER TABLE runs ADD COLUMN seal_signature TEXT;
