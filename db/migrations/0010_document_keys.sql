-- 0010: the certificates that sign issued documents as PDF signatures. The lab's own key
-- (origin 'lab': a self-issued certificate and its PKCS#8 private key, made at init or at the
-- first issue of an older file) and the certificates of PKCS#12 files the lab signed with
-- (origin 'pkcs12': the certificate only; the key stays in the lab's PKCS#12). `verify` with the
-- lab file accepts a document's PDF signature only from one of these. Rows are never changed
-- or deleted: a new key is a new row, and the newest 'lab' row signs.

CREATE TABLE document_key (
  id INTEGER PRIMARY KEY,
  origin TEXT NOT NULL CHECK (origin IN ('lab', 'pkcs12')),
  created_at TEXT NOT NULL,
  fingerprint TEXT NOT NULL UNIQUE CHECK (length(fingerprint) = 64),
  certificate_pem TEXT NOT NULL,
  private_key_pem TEXT,
  CHECK ((origin = 'lab') = (private_key_pem IS NOT NULL))
);

CREATE TRIGGER document_key_no_update BEFORE UPDATE ON document_key
BEGIN SELECT RAISE(ABORT, 'a document-signing certificate is never changed: make a new one'); END;
CREATE TRIGGER document_key_no_delete BEFORE DELETE ON document_key
BEGIN SELECT RAISE(ABORT, 'a document-signing certificate is never deleted'); END;
