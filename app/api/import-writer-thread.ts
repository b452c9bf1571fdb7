// The writer thread of a bulk import (import-writer.ts): its own connection to the lab file, one
// transaction per import, the checks written as they arrive while the main thread validates and
// computes the next ones. A failure rolls the whole import back, as in the service's own
// transaction, and is reported when the main thread asks to commit.
import { parentPort, workerData } from 'node:worker_threads';
import { openLabDb } from '../../db/store';
import { writeCheckRows, type CheckWrite } from '../../db/queries/check-write';

export type ToWriter =
  | { kind: 'begin' }
  | { kind: 'checks'; checks: CheckWrite[] }
  | { kind: 'commit' }
  | { kind: 'rollback' }
  | { kind: 'close' };

export type FromWriter =
  | { kind: 'ready' }
  | { kind: 'committed'; written: number }
  | { kind: 'rolled-back' }
  | { kind: 'failed'; message: string; code: string | undefined };

const port = parentPort;
if (!port) throw new Error('import-writer-thread runs only as a worker thread');
const post = (m: FromWriter) => port.postMessage(m);

const db = openLabDb((workerData as { file: string }).file);
let open = false;
let written = 0;
let failure: { message: string; code: string | undefined } | undefined;

function end(): void {
  if (open && db.inTransaction) db.exec('ROLLBACK');
  open = false;
}

port.on('message', (m: ToWriter) => {
  switch (m.kind) {
    case 'begin':
      end();
      failure = undefined;
      written = 0;
      try {
        // Taken for the whole import, waiting on busy_timeout as every write of the lab does.
        db.exec('BEGIN IMMEDIATE');
        open = true;
      } catch (e) {
        failure = failureOf(e);
      }
      return;
    case 'checks':
      if (failure || !open) return;
      try {
        for (const c of m.checks) {
          writeCheckRows(db, c);
          written++;
        }
      } catch (e) {
        failure = failureOf(e);
        end();
      }
      return;
    case 'commit':
      if (failure || !open) {
        end();
        post({ kind: 'failed', ...(failure ?? { message: 'no import under way', code: undefined }) });
        return;
      }
      try {
        db.exec('COMMIT');
        open = false;
        post({ kind: 'committed', written });
      } catch (e) {
        end();
        post({ kind: 'failed', ...failureOf(e) });
      }
      return;
    case 'rollback':
      end();
      post({ kind: 'rolled-back' });
      return;
    case 'close':
      end();
      db.close();
      port.close();
      return;
  }
});

function failureOf(e: unknown): { message: string; code: string | undefined } {
  return {
    message: e instanceof Error ? e.message : String(e),
    code: (e as { code?: unknown }).code === undefined ? undefined : String((e as { code?: unknown }).code),
  };
}

post({ kind: 'ready' });
