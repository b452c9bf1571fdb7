-- 0010: every audit entry commits to the digest of the entity it changed, as it stood after the
-- change (db/entity-state.ts: the entity's rows, canonical per RFC 8785, SHA-256), so `integrity`
-- finds any row changed, deleted or inserted outside the program. The column is added (ALTER
-- TABLE fires no trigger, and no existing entry changes); the entries written before keep their
-- hashes. After this SQL the migration writes one audited "baseline" entry per entity present
-- (db/baseline.ts), so existing lab files pass `integrity` and are watched from then on.
ALTER TABLE audit_entry ADD COLUMN state_sha256 TEXT;
