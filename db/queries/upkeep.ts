// Keeping a lab up to date: a meter's specification revised (the values before and after kept
// whole in meter_revision), a standard's kind, range, new certificates and retirement, a person's
// role and leaving. Rows of 0011; the columns it added are read with SELECT * elsewhere so files
// at older schemas still open in tests that write them.
import type { Meter, MeterRevision, StandardCertificate } from '../../app/model/records';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';
import { meterSpecToRow } from './meters';

interface MeterRevisionRow {
  revision: number;
  effective_from: string;
  reason: string;
  actor: string;
  before_json: string;
  after_json: string;
  recorded_at: string;
}

/** Replaces a meter's specification (its row, chart and plan); the state is not touched here. */
export function updateMeterSpec(db: LabDb, meterId: number, m: Meter): void {
  const info = db
    .prepare(
      `UPDATE meter SET description = @description, construction = @construction, port = @port,
         min_hz = @min_hz, max_hz = @max_hz, dial_kind = @dial_kind, accuracy_rel_ppm = @accuracy_rel_ppm,
         accuracy_abs_hz = @accuracy_abs_hz, resolution = @resolution, alpha_per_k = @alpha_per_k,
         u_alpha_per_k = @u_alpha_per_k, ref_temperature_c = @ref_temperature_c,
         ref_pressure_hpa = @ref_pressure_hpa, ref_humidity_pct = @ref_humidity_pct, loaded_q = @loaded_q,
         setting_fraction = @setting_fraction, min_dip_db = @min_dip_db, max_input_power_w = @max_input_power_w,
         location = @location, interval_months = @interval_months
       WHERE id = @id`,
    )
    .run({ ...meterSpecToRow(m), id: meterId });
  if (info.changes !== 1) throw new Error(`meter ${meterId}: expected 1 row changed, got ${info.changes}`);
  db.prepare('DELETE FROM meter_chart_point WHERE meter_id = ?').run(meterId);
  db.prepare('DELETE FROM meter_plan_point WHERE meter_id = ?').run(meterId);
  const chart = db.prepare(
    'INSERT INTO meter_chart_point (meter_id, divisions, frequency_hz) VALUES (?, ?, ?)',
  );
  for (const c of m.chart) chart.run(meterId, c.divisions, c.frequencyHz);
  const plan = db.prepare('INSERT INTO meter_plan_point (meter_id, frequency_hz) VALUES (?, ?)');
  for (const f of m.planHz) plan.run(meterId, f);
}

export function insertMeterRevision(
  db: LabDb,
  meterId: number,
  r: Omit<MeterRevision, 'revision'> & { before: Meter; after: Meter },
): number {
  const last = db
    .prepare('SELECT max(revision) AS n FROM meter_revision WHERE meter_id = ?')
    .get(meterId) as {
    n: number | null;
  };
  const revision = (last.n ?? 1) + 1;
  db.prepare(
    `INSERT INTO meter_revision (meter_id, revision, effective_from, reason, actor, before_json, after_json, recorded_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
  ).run(
    meterId,
    revision,
    r.effectiveFrom,
    r.reason,
    r.actor,
    JSON.stringify(r.before),
    JSON.stringify(r.after),
    r.recordedAt,
  );
  return revision;
}

/** A meter's specification revisions, oldest first (revision 1, as added, has no row). */
export function meterRevisions(db: LabDb, meterId: number): MeterRevision[] {
  return (
    cachedStatement(db, 'SELECT * FROM meter_revision WHERE meter_id = ? ORDER BY revision').all(
      meterId,
    ) as MeterRevisionRow[]
  ).map((r) => ({
    revision: r.revision,
    effectiveFrom: r.effective_from,
    reason: r.reason,
    actor: r.actor,
    recordedAt: r.recorded_at,
    before: JSON.parse(r.before_json) as Meter,
    after: JSON.parse(r.after_json) as Meter,
  }));
}

export function setStandardKind(
  db: LabDb,
  standardId: number,
  kind: string,
  minHz: number | null,
  maxHz: number | null,
): void {
  // The defaults need no write (and a file at an older schema in a test has no such columns).
  if (kind === 'source' && minHz === null && maxHz === null) return;
  db.prepare('UPDATE standard SET kind = ?, min_hz = ?, max_hz = ? WHERE id = ?').run(
    kind,
    minHz,
    maxHz,
    standardId,
  );
}

export function insertStandardCertificate(db: LabDb, standardId: number, c: StandardCertificate): number {
  const info = db
    .prepare(
      `INSERT INTO standard_certificate (standard_id, certificate_id, issued_by, calibrated_on, due_on, expanded_ppm, coverage_k)
       VALUES (?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      standardId,
      c.certificateId,
      c.issuedBy,
      c.calibratedOn,
      c.dueOn,
      c.expandedUncertaintyPpm,
      c.coverageFactor,
    );
  const id = Number(info.lastInsertRowid);
  if (c.asFoundPpm !== undefined)
    db.prepare('UPDATE standard_certificate SET as_found_ppm = ? WHERE id = ?').run(c.asFoundPpm, id);
  return id;
}

export function retireStandardRow(db: LabDb, standardId: number, on: string, reason: string): void {
  const info = db
    .prepare('UPDATE standard SET retired_on = ?, retired_reason = ? WHERE id = ? AND retired_on IS NULL')
    .run(on, reason, standardId);
  if (info.changes !== 1)
    throw new Error(`standard ${standardId}: expected 1 row changed, got ${info.changes}`);
}

export function setPersonRole(db: LabDb, personId: number, role: string): void {
  const info = db.prepare('UPDATE person SET role = ? WHERE id = ?').run(role, personId);
  if (info.changes !== 1) throw new Error(`person ${personId}: expected 1 row changed, got ${info.changes}`);
}

export function setPersonLeft(db: LabDb, personId: number, on: string): void {
  const info = db.prepare('UPDATE person SET left_on = ? WHERE id = ? AND left_on IS NULL').run(on, personId);
  if (info.changes !== 1) throw new Error(`person ${personId}: expected 1 row changed, got ${info.changes}`);
}
