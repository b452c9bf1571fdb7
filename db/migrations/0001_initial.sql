-- 0001: the first schema. Checks are events; their content lives in numbered revisions so a
-- signed revision is never overwritten: an amendment is a new revision (ISO/IEC 17025 7.5.2).

CREATE TABLE lab (
  id INTEGER PRIMARY KEY CHECK (id = 1),
  name TEXT NOT NULL,
  address TEXT NOT NULL DEFAULT '',
  accreditation TEXT NOT NULL DEFAULT '',
  decision_rule_json TEXT NOT NULL,
  reliability_target REAL NOT NULL CHECK (reliability_target > 0.5 AND reliability_target < 1),
  interval_min_months INTEGER NOT NULL,
  interval_max_months INTEGER NOT NULL,
  default_u_temperature_c REAL NOT NULL,
  default_u_pressure_hpa REAL NOT NULL,
  default_u_humidity_pct REAL NOT NULL,
  print_suggested_interval INTEGER NOT NULL DEFAULT 0 CHECK (print_suggested_interval IN (0, 1))
);

CREATE TABLE person (
  id INTEGER PRIMARY KEY,
  name TEXT NOT NULL UNIQUE,
  role TEXT NOT NULL CHECK (role IN ('technician', 'reviewer', 'administrator')),
  created_at TEXT NOT NULL
);

CREATE TABLE meter (
  id INTEGER PRIMARY KEY,
  asset_id TEXT NOT NULL UNIQUE,
  description TEXT NOT NULL DEFAULT '',
  construction TEXT NOT NULL CHECK (construction IN ('coaxial', 'waveguide')),
  port TEXT NOT NULL DEFAULT '',
  min_hz REAL NOT NULL CHECK (min_hz > 0),
  max_hz REAL NOT NULL CHECK (max_hz > min_hz),
  dial_kind TEXT NOT NULL CHECK (dial_kind IN ('direct', 'divisions')),
  accuracy_rel_ppm REAL NOT NULL CHECK (accuracy_rel_ppm > 0),
  accuracy_abs_hz REAL NOT NULL DEFAULT 0 CHECK (accuracy_abs_hz >= 0),
  resolution REAL NOT NULL CHECK (resolution > 0),
  alpha_per_k REAL NOT NULL,
  u_alpha_per_k REAL NOT NULL CHECK (u_alpha_per_k >= 0),
  ref_temperature_c REAL NOT NULL,
  ref_pressure_hpa REAL NOT NULL,
  ref_humidity_pct REAL NOT NULL,
  loaded_q REAL NOT NULL CHECK (loaded_q > 0),
  setting_fraction REAL NOT NULL CHECK (setting_fraction >= 0),
  min_dip_db REAL NOT NULL,
  max_input_power_w REAL NOT NULL CHECK (max_input_power_w > 0),
  location TEXT NOT NULL DEFAULT '',
  state TEXT NOT NULL CHECK (state IN ('in-service', 'quarantined', 'withdrawn')),
  interval_months INTEGER NOT NULL CHECK (interval_months > 0),
  created_at TEXT NOT NULL
);

CREATE TABLE meter_chart_point (
  meter_id INTEGER NOT NULL REFERENCES meter (id),
  divisions REAL NOT NULL,
  frequency_hz REAL NOT NULL,
  PRIMARY KEY (meter_id, divisions)
);

CREATE TABLE meter_plan_point (
  meter_id INTEGER NOT NULL REFERENCES meter (id),
  frequency_hz REAL NOT NULL,
  PRIMARY KEY (meter_id, frequency_hz)
);

CREATE TABLE standard (
  id INTEGER PRIMARY KEY,
  asset_id TEXT NOT NULL UNIQUE,
  description TEXT NOT NULL DEFAULT '',
  created_at TEXT NOT NULL
);

CREATE TABLE standard_certificate (
  id INTEGER PRIMARY KEY,
  standard_id INTEGER NOT NULL REFERENCES standard (id),
  certificate_id TEXT NOT NULL,
  issued_by TEXT NOT NULL,
  calibrated_on TEXT NOT NULL,
  due_on TEXT NOT NULL CHECK (due_on > calibrated_on),
  expanded_ppm REAL NOT NULL CHECK (expanded_ppm > 0),
  coverage_k REAL NOT NULL CHECK (coverage_k >= 1),
  UNIQUE (standard_id, certificate_id)
);

CREATE TABLE check_event (
  id INTEGER PRIMARY KEY,
  meter_id INTEGER NOT NULL REFERENCES meter (id),
  created_at TEXT NOT NULL
);
CREATE INDEX check_event_meter ON check_event (meter_id);

CREATE TABLE check_revision (
  id INTEGER PRIMARY KEY,
  check_id INTEGER NOT NULL REFERENCES check_event (id),
  revision INTEGER NOT NULL CHECK (revision >= 1),
  state TEXT NOT NULL CHECK (state IN ('draft', 'signed', 'amended')),
  performed_on TEXT NOT NULL,
  performer_id INTEGER NOT NULL REFERENCES person (id),
  method TEXT NOT NULL CHECK (method IN ('tune-to-dip', 'sweep')),
  temperature_c REAL NOT NULL,
  u_temperature_c REAL NOT NULL,
  pressure_hpa REAL NOT NULL,
  u_pressure_hpa REAL NOT NULL,
  humidity_pct REAL NOT NULL,
  u_humidity_pct REAL NOT NULL,
  adjusted INTEGER NOT NULL CHECK (adjusted IN (0, 1)),
  remarks TEXT NOT NULL DEFAULT '',
  amend_reason TEXT,
  decision_rule_json TEXT NOT NULL,
  engine_version TEXT NOT NULL,
  as_found_verdict TEXT,
  as_left_verdict TEXT,
  worst_used_fraction REAL,
  recorded_at TEXT NOT NULL,
  UNIQUE (check_id, revision)
);
CREATE INDEX check_revision_date ON check_revision (performed_on);

CREATE TABLE check_revision_standard (
  revision_id INTEGER NOT NULL REFERENCES check_revision (id),
  standard_id INTEGER NOT NULL REFERENCES standard (id),
  certificate_id INTEGER NOT NULL REFERENCES standard_certificate (id),
  PRIMARY KEY (revision_id, standard_id)
);

CREATE TABLE check_point (
  id INTEGER PRIMARY KEY,
  revision_id INTEGER NOT NULL REFERENCES check_revision (id),
  seq INTEGER NOT NULL,
  phase TEXT NOT NULL CHECK (phase IN ('as-found', 'as-left')),
  reference_hz REAL NOT NULL CHECK (reference_hz > 0),
  standard_id INTEGER NOT NULL REFERENCES standard (id),
  dip_depth_db REAL,
  error_hz REAL NOT NULL,
  error_ppm REAL NOT NULL,
  expanded_hz REAL NOT NULL,
  coverage_k REAL NOT NULL,
  tolerance_hz REAL NOT NULL,
  verdict TEXT NOT NULL CHECK (verdict IN ('pass', 'conditional-pass', 'conditional-fail', 'fail')),
  result_json TEXT NOT NULL,
  UNIQUE (revision_id, seq)
);

CREATE TABLE reading (
  point_id INTEGER NOT NULL REFERENCES check_point (id),
  seq INTEGER NOT NULL,
  value REAL NOT NULL,
  direction TEXT NOT NULL CHECK (direction IN ('up', 'down')),
  PRIMARY KEY (point_id, seq)
);

-- Append-only, hash-chained (the chain itself is written by the API; see issue on audit).
CREATE TABLE audit_entry (
  id INTEGER PRIMARY KEY,
  at TEXT NOT NULL,
  actor TEXT NOT NULL,
  action TEXT NOT NULL,
  entity TEXT NOT NULL,
  entity_id TEXT NOT NULL,
  before_json TEXT,
  after_json TEXT,
  prev_hash TEXT NOT NULL,
  hash TEXT NOT NULL UNIQUE
);

-- Second line of defence behind the API: the trail is never edited, and content of a revision
-- that is no longer a draft never changes (only its state may move signed -> amended).
CREATE TRIGGER audit_entry_no_update BEFORE UPDATE ON audit_entry
BEGIN SELECT RAISE(ABORT, 'audit entries are append-only'); END;
CREATE TRIGGER audit_entry_no_delete BEFORE DELETE ON audit_entry
BEGIN SELECT RAISE(ABORT, 'audit entries are append-only'); END;

CREATE TRIGGER check_revision_locked BEFORE UPDATE ON check_revision
WHEN OLD.state <> 'draft' AND NOT (OLD.state = 'signed' AND NEW.state = 'amended'
  AND NEW.performed_on IS OLD.performed_on AND NEW.remarks IS OLD.remarks AND NEW.adjusted IS OLD.adjusted
  AND NEW.temperature_c IS OLD.temperature_c AND NEW.pressure_hpa IS OLD.pressure_hpa
  AND NEW.humidity_pct IS OLD.humidity_pct AND NEW.as_found_verdict IS OLD.as_found_verdict
  AND NEW.as_left_verdict IS OLD.as_left_verdict AND NEW.engine_version IS OLD.engine_version)
BEGIN SELECT RAISE(ABORT, 'a signed revision is never changed: amend it as a new revision'); END;
CREATE TRIGGER check_revision_no_delete BEFORE DELETE ON check_revision
WHEN OLD.state <> 'draft'
BEGIN SELECT RAISE(ABORT, 'a signed revision is never deleted'); END;

CREATE TRIGGER check_point_locked_update BEFORE UPDATE ON check_point
WHEN (SELECT state FROM check_revision WHERE id = OLD.revision_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'points of a signed revision are never changed'); END;
CREATE TRIGGER check_point_locked_delete BEFORE DELETE ON check_point
WHEN (SELECT state FROM check_revision WHERE id = OLD.revision_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'points of a signed revision are never deleted'); END;
CREATE TRIGGER reading_locked_update BEFORE UPDATE ON reading
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = OLD.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'readings of a signed revision are never changed'); END;
CREATE TRIGGER reading_locked_delete BEFORE DELETE ON reading
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = OLD.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'readings of a signed revision are never deleted'); END;
