// The register: meters, their states, and what falls due.
import { checkInBand, parseDivisions, parseFrequencyHz } from '../../engine';
import { appendAudit } from '../../../db/queries/audit';
import { listCheckSummaries } from '../../../db/queries/checks';
import { getMeterByAsset, insertMeter, registerRows, setMeterState } from '../../../db/queries/meters';
import { registerRowOfMeter } from '../../../db/queries/summaries';
import type { DueQuery, Meter, MeterDetail } from '../contract';
import { LabError, describe } from '../errors';
import { registerFlagsAll } from '../history/flags';
import { frequencyOrIssue, Issues, parseWith } from '../issues';
import { MeterSchema, MeterStateSchema } from '../schemas';
import type { OpGroup, ServiceContext } from './context';
import { registerRowOf, requireMeter } from './lookups';

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
  };
  return detail;
}

export function createMeter(ctx: ServiceContext, input: unknown) {
  const m = parseWith(MeterSchema, input);
  const issues = new Issues();
  const minHz = frequencyOrIssue(issues, m.min, 'min');
  const maxHz = frequencyOrIssue(issues, m.max, 'max');
  const absHz = parseFrequencyHz(m.accuracyAbs, 'accuracyAbs');
  const accuracyAbsHz = absHz.ok ? absHz.hz : 0;
  if (!absHz.ok && !/^\s*0(\.0*)?\s*[a-z]*\s*$/i.test(String(m.accuracyAbs))) {
    issues.fromParse('accuracyAbs', m.accuracyAbs, absHz.message, 'a frequency such as "10 kHz"');
  }
  if (minHz !== undefined && maxHz !== undefined && !(maxHz > minHz)) {
    issues.add('max', m.max, `a frequency above min (${describe(m.min)})`);
  }
  let resolution: number | undefined;
  if (m.dialKind === 'direct') {
    const r = parseFrequencyHz(m.resolution, 'resolution');
    // A resolution is small (kHz to MHz), so a bare number is always ambiguous here.
    if (r.ok && typeof m.resolution === 'string' && /[a-z]/i.test(m.resolution)) resolution = r.hz;
    else
      issues.add('resolution', m.resolution, 'the dial resolution as a frequency with unit, such as "1 MHz"');
  } else {
    const d = parseDivisions(m.resolution, 'resolution');
    if (d.ok && d.divisions > 0) resolution = d.divisions;
    else issues.add('resolution', m.resolution, 'the dial resolution in divisions, such as 0.01');
  }
  const chart = m.chart.map((c, i) => ({
    divisions: c.divisions,
    frequencyHz: frequencyOrIssue(issues, c.frequency, `chart[${i}].frequency`) ?? NaN,
  }));
  if (m.dialKind === 'divisions') {
    if (chart.length < 2)
      issues.add('chart', m.chart, 'a chart of at least two points for a divisions meter');
    const sorted = [...chart].sort((a, b) => a.divisions - b.divisions);
    const up = sorted.every((c, i) => i === 0 || c.frequencyHz > (sorted[i - 1]?.frequencyHz ?? -Infinity));
    const down = sorted.every((c, i) => i === 0 || c.frequencyHz < (sorted[i - 1]?.frequencyHz ?? Infinity));
    if (chart.length >= 2 && !up && !down)
      issues.add('chart', m.chart, 'a chart whose frequency rises or falls steadily with divisions');
  }
  const planHz: number[] = [];
  m.plan.forEach((p, i) => {
    const hz = frequencyOrIssue(issues, p, `plan[${i}]`);
    if (hz === undefined || minHz === undefined || maxHz === undefined) return;
    const out = checkInBand(hz, minHz, maxHz, `plan[${i}]`);
    if (out) issues.fromParse(`plan[${i}]`, p, out, 'a frequency inside the band');
    else planHz.push(hz);
  });
  if (getMeterByAsset(ctx.db, m.assetId))
    issues.add(
      'assetId',
      m.assetId,
      'an asset id not already in the register',
      `assetId: ${m.assetId} is already in the register`,
    );
  issues.throwIfAny();
  const meter: Meter = {
    assetId: m.assetId,
    description: m.description,
    construction: m.construction,
    port: m.port,
    minHz: minHz as number,
    maxHz: maxHz as number,
    dialKind: m.dialKind,
    accuracyRelPpm: m.accuracyRelPpm,
    accuracyAbsHz,
    resolution: resolution as number,
    chart: m.dialKind === 'divisions' ? chart : [],
    alphaPerK: m.alphaPerK,
    alphaUncertaintyPerK: m.alphaUncertaintyPerK,
    reference: m.reference,
    loadedQ: m.loadedQ,
    settingFraction: m.settingFraction,
    minDipDb: m.minDipDb,
    maxInputPowerW: m.maxInputPowerW,
    location: m.location,
    state: m.state,
    intervalMonths: m.intervalMonths,
    planHz: [...new Set(planHz)].sort((a, b) => a - b),
  };
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
