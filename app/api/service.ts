// The LabApi implemented over a lab file: the composition root. Every operation is a
// module-level function `(ctx, ...args)` in an operation group under ops/; this file binds them to
// one context (database, clock, actor) and gives callers the async contract. Each operation
// validates its input (shape with zod, meaning against the records), computes with the engine, and
// writes in one transaction: a refusal writes nothing.
//
// Following an operation: recordCheck is ops/checks.ts recordCheck -> checks/prepare.ts
// prepareCheck (validation and the engine) -> checks/write.ts writeCheck -> db/queries/check-write.ts
// writeCheckRows (the SQL).
import { BUSY_ATTEMPT_MS, isBusy, retryWhileBusy } from './busy';
import type { LabDb } from '../../db/store';
import { systemClock, type Clock } from './clock';
import type { LabApi, OperationName } from './contract';
import { OPERATIONS } from './contract';
import type { ContextOps, ServiceContext, SyncOps } from './ops/context';
import { auditOps } from './ops/audit';
import { checkOps, WRITER_THREAD_MIN_CHECKS } from './ops/checks';
import { dccOps } from './ops/dcc';
import { documentOps } from './ops/documents';
import { draftOps } from './ops/drafts';
import { historyOps } from './ops/history';
import { impactOps } from './ops/impact';
import { labOps } from './ops/lab';
import { meterOps } from './ops/meters';
import { meterUpkeepOps } from './ops/meter-upkeep';
import { registerOps } from './ops/register';
import { signingOps } from './ops/signing';
import { standardOps } from './ops/standards';
import { sweepOps } from './ops/sweep';

export { addMonthsIso, daysBetween, fixedClock, systemClock, type Clock } from './clock';
export { worstVerdict } from './checks/spec';
export type { PreparedCheck, PreparedPoint } from './checks/prepared';
export { WRITER_THREAD_MIN_CHECKS } from './ops/checks';
/** The history CSV: its columns and its rows as check documents (app/api/import-csv.ts). */
export { CSV_COLUMNS, csvToDocuments } from './import-csv';

/** Every operation of the contract, from the group that implements it; `satisfies` makes a
 * missing or extra operation a build error. */
const OPS = {
  ...labOps,
  ...meterOps,
  ...meterUpkeepOps,
  ...registerOps,
  ...standardOps,
  ...checkOps,
  ...draftOps,
  ...signingOps,
  ...auditOps,
  ...historyOps,
  ...sweepOps,
  ...documentOps,
  ...dccOps,
  ...impactOps,
} satisfies ContextOps<LabApi>;

export interface ServiceOptions {
  clock?: Clock;
  /** Who the operations are recorded as in the audit trail until people sign in. */
  actor?: string;
  /** The fewest checks an import hands to a writer thread (WRITER_THREAD_MIN_CHECKS; Infinity:
   * never, as for a lab with no file of its own). */
  writerThreadMinChecks?: number;
}

export function createLabService(db: LabDb, options: ServiceOptions = {}): LabApi {
  const ctx: ServiceContext = {
    db,
    clock: options.clock ?? systemClock,
    actor: options.actor ?? 'local user',
    writerThreadMinChecks: options.writerThreadMinChecks ?? WRITER_THREAD_MIN_CHECKS,
  };
  // One attempt at a busy file waits only briefly on SQLite's lock, which blocks the thread (the
  // server's only one); the write is then tried again without blocking (busy.ts).
  if (db.name !== ':memory:') db.pragma(`busy_timeout = ${BUSY_ATTEMPT_MS}`);
  const sync: Record<string, (...args: unknown[]) => unknown> = {};
  for (const op of Object.keys(OPERATIONS) as OperationName[]) {
    const fn = OPS[op] as (ctx: ServiceContext, ...args: unknown[]) => unknown;
    sync[op] = (...args) => fn(ctx, ...args);
  }
  return asyncApi(sync as unknown as SyncLabApi);
}

/** The service is written synchronously (better-sqlite3 is synchronous); callers get the
 * async contract, and a refusal always arrives as a rejected promise, never a throw. */
type SyncLabApi = SyncOps<LabApi>;

function asyncApi(sync: SyncLabApi): LabApi {
  const out: Record<string, (...args: unknown[]) => Promise<unknown>> = {};
  // A write that another thread is still finishing (a bulk import's writer) holds back the
  // writes asked for after it, so they happen in the order they were asked for and none waits on
  // the file's lock while blocking the thread that must finish the first; reads go on meanwhile
  // and see the file as it was before it.
  let tail: Promise<unknown> | undefined;
  const holdWritesUntil = (p: Promise<unknown>) => {
    const settled = p.then(
      () => undefined,
      () => undefined,
    );
    tail = settled;
    void settled.then(() => {
      if (tail === settled) tail = undefined;
    });
  };
  for (const op of Object.keys(OPERATIONS) as OperationName[]) {
    const fn = sync[op] as (...args: unknown[]) => unknown;
    /** A write refused because another connection holds the lab file's lock is tried again. */
    const retryBusy = (e: unknown, args: unknown[]): Promise<unknown> => {
      if (!isBusy(e)) return Promise.reject(e instanceof Error ? e : new Error(String(e)));
      return retryWhileBusy(() => call(args).answer);
    };
    /** The answer, and whether work on it goes on after this call returned. */
    const call = (args: unknown[]): { answer: Promise<unknown>; ongoing: boolean } => {
      try {
        const value = fn(...args);
        return value instanceof Promise
          ? { answer: value, ongoing: true }
          : { answer: Promise.resolve(value), ongoing: false };
      } catch (e) {
        return { answer: Promise.reject(e instanceof Error ? e : new Error(String(e))), ongoing: false };
      }
    };
    out[op] =
      OPERATIONS[op] === 'write'
        ? (...args: unknown[]) => {
            if (!tail) {
              const { answer, ongoing } = call(args);
              if (ongoing) holdWritesUntil(answer);
              return ongoing ? answer : answer.catch((e: unknown) => retryBusy(e, args));
            }
            const answer = tail.then(() => retryWhileBusy(() => call(args).answer));
            holdWritesUntil(answer);
            return answer;
          }
        : (...args: unknown[]) => call(args).answer;
  }
  return out as unknown as LabApi;
}
