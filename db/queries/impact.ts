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
 * whose record names the standard and whose date lies in [since, until], oldest first, with every
 * point. Read as arrays (raw mode): this runs over thousands of checks. */
const IMPACT_SQL = `WITH named AS (
    SELECT DISTINCT x.check_id FROM check_revision_standard s JOIN check_revision x ON x.id = s.revision_id
    WHERE s.standard_id = @standardId
  ), eff AS (
    SELECT cr.id, cr.check_id, cr.revision, cr.performed_on, cr.as_found_verdict, cr.as_left_verdict,
           ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
    FROM check_revision cr JOIN named n ON n.check_id = cr.check_id
  )
  SELECT e.check_id, e.revision, ce.meter_id, m.asset_id, e.performed_on, e.as_found_verdict, e.as_left_verdict,
         cp.seq, cp.phase, cp.reference_hz, cp.standard_id, cp.error_hz, cp.error_ppm, cp.expanded_hz, cp.verdict,
         CASE WHEN cp.standard_id = @standardId THEN cp.result_json END
  FROM eff e
  JOIN check_revision_standard crs ON crs.revision_id = e.id AND crs.standard_id = @standardId
  JOIN check_event ce ON ce.id = e.check_id
  JOIN meter m ON m.id = ce.meter_id
  LEFT JOIN check_point cp ON cp.revision_id = e.id
  WHERE e.rn = 1 AND e.performed_on >= @since AND e.performed_on <= @until
  ORDER BY e.performed_on, e.check_id, cp.seq`;

type Row = [
  checkId: number,
  revision: number,
  meterId: number,
  assetId: string,
  date: string,
  asFound: Verdict | null,
  asLeft: Verdict | null,
  seq: number | null,
  phase: Phase | null,
  referenceHz: number | null,
  standardId: number | null,
  errorHz: number | null,
  errorPpm: number | null,
  expandedHz: number | null,
  verdict: Verdict | null,
  resultText: string | null,
];

const STATEMENTS = new WeakMap<LabDb, Statement>();

export function checksNamingStandard(
  db: LabDb,
  standardId: number,
  since: string,
  until: string,
): ImpactCheckRow[] {
  let read = STATEMENTS.get(db);
  if (!read) {
    read = db.prepare(IMPACT_SQL).raw(true);
    STATEMENTS.set(db, read);
  }
  const out: ImpactCheckRow[] = [];
  for (const r of read.all({ standardId, since, until }) as Row[]) {
    let c = out[out.length - 1];
    if (!c || c.checkId !== r[0]) {
      c = {
        checkId: r[0],
        revision: r[1],
        meterId: r[2],
        assetId: r[3],
        date: r[4],
        asFoundVerdict: r[5],
        asLeftVerdict: r[6],
        points: [],
      };
      out.push(c);
    }
    if (r[7] === null) continue;
    c.points.push({
      seq: r[7],
      phase: r[8] as Phase,
      referenceHz: r[9] as number,
      standardId: r[10] as number,
      errorHz: r[11] as number,
      errorPpm: r[12] as number,
      expandedHz: r[13] as number,
      verdict: r[14] as Verdict,
      result: r[15] === null ? null : (decodeJson(r[15]) as PointResult),
    });
  }
  return out;
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
