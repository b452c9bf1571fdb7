-- 0003: sweeps. A check point measured by the sweep method keeps the dial graduation that was set,
-- the raw trace it was judged from and the resonance fitted to it (f0, loaded Q, depth, spurious
-- dips), so the point can be re-computed and audited later. One row per such point.

CREATE TABLE sweep (
  point_id INTEGER PRIMARY KEY REFERENCES check_point (id),
  -- The graduation the dial was set to, in dial units (Hz for direct-reading, divisions otherwise).
  dial_setting REAL NOT NULL,
  source_name TEXT NOT NULL DEFAULT '',
  source_kind TEXT NOT NULL CHECK (source_kind IN ('touchstone', 'delimited', 'typed')),
  level_kind TEXT NOT NULL CHECK (level_kind IN ('touchstone', 'db', 'linear', 'volts', 'ri')),
  point_count INTEGER NOT NULL CHECK (point_count > 0),
  -- Raw trace as little-endian float64: frequency (Hz), then level (linear power or real part),
  -- then the imaginary part for complex traces.
  trace BLOB NOT NULL,
  complex INTEGER NOT NULL CHECK (complex IN (0, 1)),
  method TEXT NOT NULL CHECK (method IN ('scalar-lorentzian', 'complex-circle')),
  f0_hz REAL NOT NULL CHECK (f0_hz > 0),
  u_f0_hz REAL NOT NULL CHECK (u_f0_hz >= 0),
  loaded_q REAL NOT NULL CHECK (loaded_q > 0),
  u_loaded_q REAL NOT NULL,
  depth_db REAL NOT NULL,
  spurious_count INTEGER NOT NULL DEFAULT 0 CHECK (spurious_count >= 0),
  fit_json TEXT NOT NULL
);

-- Like the point it belongs to, a sweep of a revision that is no longer a draft never changes.
CREATE TRIGGER sweep_locked_update BEFORE UPDATE ON sweep
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = OLD.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'sweeps of a signed revision are never changed'); END;
CREATE TRIGGER sweep_locked_delete BEFORE DELETE ON sweep
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = OLD.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'sweeps of a signed revision are never deleted'); END;
