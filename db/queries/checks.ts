// Checks: an event per calibration, its numbered revisions, points and readings.
import type { CheckRecord, CheckState, CheckSummary } from '../../app/model/records';
import type { Conditions, DecisionRule, PointResult, Reading, Verdict } from '../../app/engine/model';
import { decodeStoredJson as decodeJson, encodeJson } from '../codec/stored-json';
import { packPointResult } from '../codec/point-pack';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';
import { combinedHzCell, type CombinedHzCell } from './point-combined';

export interface NewCheckRevision {
  meterId: number;
  performerId: number;
  date: string;
  method: CheckRecord['method'];
  conditions: Conditions;
  adjusted: boolean;
  remarks: string;
  decisionRule: DecisionRule;
  engineVersion: string;
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  worstUsedFraction: number | null;
  /** standard id -> certificate row id used on the check date */
  standards: { standardId: number; certificateRowId: number }[];
  points: {
    phase: 'as-found' | 'as-left';
    referenceHz: number;
    standardId: number;
    dipDepthDb: number | null;
    readings: Reading[];
    result: PointResult;
  }[];
  /** Standards used outside their calibration, recorded under a permissive lab policy. */
  traceabilityExceptions?: string[];
  /** Set on a revision that amends an earlier one (ISO/IEC 17025:2017 7.5.2). */
  amendment?: { reason: string; by: string };
}

/** A point as the store writes it: its columns, its result as the stored text, its readings.
 * Made apart from the insert so that a bulk import can make it on one thread and write it on
 * another (app/api/import-writer.ts); plain data, so it crosses between threads as it is. */
export interface PointRowData {
  phase: 'as-found' | 'as-left';
  referenceHz: number;
  standardId: number;
  dipDepthDb: number | null;
  errorHz: number;
  errorPpm: number;
  expandedHz: number;
  coverageK: number;
  toleranceHz: number;
  verdict: Verdict;
  resultText: string;
  /** result.budget.combinedHz as check_point.combined_hz holds it (point-combined.ts). */
  combinedHz: CombinedHzCell;
  readings: Reading[];
}

/** A revision as the store writes it (see PointRowData). */
export type RevisionRowData = Omit<NewCheckRevision, 'points'> & { points: PointRowData[] };

export function pointRowData(p: NewCheckRevision['points'][number]): PointRowData {
  return {
    phase: p.phase,
    referenceHz: p.referenceHz,
    standardId: p.standardId,
    dipDepthDb: p.dipDepthDb,
    errorHz: p.result.errorHz,
    errorPpm: p.result.errorPpm,
    expandedHz: p.result.budget.expandedHz,
    coverageK: p.result.budget.coverageFactor,
    toleranceHz: p.result.decision.toleranceHz,
    verdict: p.result.decision.verdict,
    // Packed (budget lines shortened): the same value when read back, see point-pack.ts.
    resultText: packPointResult(p.result) ?? encodeJson(p.result),
    combinedHz: combinedHzCell(p.result.budget.combinedHz),
    readings: p.readings,
  };
}

export function revisionRowData(c: NewCheckRevision): RevisionRowData {
  const { points, ...revision } = c;
  return { ...revision, points: points.map(pointRowData) };
}

/** Writes a new check (revision 1, unsigned) and returns its id. Call inside a transaction. */
export function insertCheck(db: LabDb, c: NewCheckRevision | RevisionRowData, recordedAt: string): number {
  const checkId = Number(
    cachedStatement(db, 'INSERT INTO check_event (meter_id, created_at) VALUES (?, ?)').run(
      c.meterId,
      recordedAt,
    ).lastInsertRowid,
  );
  insertRevision(db, checkId, 1, c, recordedAt);
  return checkId;
}

/** Writes revision `revision` of a check as a draft, with its standards, points and readings;
 * returns the revision's row id. Call inside a transaction. */
export function insertRevision(
  db: LabDb,
  checkId: number,
  revision: number,
  c: NewCheckRevision | RevisionRowData,
  recordedAt: string,
): number {
  const exceptions = c.traceabilityExceptions?.length ? JSON.stringify(c.traceabilityExceptions) : null;
  const revisionId = Number(
    cachedStatement(
      db,
      `INSERT INTO check_revision (check_id, revision, state, performed_on, performer_id, method, temperature_c,
           u_temperature_c, pressure_hpa, u_pressure_hpa, humidity_pct, u_humidity_pct, adjusted, remarks,
           decision_rule_json, engine_version, as_found_verdict, as_left_verdict, worst_used_fraction, recorded_at,
           amend_reason, amended_by, traceability_exceptions_json)
         VALUES (?, ?, 'draft', ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    ).run(
      checkId,
      revision,
      c.date,
      c.performerId,
      c.method,
      c.conditions.temperatureC,
      c.conditions.temperatureUncertaintyC,
      c.conditions.pressureHpa,
      c.conditions.pressureUncertaintyHpa,
      c.conditions.humidityPct,
      c.conditions.humidityUncertaintyPct,
      c.adjusted ? 1 : 0,
      c.remarks,
      JSON.stringify(c.decisionRule),
      c.engineVersion,
      c.asFoundVerdict,
      c.asLeftVerdict,
      c.worstUsedFraction,
      recordedAt,
      c.amendment?.reason ?? null,
      c.amendment?.by ?? null,
      exceptions,
    ).lastInsertRowid,
  );
  const std = cachedStatement(
    db,
    'INSERT INTO check_revision_standard (revision_id, standard_id, certificate_id) VALUES (?, ?, ?)',
  );
  for (const s of c.standards) std.run(revisionId, s.standardId, s.certificateRowId);
  const pt = cachedStatement(
    db,
    `INSERT INTO check_point (revision_id, seq, phase, reference_hz, standard_id, dip_depth_db, error_hz, error_ppm,
       expanded_hz, coverage_k, tolerance_hz, verdict, result_json, combined_hz)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  c.points.forEach((point, i) => {
    const p = 'resultText' in point ? point : pointRowData(point);
    const pointId = Number(
      pt.run(
        revisionId,
        i + 1,
        p.phase,
        p.referenceHz,
        p.standardId,
        p.dipDepthDb,
        p.errorHz,
        p.errorPpm,
        p.expandedHz,
        p.coverageK,
        p.toleranceHz,
        p.verdict,
        p.resultText,
        p.combinedHz,
      ).lastInsertRowid,
    );
    insertReadings(db, pointId, p.readings);
  });
  return revisionId;
}

/** A point's readings in one statement (a bulk import writes four for each of its points): the
 * same rows, in the same order, as one INSERT per reading. */
function insertReadings(db: LabDb, pointId: number, readings: readonly Reading[]): void {
  for (let from = 0; from < readings.length; from += READINGS_PER_STATEMENT) {
    const part = readings.slice(from, from + READINGS_PER_STATEMENT);
    const values: (number | string)[] = [];
    part.forEach((r, j) => values.push(pointId, from + j + 1, r.value, r.direction));
    cachedStatement(db, readingsSql(part.length)).run(values);
  }
}

const READINGS_PER_STATEMENT = 16;
const READINGS_SQL: string[] = [];
const readingsSql = (n: number): string =>
  (READINGS_SQL[n] ??=
    `INSERT INTO reading (point_id, seq, value, direction) VALUES ${Array(n).fill('(?, ?, ?, ?)').join(', ')}`);

interface RevisionRow {
  id: number;
  check_id: number;
  revision: number;
  state: CheckState;
  performed_on: string;
  performer: string;
  method: CheckRecord['method'];
  temperature_c: number;
  u_temperature_c: number;
  pressure_hpa: number;
  u_pressure_hpa: number;
  humidity_pct: number;
  u_humidity_pct: number;
  adjusted: number;
  remarks: string;
  engine_version: string;
  as_found_verdict: Verdict | null;
  as_left_verdict: Verdict | null;
  worst_used_fraction: number | null;
  recorded_at: string;
  asset_id: string;
}

/** A revision of a check in full: the one asked for, or else the effective one (the newest
 * signed revision; for a check never signed, its newest draft). */
export function getCheck(db: LabDb, checkId: number, revision?: number): CheckRecord | undefined {
  const r = db
    .prepare(
      `SELECT cr.*, p.name AS performer, m.asset_id FROM check_revision cr
       JOIN check_event ce ON ce.id = cr.check_id JOIN meter m ON m.id = ce.meter_id
       JOIN person p ON p.id = cr.performer_id
       WHERE cr.check_id = ? AND (? IS NULL OR cr.revision = ?)
       ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC LIMIT 1`,
    )
    .get(checkId, revision ?? null, revision ?? null) as RevisionRow | undefined;
  if (!r) return undefined;
  const standards = (
    db
      .prepare(
        `SELECT s.asset_id FROM check_revision_standard crs JOIN standard s ON s.id = crs.standard_id
         WHERE crs.revision_id = ? ORDER BY s.asset_id`,
      )
      .all(r.id) as { asset_id: string }[]
  ).map((s) => s.asset_id);
  const points = db
    .prepare(
      `SELECT cp.id, cp.seq, cp.phase, cp.reference_hz, cp.dip_depth_db, cp.result_json, s.asset_id AS standard
       FROM check_point cp JOIN standard s ON s.id = cp.standard_id WHERE cp.revision_id = ? ORDER BY cp.seq`,
    )
    .all(r.id) as {
    id: number;
    seq: number;
    phase: 'as-found' | 'as-left';
    reference_hz: number;
    dip_depth_db: number | null;
    result_json: string;
    standard: string;
  }[];
  const readingsOf = db.prepare('SELECT value, direction FROM reading WHERE point_id = ? ORDER BY seq');
  return {
    checkId: r.check_id,
    revision: r.revision,
    state: r.state,
    meterAssetId: r.asset_id,
    date: r.performed_on,
    performer: r.performer,
    standards,
    method: r.method,
    conditions: {
      temperatureC: r.temperature_c,
      temperatureUncertaintyC: r.u_temperature_c,
      pressureHpa: r.pressure_hpa,
      pressureUncertaintyHpa: r.u_pressure_hpa,
      humidityPct: r.humidity_pct,
      humidityUncertaintyPct: r.u_humidity_pct,
    },
    adjusted: r.adjusted === 1,
    remarks: r.remarks,
    engineVersion: r.engine_version,
    points: points.map((p) => ({
      seq: p.seq,
      phase: p.phase,
      referenceHz: p.reference_hz,
      standardAssetId: p.standard,
      readings: readingsOf.all(p.id) as Reading[],
      dipDepthDb: p.dip_depth_db,
      result: decodeJson(p.result_json) as PointResult,
    })),
    asFoundVerdict: r.as_found_verdict,
    asLeftVerdict: r.as_left_verdict,
    recordedAt: r.recorded_at,
  };
}

/** Summaries of a meter's checks, newest first, each at its effective revision. */
export function listCheckSummaries(db: LabDb, meterId: number): CheckSummary[] {
  const rows = db
    .prepare(
      `SELECT cr.check_id, cr.revision, cr.state, cr.performed_on, p.name AS performer, cr.as_found_verdict,
              cr.as_left_verdict, cr.worst_used_fraction,
              (SELECT count(*) FROM check_point cp WHERE cp.revision_id = cr.id) AS point_count
       FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id JOIN person p ON p.id = cr.performer_id
       WHERE ce.meter_id = ? AND cr.id = (SELECT x.id FROM check_revision x WHERE x.check_id = cr.check_id
         ORDER BY (x.state <> 'draft') DESC, x.revision DESC LIMIT 1)
       ORDER BY cr.performed_on DESC, cr.check_id DESC`,
    )
    .all(meterId) as {
    check_id: number;
    revision: number;
    state: CheckState;
    performed_on: string;
    performer: string;
    as_found_verdict: Verdict | null;
    as_left_verdict: Verdict | null;
    worst_used_fraction: number | null;
    point_count: number;
  }[];
  return rows.map((r) => ({
    checkId: r.check_id,
    revision: r.revision,
    state: r.state,
    date: r.performed_on,
    performer: r.performer,
    asFoundVerdict: r.as_found_verdict,
    asLeftVerdict: r.as_left_verdict,
    pointCount: r.point_count,
    worstUsedFraction: r.worst_used_fraction,
  }));
}

/** Ids of every check, oldest first (for export). */
export function allCheckIds(db: LabDb): number[] {
  return (
    db
      .prepare(
        `SELECT ce.id FROM check_event ce JOIN check_revision cr ON cr.check_id = ce.id AND cr.revision = 1
         JOIN meter m ON m.id = ce.meter_id ORDER BY cr.performed_on, m.asset_id, ce.id`,
      )
      .all() as { id: number }[]
  ).map((r) => r.id);
}

export function findCheckId(db: LabDb, meterId: number, date: string): number | undefined {
  const r = cachedStatement(
    db,
    `SELECT ce.id FROM check_event ce JOIN check_revision cr ON cr.check_id = ce.id
       WHERE ce.meter_id = ? AND cr.performed_on = ? LIMIT 1`,
  ).get(meterId, date) as { id: number } | undefined;
  return r?.id;
}
