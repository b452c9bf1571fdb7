// Read-only queries for history analysis: a meter's checks (newest revision of each) with the
// numbers of their stored point results that the analysis reads, and the lab-standard
// certificates a check relied on.
import type { Phase, PointResult, Verdict } from '../../app/engine/model';
import { decodeStoredJson as decodeJson } from '../codec/stored-json';
import type { Statement } from 'better-sqlite3';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';
import { combinedHzOfCell, type CombinedHzCell } from './point-combined';

/** One stored point as history analysis sees it: the numbers it reads of the point's stored
 * result. Each is the very number in result_json (the columns are written from the same result,
 * and COMBINED_HZ_SQL gives that value or its JSON text, see point-combined.ts), so the analysis
 * gives the answers it gave when it decoded the whole result (about 2.7 kB of JSON per point). */
export interface HistoryPointRow {
  pointId: number;
  phase: Phase;
  referenceHz: number;
  dipDepthDb: number | null;
  /** result.errorHz (column error_hz). */
  errorHz: number;
  /** result.errorPpm (column error_ppm). */
  errorPpm: number;
  /** result.budget.combinedHz (COMBINED_HZ_SQL). */
  combinedHz: number;
  /** result.decision.toleranceHz (column tolerance_hz). */
  toleranceHz: number;
}

export interface HistoryCheckRow {
  checkId: number;
  revision: number;
  date: string;
  adjusted: boolean;
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  worstUsedFraction: number | null;
  points: HistoryPointRow[];
}

/** A row of HISTORY_SQL, read as an array (about a fifth faster than an object per row at
 * fleet scale): the check's columns, then the point's (null without points). */
type JoinedRow = [
  checkId: number,
  revision: number,
  performedOn: string,
  adjusted: number,
  asFoundVerdict: Verdict | null,
  asLeftVerdict: Verdict | null,
  worstUsedFraction: number | null,
  pointId: number | null,
  phase: Phase | null,
  referenceHz: number | null,
  dipDepthDb: number | null,
  errorHz: number | null,
  errorPpm: number | null,
  toleranceHz: number | null,
  /** result.budget.combinedHz as COMBINED_HZ_SQL gives it. */
  combinedHz: CombinedHzCell,
];

/** A point's combinedHz: its combined_hz cell, else (points written before migration 0009) the
 * JSON text in its stored result. The very expression the history index holds (0009), so SQLite
 * reads it out of the index and parses no stored result. */
export const COMBINED_HZ_SQL = "coalesce(cp.combined_hz, cp.result_json -> '$.budget.combinedHz')";

export const HISTORY_SQL = `WITH newest AS (
    SELECT cr.*, ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
    FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id WHERE ce.meter_id = ?
  )
  SELECT n.check_id, n.revision, n.performed_on, n.adjusted, n.as_found_verdict, n.as_left_verdict,
         n.worst_used_fraction, cp.id, cp.phase, cp.reference_hz, cp.dip_depth_db,
         cp.error_hz, cp.error_ppm, cp.tolerance_hz, ${COMBINED_HZ_SQL}
  FROM newest n LEFT JOIN check_point cp ON cp.revision_id = n.id
  WHERE n.rn = 1
  ORDER BY n.performed_on, n.check_id, cp.seq`;

/** The raw-mode statement of HISTORY_SQL per database handle (kept apart from the shared
 * statement cache, whose statements stay in object mode). */
const HISTORY_STATEMENTS = new WeakMap<LabDb, Statement>();

/** Every check of a meter at its effective revision (newest signed, else newest draft; the
 * register's rule), oldest first, with its points in order. One query: the history of a meter
 * is read often (trend, fit for use, the due list). */
export function meterHistory(db: LabDb, meterId: number): HistoryCheckRow[] {
  let read = HISTORY_STATEMENTS.get(db);
  if (!read) {
    read = db.prepare(HISTORY_SQL).raw(true);
    HISTORY_STATEMENTS.set(db, read);
  }
  return rowsToHistory(read.all(meterId) as JoinedRow[]);
}

function rowsToHistory(rows: JoinedRow[]): HistoryCheckRow[] {
  const out: HistoryCheckRow[] = [];
  for (const r of rows) {
    let c = out[out.length - 1];
    if (!c || c.checkId !== r[0]) {
      c = {
        checkId: r[0],
        revision: r[1],
        date: r[2],
        adjusted: r[3] === 1,
        asFoundVerdict: r[4],
        asLeftVerdict: r[5],
        worstUsedFraction: r[6],
        points: [],
      };
      out.push(c);
    }
    if (r[7] !== null && r[8] !== null && r[9] !== null) {
      c.points.push({
        pointId: r[7],
        phase: r[8],
        referenceHz: r[9],
        dipDepthDb: r[10],
        errorHz: r[11] as number,
        errorPpm: r[12] as number,
        combinedHz: combinedHzOfCell(r[14]),
        toleranceHz: r[13] as number,
      });
    }
  }
  return out;
}

/** The stored results of some points, by point id (the few that fit for use needs in full). */
export function pointResults(db: LabDb, pointIds: readonly number[]): Map<number, PointResult> {
  const read = cachedStatement(db, 'SELECT result_json FROM check_point WHERE id = ?');
  const out = new Map<number, PointResult>();
  for (const id of pointIds) {
    const r = read.get(id) as { result_json: string } | undefined;
    if (r) out.set(id, decodeJson(r.result_json) as PointResult);
  }
  return out;
}

export interface CertificateUsedRow {
  standardAssetId: string;
  certificateId: string;
  calibratedOn: string;
  dueOn: string;
}

/** The certificates of lab standards recorded against a check's effective revision. */
export function certificatesUsed(db: LabDb, checkId: number): CertificateUsedRow[] {
  const rows = db
    .prepare(
      `SELECT s.asset_id, sc.certificate_id, sc.calibrated_on, sc.due_on
       FROM check_revision cr
       JOIN check_revision_standard crs ON crs.revision_id = cr.id
       JOIN standard s ON s.id = crs.standard_id
       JOIN standard_certificate sc ON sc.id = crs.certificate_id
       WHERE cr.id = (SELECT x.id FROM check_revision x WHERE x.check_id = ?
                      ORDER BY (x.state <> 'draft') DESC, x.revision DESC LIMIT 1)
       ORDER BY s.asset_id`,
    )
    .all(checkId) as {
    asset_id: string;
    certificate_id: string;
    calibrated_on: string;
    due_on: string;
  }[];
  return rows.map((r) => ({
    standardAssetId: r.asset_id,
    certificateId: r.certificate_id,
    calibratedOn: r.calibrated_on,
    dueOn: r.due_on,
  }));
}
