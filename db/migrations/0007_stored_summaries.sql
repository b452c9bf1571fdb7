-- 0007: per-meter summaries of the history analysis kept in the lab file, so that a new process
-- (every CLI command, the app after start-up) reads the register's flags and the interval
-- evidence instead of recomputing every meter's history. Each row is trusted only while its
-- meter's generation (0006) is the one it was made from and `made_by` names the version of the
-- analysis reading it; anything else is recomputed, and rewritten when the file can be written
-- at once. The register's date-dependent words are worked out from a row at each read, so a new
-- day costs nothing here.
-- Derived data only, like the index below: no record lives here, nothing is audited or signed,
-- and dropping the table (or any row of it) or the index loses nothing.
CREATE TABLE meter_summary (
  meter_id INTEGER NOT NULL REFERENCES meter (id),
  kind TEXT NOT NULL CHECK (kind IN ('flags', 'attributes')),
  generation INTEGER NOT NULL,
  made_by TEXT NOT NULL,
  summary_json TEXT NOT NULL,
  PRIMARY KEY (meter_id, kind)
) WITHOUT ROWID;

-- The numbers history analysis reads of each point (db/queries/history.ts meterHistory), in one
-- index, so a meter's history is read from the index alone instead of from every point's row
-- with its stored result (about 5 times less work per meter in a 300-meter fleet; the first
-- register after an import reads every meter). It includes budget.combinedHz out of
-- result_json, the one number without a column, exactly as meterHistory selects it. Cost: about
-- 10 microseconds more per point written, and building it here once (about 1.5 s per 300
-- meters of 25 yearly checks).
CREATE INDEX check_point_history ON check_point (
  revision_id, seq, phase, reference_hz, dip_depth_db, error_hz, error_ppm, tolerance_hz,
  (result_json -> '$.budget.combinedHz')
);
