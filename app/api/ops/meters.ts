// The register: meters, their states, and what falls due.
import { appendAudit } from '../../../db/queries/audit';
import { listCheckSummaries } from '../../../db/queries/checks';
import { insertMeter, registerRows, setMeterState } from '../../../db/queries/meters';
import { registerRowOfMeter } from '../../../db/queries/summaries';
import type { DueQuery, MeterDetail } from '../contract';
import { LabError } from '../errors';
import { registerFlagsAll } from '../history/flags';
import { Issues, parseWith } from '../issues';
import { MeterSchema, MeterStateSchema } from '../schemas';
import type { OpGroup, ServiceContext } from './context';
import { registerRowOf, requireMeter } from './lookups';
import { meterFromFields } from './meter-spec';
import { meterRevisions } from '../../../db/queries/upkeep';

export function listMeters(ctx: ServiceContext) {
  return registerRows(ctx.db).map((r) => registerRowOf(ctx, r));
}

export function getMeter(ctx: ServiceContext, assetId: unknown) {
  // String() of a hostile object throws a TypeError; refuse anything but text (found by
  // test/api/records-fuzz.test.ts).
  if (typeof assetId !== 'string')
    throw LabError.field('assetId', assetId, 'the asset id of a meter, as text');
  const rec = requireMeter(ctx, assetId);
  const row = registerRowOfMeter(ctx.db, rec.id);
  if (!row) throw new LabError('internal', `register row missing for ${rec.meter.assetId}`);
  const detail: MeterDetail = {
    meter: rec.meter,
    register: registerRowOf(ctx, row),
    checks: listCheckSummaries(ctx.db, rec.id),
    revisions: meterRevisions(ctx.db, rec.id),
  };
  return detail;
}

export function createMeter(ctx: ServiceContext, input: unknown) {
  const m = parseWith(MeterSchema, input);
  const issues = new Issues();
  const meter = meterFromFields(ctx, m, issues, { newAssetId: true });
  issues.throwIfAny();
  if (!meter) throw new LabError('internal', 'meter refused without a reason');
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
    insertMeter(ctx.db, meter, at);
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'create',
      entity: 'meter',
      entityId: meter.assetId,
      before: undefined,
      after: meter,
    });
  })();
  return requireMeter(ctx, meter.assetId).meter;
}

export function changeMeterState(ctx: ServiceContext, input: unknown) {
  const c = parseWith(MeterStateSchema, input);
  const rec = requireMeter(ctx, c.assetId);
  if (rec.meter.state === c.state) {
    throw LabError.field(
      'state',
      c.state,
      `a state other than the present one (${rec.meter.state})`,
      `state: ${c.assetId} is already ${c.state}`,
    );
  }
  ctx.db.transaction(() => {
    setMeterState(ctx.db, rec.id, c.state);
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: 'change-state',
      entity: 'meter',
      entityId: c.assetId,
      before: { state: rec.meter.state },
      after: { state: c.state, reason: c.reason },
    });
  })();
  return requireMeter(ctx, c.assetId).meter;
}

export function listDue(ctx: ServiceContext, query: DueQuery) {
  const within = Number(query?.withinDays);
  if (!Number.isInteger(within) || within < 0 || within > 3650) {
    throw LabError.field('withinDays', query?.withinDays, 'a whole number of days from 0 to 3650');
  }
  const rows = registerRows(ctx.db)
    .map((r) => registerRowOf(ctx, r))
    .filter((r) => r.state !== 'withdrawn' && (r.daysToDue === null || r.daysToDue <= within))
    .sort((a, b) => (a.daysToDue ?? -Infinity) - (b.daysToDue ?? -Infinity));
  const flags = registerFlagsAll(ctx, rows);
  return rows.map((r, i) => ({ ...r, flags: flags[i] ?? [] }));
}

export const meterOps = { listMeters, getMeter, createMeter, changeMeterState, listDue } satisfies OpGroup<
  'listMeters' | 'getMeter' | 'createMeter' | 'changeMeterState' | 'listDue'
>;
