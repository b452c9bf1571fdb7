-- 0005: issued documents. Each certificate or check-sheet that leaves the lab gets a number and
-- a revision, the SHA-256 of its exact bytes and of the record it carries, the bytes themselves
-- (the lab's copy of what was issued), and the signatures it shows. A replacement is a new row
-- that names the row it replaces and why (ISO/IEC 17025:2017 7.8.8); nothing here is ever edited.

CREATE TABLE issued_document (
  id INTEGER PRIMARY KEY,
  kind TEXT NOT NULL CHECK (kind IN ('certificate', 'check-sheet')),
  number TEXT NOT NULL,
  revision INTEGER NOT NULL CHECK (revision >= 1),
  check_revision_id INTEGER NOT NULL REFERENCES check_revision (id),
  issued_at TEXT NOT NULL,
  issued_by TEXT NOT NULL,
  replaces_id INTEGER UNIQUE REFERENCES issued_document (id),
  replace_reason TEXT,
  sha256 TEXT NOT NULL UNIQUE CHECK (length(sha256) = 64),
  record_sha256 TEXT NOT NULL CHECK (length(record_sha256) = 64),
  record_name TEXT NOT NULL,
  byte_length INTEGER NOT NULL CHECK (byte_length > 0),
  pades INTEGER NOT NULL CHECK (pades IN (0, 1)),
  interval_printed INTEGER NOT NULL DEFAULT 0 CHECK (interval_printed IN (0, 1)),
  pdf BLOB NOT NULL,
  UNIQUE (number, revision),
  CHECK ((replaces_id IS NULL) = (replace_reason IS NULL))
);
CREATE INDEX issued_document_revision ON issued_document (check_revision_id);

CREATE TABLE issued_document_signature (
  document_id INTEGER NOT NULL REFERENCES issued_document (id),
  signature_id INTEGER NOT NULL REFERENCES check_signature (id),
  PRIMARY KEY (document_id, signature_id)
);

CREATE TRIGGER issued_document_no_update BEFORE UPDATE ON issued_document
BEGIN SELECT RAISE(ABORT, 'an issued document is never changed: issue a replacement'); END;
CREATE TRIGGER issued_document_no_delete BEFORE DELETE ON issued_document
BEGIN SELECT RAISE(ABORT, 'an issued document is never deleted'); END;
CREATE TRIGGER issued_document_signature_no_update BEFORE UPDATE ON issued_document_signature
BEGIN SELECT RAISE(ABORT, 'the signatures of an issued document are never changed'); END;
CREATE TRIGGER issued_document_signature_no_delete BEFORE DELETE ON issued_document_signature
BEGIN SELECT RAISE(ABORT, 'the signatures of an issued document are never deleted'); END;
