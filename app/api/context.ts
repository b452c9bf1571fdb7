// What an operation group (a file of related LabApi operations) gets from the service: the
// database, the clock, who is acting, and the shared validation of meters, readings and checks.
import type { Conditions, DecisionRule, PointResult, Reading } from '../engine/model';
import type { LabDb } from '../../db/store';
import type { MeterRecord } from '../../db/queries/meters';
import type { StandardRecord } from '../../db/queries/standards';
import type { registerRows } from '../../db/queries/meters';
import type { LabApi, LabSettings, Meter, RegisterRow } from './contract';
import type { CheckDocument } from './schemas';
import type { Clock, Issues } from './support';
import type { PreparedCheck } from './service';

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

/** Operations that may hand part of their work to another thread. */
type ThreadedOps = 'importCsv';

/** A group contributes some operations of the contract. */
export type OpGroup<K extends keyof LabApi> = (ctx: ServiceContext) => Pick<SyncOps<LabApi>, K>;

export interface ServiceContext {
  db: LabDb;
  clock: Clock;
  actor: string;
  /** The lab's settings; refuses when the file has none yet. */
  lab(): LabSettings;
  /** The meter with that asset id, or a not-found LabError. */
  meterOr404(assetId: string): MeterRecord;
  registerRow(r: ReturnType<typeof registerRows>[number]): RegisterRow;
  /** The certificate of a standard valid on a date, if any. */
  certificateOn(s: StandardRecord, date: string): StandardRecord['certificates'][number] | undefined;
  /** Parses a reading in dial units (Hz or divisions) against the meter; records an issue if bad. */
  readingValue(issues: Issues, meter: Meter, value: string | number, field: string): number | undefined;
  conditionsOf(doc: { conditions: CheckDocument['conditions'] }, settings: LabSettings): Conditions;
  evaluateOrIssue(
    issues: Issues,
    field: string,
    meter: Meter,
    conditions: Conditions,
    referenceHz: number,
    certificate: StandardRecord['certificates'][number],
    readings: Reading[],
    rule: DecisionRule,
  ): PointResult | undefined;
  /** Validates a check document against the records and computes it; writes nothing. */
  prepareCheck(
    input: unknown,
    prefix: string,
    options: { createPerformer: boolean; amendingCheckId?: number },
  ): PreparedCheck;
  /** Writes a prepared check and its audit entry; call inside a transaction. Returns the check id. */
  writeCheck(c: PreparedCheck, action: string): number;
}
