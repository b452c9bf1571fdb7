// Refused signing attempts as the audit trail holds them (action 'sign-refused', about the person
// who tried): the times of the wrong-passphrase ones, newest first, to decide a lockout.
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

export const SIGN_REFUSED = 'sign-refused';
export const WRONG_PASSPHRASE = 'wrong passphrase';

/** The times (ISO 8601) of a person's wrong-passphrase attempts at or after `since`, newest first. */
export function wrongPassphraseTimes(db: LabDb, personId: number, since: string): string[] {
  return cachedStatement(
    db,
    `SELECT at FROM audit_entry WHERE entity = 'person' AND entity_id = ? AND action = '${SIGN_REFUSED}'
       AND at >= ? AND after_json ->> '$.reason' = '${WRONG_PASSPHRASE}' ORDER BY id DESC`,
  )
    .pluck()
    .all(String(personId), since) as string[];
}
