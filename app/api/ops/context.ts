// What every operation gets as its first argument: the database, the clock and who is acting.
// Operations are module-level functions `(ctx, ...args)`; service.ts binds them to one context.
import type { LabDb } from '../../../db/store';
import type { Clock } from '../clock';
import type { LabApi } from '../contract';

export interface ServiceContext {
  readonly db: LabDb;
  readonly clock: Clock;
  /** Who the operations are recorded as in the audit trail. */
  readonly actor: string;
  /** The fewest checks an import hands to a writer thread (Infinity: never). */
  readonly writerThreadMinChecks: number;
}

/** Operations that may hand part of their work to another thread. */
type ThreadedOps = 'importCsv';

/** The synchronous form of a set of operations (better-sqlite3 is synchronous); the service
 * wraps them so callers always get promises and refusals arrive as rejections. An operation may
 * still answer with a promise where work runs on another thread (a bulk import's writer). */
export type SyncOps<Api> = {
  [K in keyof Api]: Api[K] extends (...args: infer A) => Promise<infer R>
    ? K extends ThreadedOps
      ? (...args: A) => R | Promise<R>
      : (...args: A) => R
    : never;
};

/** The operations of the contract as module-level functions taking the context first. */
export type ContextOps<Api> = {
  [K in keyof SyncOps<Api>]: SyncOps<Api>[K] extends (...args: infer A) => infer R
    ? (ctx: ServiceContext, ...args: A) => R
    : never;
};

/** A group (a file of related operations) contributes some operations of the contract. */
export type OpGroup<K extends keyof LabApi> = Pick<ContextOps<LabApi>, K>;
