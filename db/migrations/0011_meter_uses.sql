-- 0010: the log of a meter's uses (who used it, when, at what frequency, for what), so that when
-- a meter is found out of tolerance the people who relied on it since its last passing check can
-- be found (ISO/IEC 17025:2017 7.10). A new table only; no existing row changes. A use, once
-- logged, is part of the record: never edited, never deleted (as the audit trail).
CREATE TABLE meter_use (
  id INTEGER PRIMARY KEY,
  meter_id INTEGER NOT NULL REFERENCES meter (id),
  used_at TEXT NOT NULL,
  used_by TEXT NOT NULL,
  frequency_hz REAL NOT NULL CHECK (frequency_hz > 0),
  purpose TEXT NOT NULL CHECK (length(purpose) > 0),
  recorded_at TEXT NOT NULL
);
CREATE INDEX meter_use_meter ON meter_use (meter_id, used_at);
CREATE TRIGGER meter_use_no_update BEFORE UPDATE ON meter_use
BEGIN SELECT RAISE(ABORT, 'a logged use is never changed'); END;
CREATE TRIGGER meter_use_no_delete BEFORE DELETE ON meter_use
BEGIN SELECT RAISE(ABORT, 'a logged use is never deleted'); END;
