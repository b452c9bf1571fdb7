// Refused signing attempts (21 CFR Part 11 11.300(d): attempts at unauthorized use are noticed):
// each one is written to the audit trail with who tried, which check and meaning, when and why it
// was refused, never the passphrase; after LOCK_AFTER_FAILURES wrong passphrases within
// LOCK_MINUTES a person may not sign for LOCK_MINUTES after the last of them. Five attempts and
// fifteen minutes are common practice for interactive logins.
import { appendAudit } from '../../../db/queries/audit';
import { SIGN_REFUSED, WRONG_PASSPHRASE, wrongPassphraseTimes } from '../../../db/queries/sign-attempts';
import type { Person } from '../contract';
import type { ServiceContext } from './context';

export { WRONG_PASSPHRASE };
export const LOCKED_OUT = 'locked out after repeated wrong passphrases';
export const LOCK_AFTER_FAILURES = 5;
export const LOCK_MINUTES = 15;
const LOCK_MS = LOCK_MINUTES * 60_000;

/** When the person may sign again (ISO 8601), or undefined when they may sign now. */
export function signingLockedUntil(ctx: ServiceContext, personId: number): string | undefined {
  const now = Date.parse(ctx.clock.now());
  // A lock ends LOCK_MS after the failure that set it, which came LOCK_MS at most after the first
  // of its run: nothing older than twice that matters.
  const times = wrongPassphraseTimes(ctx.db, personId, new Date(now - 2 * LOCK_MS).toISOString()).map((t) =>
    Date.parse(t),
  );
  // Newest first: a run of LOCK_AFTER_FAILURES ending at times[i] within LOCK_MS of each other.
  for (let i = 0; i + LOCK_AFTER_FAILURES - 1 < times.length; i++) {
    const last = times[i] as number;
    const first = times[i + LOCK_AFTER_FAILURES - 1] as number;
    if (last - first <= LOCK_MS && now < last + LOCK_MS) return new Date(last + LOCK_MS).toISOString();
  }
  return undefined;
}

/** Writes one refused attempt to the audit trail, in its own transaction. */
export function recordRefusedAttempt(
  ctx: ServiceContext,
  person: Person,
  checkId: number,
  meaning: string,
  reason: string,
): void {
  ctx.db.transaction(() => {
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: SIGN_REFUSED,
      entity: 'person',
      entityId: String(person.id),
      before: null,
      after: { person: person.name, checkId, meaning, reason },
    });
  })();
}
