// Impact of a reference found off: the checks whose records name a standard in a window, with
// their points (columns and stored results), and the log of a meter's uses.
import type { Statement } from 'better-sqlite3';
import type { Phase, PointResult, Verdict } from '../../app/engine/model';
import { decodeStoredJson as decodeJson } from '../codec/stored-json';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

export interface ImpactPointRow {
  seq: number;
  phase: Phase;
  referenceHz: number;
  standardId: number;
  errorHz: number;
  errorPpm: number;
  expandedHz: number;
  verdict: Verdict;
  /** The stored result, decoded only for points made with the standard asked about. */
  result: PointResult | null;
}

export interface ImpactCheckRow {
  checkId: number;
  revision: number;
  meterId: number;
  assetId: string;
  date: string;
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  points: ImpactPointRow[];
}

/** Checks at their effective revision (newest signed, else newest draft; the register's rule)
 * whose record names the standard and whose date lies in [since, until], oldest first. The points
 * are read per revision below, in the order of their index, so no sort ever holds their results. */
const CHECKS_SQL = `WITH named AS (
    SELECT DISTINCT x.check_id FROM check_revision_standard s JOIN check_revision x ON x.id = s.revision_id
    WHERE s.standard_id = @standardId
  ), eff AS (
    SELECT cr.id, cr.check_id, cr.revision, cr.performed_on, cr.as_found_verdict, cr.as_left_verdict,
           ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
    FROM check_revision cr JOIN named n ON n.check_id = cr.check_id
  )
  SELECT e.id, e.check_id, e.revision, ce.meter_id, m.asset_id, e.performed_on, e.as_found_verdict, e.as_left_verdict
  FROM eff e
  JOIN check_revision_standard crs ON crs.revision_id = e.id AND crs.standard_id = @standardId
  JOIN check_event ce ON ce.id = e.check_id
  JOIN meter m ON m.id = ce.meter_id
  WHERE e.rn = 1 AND e.performed_on >= @since AND e.performed_on <= @until
  ORDER BY e.performed_on, e.check_id`;

/** A revision's points in order; the stored result only where the point used the standard. */
const POINTS_SQL = `SELECT seq, phase, reference_hz, standard_id, error_hz, error_ppm, expanded_hz, verdict,
    CASE WHEN standard_id = ? THEN result_json END
  FROM check_point WHERE revision_id = ? ORDER BY seq`;

type CheckRow = [
  revisionId: number,
  checkId: number,
  revision: number,
  meterId: number,
  assetId: string,
  date: string,
  asFound: Verdict | null,
  asLeft: Verdict | null,
];

type PointRow = [
  seq: number,
  phase: Phase,
  referenceHz: number,
  standardId: number,
  errorHz: number,
  errorPpm: number,
  expandedHz: number,
  verdict: Verdict,
  resultText: string | null,
];

const STATEMENTS = new WeakMap<LabDb, { checks: Statement; points: Statement }>();

export function checksNamingStandard(
  db: LabDb,
  standardId: number,
  since: string,
  until: string,
): ImpactCheckRow[] {
  let st = STATEMENTS.get(db);
  if (!st) {
    st = { checks: db.prepare(CHECKS_SQL).raw(true), points: db.prepare(POINTS_SQL).raw(true) };
    STATEMENTS.set(db, st);
  }
  const { points } = st;
  return (st.checks.all({ standardId, since, until }) as CheckRow[]).map((r) => ({
    checkId: r[1],
    revision: r[2],
    meterId: r[3],
    assetId: r[4],
    date: r[5],
    asFoundVerdict: r[6],
    asLeftVerdict: r[7],
    points: (points.all(standardId, r[0]) as PointRow[]).map((p) => ({
      seq: p[0],
      phase: p[1],
      referenceHz: p[2],
      standardId: p[3],
      errorHz: p[4],
      errorPpm: p[5],
      expandedHz: p[6],
      verdict: p[7],
      result: p[8] === null ? null : (decodeJson(p[8]) as PointResult),
    })),
  }));
}

export interface MeterUseRow {
  id: number;
  meterId: number;
  usedAt: string;
  usedBy: string;
  frequencyHz: number;
  purpose: string;
}

export function insertMeterUse(db: LabDb, u: Omit<MeterUseRow, 'id'>, recordedAt: string): number {
  return Number(
    cachedStatement(
      db,
      'INSERT INTO meter_use (meter_id, used_at, used_by, frequency_hz, purpose, recorded_at) VALUES (?, ?, ?, ?, ?, ?)',
    ).run(u.meterId, u.usedAt, u.usedBy, u.frequencyHz, u.purpose, recordedAt).lastInsertRowid,
  );
}

/** A meter's uses on or after `since` (an ISO date or date-time; '' for all), oldest first. */
export function meterUsesSince(db: LabDb, meterId: number, since: string): MeterUseRow[] {
  return (
    cachedStatement(
      db,
      `SELECT id, meter_id, used_at, used_by, frequency_hz, purpose FROM meter_use
       WHERE meter_id = ? AND used_at >= ? ORDER BY used_at, id`,
    ).all(meterId, since) as {
      id: number;
      meter_id: number;
      used_at: string;
      used_by: string;
      frequency_hz: number;
      purpose: string;
    }[]
  ).map((r) => ({
    id: r.id,
    meterId: r.meter_id,
    usedAt: r.used_at,
    usedBy: r.used_by,
    frequencyHz: r.frequency_hz,
    purpose: r.purpose,
  }));
}
