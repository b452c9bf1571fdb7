-- 0004: checks being typed. A draft holds the in-progress exchange document (dipledger.check/1,
-- possibly incomplete) so closing the window loses nothing. Drafts are scratch work, not
-- records: they are replaced as they are typed and removed once recorded or discarded, so the
-- audit trail starts when the check is recorded.

CREATE TABLE check_draft (
  id INTEGER PRIMARY KEY,
  meter_asset_id TEXT,
  document_json TEXT NOT NULL CHECK (json_valid(document_json)),
  created_at TEXT NOT NULL,
  updated_at TEXT NOT NULL
);
CREATE INDEX check_draft_updated ON check_draft (updated_at);
