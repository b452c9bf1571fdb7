-- 0011: keeping a lab up to date. A meter's specification is edited as a numbered revision with
-- its reason and the day it takes effect (the values before and after kept whole, never edited);
-- a standard has a kind and a frequency range, records the as-found deviation its certificate
-- reports, and may be retired with a reason; a person may leave (keeps their signatures, signs no
-- more). Schema only: existing rows keep their meaning (no revision yet, not retired, not left).

CREATE TABLE meter_revision (
  id INTEGER PRIMARY KEY,
  meter_id INTEGER NOT NULL REFERENCES meter (id),
  revision INTEGER NOT NULL CHECK (revision >= 2),
  effective_from TEXT NOT NULL,
  reason TEXT NOT NULL CHECK (length(reason) > 0),
  actor TEXT NOT NULL,
  before_json TEXT NOT NULL,
  after_json TEXT NOT NULL,
  recorded_at TEXT NOT NULL,
  UNIQUE (meter_id, revision)
);
CREATE TRIGGER meter_revision_no_update BEFORE UPDATE ON meter_revision
BEGIN SELECT RAISE(ABORT, 'a meter revision is never changed: edit the specification again'); END;
CREATE TRIGGER meter_revision_no_delete BEFORE DELETE ON meter_revision
BEGIN SELECT RAISE(ABORT, 'a meter revision is never deleted'); END;

ALTER TABLE standard ADD COLUMN kind TEXT NOT NULL DEFAULT 'source'
  CHECK (kind IN ('source', 'counter', 'other'));
ALTER TABLE standard ADD COLUMN min_hz REAL CHECK (min_hz IS NULL OR min_hz > 0);
ALTER TABLE standard ADD COLUMN max_hz REAL CHECK (max_hz IS NULL OR max_hz > min_hz);
ALTER TABLE standard ADD COLUMN retired_on TEXT;
ALTER TABLE standard ADD COLUMN retired_reason TEXT;

-- The deviation the issuing body found before adjusting, relative, ppm (null: not reported).
ALTER TABLE standard_certificate ADD COLUMN as_found_ppm REAL;

ALTER TABLE person ADD COLUMN left_on TEXT;
