-- 0008: an index on what an audit entry is about, so a meter's trail (its own entries, its checks'
-- and its documents', one query since listAudit takes a meter) and an entity's trail are found
-- without reading the whole trail, which grows for decades. Adds no data and changes no entry.
CREATE INDEX audit_entry_entity ON audit_entry (entity, entity_id);
