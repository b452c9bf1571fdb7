-- 0002: records that hold up in an audit. Signing keys of people (private key encrypted at
-- rest), signatures over a revision's canonical form (21 CFR Part 11 11.50, 11.70, 11.200),
-- who amended a revision and why (ISO/IEC 17025:2017 7.5.2), the lab's traceability policy and
-- the exceptions it let through, and triggers that keep all of it from being edited.

-- Whether performer and reviewer must be different people; whether a standard out of its
-- calibration on the check date refuses the check (strict) or records a visible exception.
ALTER TABLE lab ADD COLUMN signers_must_differ INTEGER NOT NULL DEFAULT 1
  CHECK (signers_must_differ IN (0, 1));
ALTER TABLE lab ADD COLUMN traceability_policy TEXT NOT NULL DEFAULT 'strict'
  CHECK (traceability_policy IN ('strict', 'permissive'));

-- One Ed25519 key pair per person who signs. The private key is PKCS#8 DER encrypted with
-- AES-256-GCM under a key derived from the person's passphrase by scrypt; the parameters are
-- kept beside it so they can be raised later without losing old keys. Keys are never edited:
-- a new key is a new row, and old signatures keep naming the key they were made with.
CREATE TABLE person_key (
  id INTEGER PRIMARY KEY,
  person_id INTEGER NOT NULL REFERENCES person (id),
  public_key_pem TEXT NOT NULL,
  fingerprint TEXT NOT NULL UNIQUE,
  kdf TEXT NOT NULL CHECK (kdf = 'scrypt'),
  kdf_n INTEGER NOT NULL CHECK (kdf_n >= 16384),
  kdf_r INTEGER NOT NULL CHECK (kdf_r >= 1),
  kdf_p INTEGER NOT NULL CHECK (kdf_p >= 1),
  salt_b64 TEXT NOT NULL,
  iv_b64 TEXT NOT NULL,
  tag_b64 TEXT NOT NULL,
  encrypted_private_key_b64 TEXT NOT NULL,
  created_at TEXT NOT NULL
);
CREATE INDEX person_key_person ON person_key (person_id);

CREATE TRIGGER person_key_no_update BEFORE UPDATE ON person_key
BEGIN SELECT RAISE(ABORT, 'a signing key is never changed: add a new key instead'); END;
CREATE TRIGGER person_key_no_delete BEFORE DELETE ON person_key
BEGIN SELECT RAISE(ABORT, 'a signing key is never deleted: old signatures are verified with it'); END;

-- Who made a revision that amends an earlier one (amend_reason says why, recorded_at when),
-- and the traceability exceptions a permissive lab recorded instead of refusing.
ALTER TABLE check_revision ADD COLUMN amended_by TEXT;
ALTER TABLE check_revision ADD COLUMN traceability_exceptions_json TEXT;

-- A signature: the printed name, role, time and meaning shown with it, the key it was made
-- with, and the SHA-256 of the exact canonical bytes (RFC 8785) it covers.
CREATE TABLE check_signature (
  id INTEGER PRIMARY KEY,
  revision_id INTEGER NOT NULL REFERENCES check_revision (id),
  seq INTEGER NOT NULL CHECK (seq >= 1),
  person_id INTEGER NOT NULL REFERENCES person (id),
  key_id INTEGER NOT NULL REFERENCES person_key (id),
  printed_name TEXT NOT NULL,
  role TEXT NOT NULL,
  meaning TEXT NOT NULL CHECK (meaning IN ('performed', 'reviewed', 'approved')),
  signed_at TEXT NOT NULL,
  payload_sha256 TEXT NOT NULL,
  signature_b64 TEXT NOT NULL,
  UNIQUE (revision_id, seq),
  UNIQUE (revision_id, meaning)
);

CREATE TRIGGER check_signature_no_update BEFORE UPDATE ON check_signature
BEGIN SELECT RAISE(ABORT, 'a signature is never changed'); END;
CREATE TRIGGER check_signature_no_delete BEFORE DELETE ON check_signature
BEGIN SELECT RAISE(ABORT, 'a signature is never deleted'); END;

-- 0001 let a signed revision move to 'amended' while comparing only some columns; now every
-- column must stay as it was, and a draft becomes signed only once a signature exists.
DROP TRIGGER check_revision_locked;
CREATE TRIGGER check_revision_locked BEFORE UPDATE ON check_revision
WHEN OLD.state <> 'draft' AND NOT (OLD.state = 'signed' AND NEW.state = 'amended'
  AND NEW.id IS OLD.id AND NEW.check_id IS OLD.check_id AND NEW.revision IS OLD.revision
  AND NEW.performed_on IS OLD.performed_on AND NEW.performer_id IS OLD.performer_id
  AND NEW.method IS OLD.method AND NEW.temperature_c IS OLD.temperature_c
  AND NEW.u_temperature_c IS OLD.u_temperature_c AND NEW.pressure_hpa IS OLD.pressure_hpa
  AND NEW.u_pressure_hpa IS OLD.u_pressure_hpa AND NEW.humidity_pct IS OLD.humidity_pct
  AND NEW.u_humidity_pct IS OLD.u_humidity_pct AND NEW.adjusted IS OLD.adjusted
  AND NEW.remarks IS OLD.remarks AND NEW.amend_reason IS OLD.amend_reason
  AND NEW.decision_rule_json IS OLD.decision_rule_json AND NEW.engine_version IS OLD.engine_version
  AND NEW.as_found_verdict IS OLD.as_found_verdict AND NEW.as_left_verdict IS OLD.as_left_verdict
  AND NEW.worst_used_fraction IS OLD.worst_used_fraction AND NEW.recorded_at IS OLD.recorded_at
  AND NEW.amended_by IS OLD.amended_by
  AND NEW.traceability_exceptions_json IS OLD.traceability_exceptions_json)
BEGIN SELECT RAISE(ABORT, 'a signed revision is never changed: amend it as a new revision'); END;

CREATE TRIGGER check_revision_signed_needs_signature BEFORE UPDATE OF state ON check_revision
WHEN NEW.state <> 'draft' AND OLD.state = 'draft'
  AND NOT EXISTS (SELECT 1 FROM check_signature s WHERE s.revision_id = OLD.id)
BEGIN SELECT RAISE(ABORT, 'a revision becomes signed only with a signature'); END;

CREATE TRIGGER check_revision_born_draft BEFORE INSERT ON check_revision
WHEN NEW.state <> 'draft'
BEGIN SELECT RAISE(ABORT, 'a revision is written as a draft and signed afterwards'); END;

-- Nothing may be added to, or taken from, a revision once it is signed.
CREATE TRIGGER check_point_locked_insert BEFORE INSERT ON check_point
WHEN (SELECT state FROM check_revision WHERE id = NEW.revision_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'points are never added to a signed revision'); END;
CREATE TRIGGER reading_locked_insert BEFORE INSERT ON reading
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = NEW.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'readings are never added to a signed revision'); END;
CREATE TRIGGER check_revision_standard_locked_insert BEFORE INSERT ON check_revision_standard
WHEN (SELECT state FROM check_revision WHERE id = NEW.revision_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'standards are never added to a signed revision'); END;
CREATE TRIGGER check_revision_standard_locked_update BEFORE UPDATE ON check_revision_standard
WHEN (SELECT state FROM check_revision WHERE id = OLD.revision_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'standards of a signed revision are never changed'); END;
CREATE TRIGGER check_revision_standard_locked_delete BEFORE DELETE ON check_revision_standard
WHEN (SELECT state FROM check_revision WHERE id = OLD.revision_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'standards of a signed revision are never deleted'); END;
