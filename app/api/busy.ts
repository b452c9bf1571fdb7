// A lab file busy with another writer (another window, a command, an import in another process):
// a write waits for it without blocking the thread, by trying again with backoff, and after
// BUSY_WAIT_MS refuses clearly. Nothing was written by the attempt: every write is one
// transaction, rolled back when SQLite could not take the lock.
import { LabError } from './errors';

/** How long one attempt waits on SQLite's own lock (blocking the thread), milliseconds. */
export const BUSY_ATTEMPT_MS = 100;
/** How long a write keeps trying before it is refused, milliseconds. */
export const BUSY_WAIT_MS = 5000;

export const BUSY_MESSAGE =
  'the lab file is busy with another write (another Dipledger window, a command or an import); nothing was written; try again';

export function isBusy(e: unknown): boolean {
  const code = (e as { code?: unknown } | null)?.code;
  return typeof code === 'string' && /^SQLITE_(BUSY|LOCKED)/.test(code);
}

export function busyError(): LabError {
  return new LabError('busy', BUSY_MESSAGE);
}

/** Runs `attempt` until it is not refused as busy, waiting between tries without blocking; a
 * refusal after `waitMs` becomes the busy LabError. */
export async function retryWhileBusy<T>(attempt: () => Promise<T>, waitMs = BUSY_WAIT_MS): Promise<T> {
  const start = Date.now();
  let delay = 20;
  for (;;) {
    try {
      return await attempt();
    } catch (e) {
      if (!isBusy(e)) throw e;
      if (Date.now() - start + delay > waitMs) throw busyError();
      await new Promise((resolve) => setTimeout(resolve, delay));
      delay = Math.min(delay * 2, 400);
    }
  }
}
