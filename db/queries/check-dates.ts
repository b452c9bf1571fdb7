// The dates a meter's checks were performed on, read once per meter by a bulk import instead of
// one lookup per check (issue 8); findCheckId (checks.ts) still names the check when one matches.
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

/** Every date any revision of a check of the meter was performed on: the dates findCheckId can
 * find a check of this meter on. */
export function checkDatesOfMeter(db: LabDb, meterId: number): Set<string> {
  const rows = cachedStatement(
    db,
    `SELECT DISTINCT cr.performed_on AS date FROM check_event ce JOIN check_revision cr ON cr.check_id = ce.id
       WHERE ce.meter_id = ?`,
  ).all(meterId) as { date: string }[];
  return new Set(rows.map((r) => r.date));
}
