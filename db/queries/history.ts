// Read-only queries for history analysis: a meter's checks (newest revision of each) with their
// stored point results, and the lab-standard certificates a check relied on.
import type { Phase, PointResult, Verdict } from '../../app/engine/model';
import { decodeJson } from '../../app/api/json';
import type { LabDb } from '../store';

export interface HistoryPointRow {
  phase: Phase;
  referenceHz: number;
  dipDepthDb: number | null;
  result: PointResult;
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

interface JoinedRow {
  check_id: number;
  revision: number;
  performed_on: string;
  adjusted: number;
  as_found_verdict: Verdict | null;
  as_left_verdict: Verdict | null;
  worst_used_fraction: number | null;
  phase: Phase | null;
  reference_hz: number | null;
  dip_depth_db: number | null;
  result_json: string | null;
}

/** Every check of a meter at its effective revision (newest signed, else newest draft; the
 * register's rule), oldest first, with its points in order. One query: the history of a meter
 * is read often (trend, fit for use, the due list). */
export function meterHistory(db: LabDb, meterId: number): HistoryCheckRow[] {
  const rows = db
    .prepare(
      `WITH newest AS (
         SELECT cr.*, ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
         FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id WHERE ce.meter_id = ?
       )
       SELECT n.check_id, n.revision, n.performed_on, n.adjusted, n.as_found_verdict, n.as_left_verdict,
              n.worst_used_fraction, cp.phase, cp.reference_hz, cp.dip_depth_db, cp.result_json
       FROM newest n LEFT JOIN check_point cp ON cp.revision_id = n.id
       WHERE n.rn = 1
       ORDER BY n.performed_on, n.check_id, cp.seq`,
    )
    .all(meterId) as JoinedRow[];
  return rowsToHistory(rows);
}

function rowsToHistory(rows: JoinedRow[]): HistoryCheckRow[] {
  const out: HistoryCheckRow[] = [];
  for (const r of rows) {
    let c = out[out.length - 1];
    if (!c || c.checkId !== r.check_id) {
      c = {
        checkId: r.check_id,
        revision: r.revision,
        date: r.performed_on,
        adjusted: r.adjusted === 1,
        asFoundVerdict: r.as_found_verdict,
        asLeftVerdict: r.as_left_verdict,
        worstUsedFraction: r.worst_used_fraction,
        points: [],
      };
      out.push(c);
    }
    if (r.phase !== null && r.reference_hz !== null && r.result_json !== null) {
      c.points.push({
        phase: r.phase,
        referenceHz: r.reference_hz,
        dipDepthDb: r.dip_depth_db,
        result: decodeJson(r.result_json) as PointResult,
      });
    }
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
