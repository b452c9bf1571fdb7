// What a reference found off touched (ISO/IEC 17025:2017 7.10): a standard's as-found deviation
// applied to every check made with it in a window (app/engine/impact.ts judges each point again),
// a meter's uses since its last passing check, and the log of uses.
import { z } from 'zod';
import { appendAudit } from '../../../db/queries/audit';
import { meterHistory } from '../../../db/queries/history';
import {
  checksNamingStandard,
  insertMeterUse,
  meterUsesSince,
  type ImpactCheckRow,
} from '../../../db/queries/impact';
import { getStandardByAsset } from '../../../db/queries/standards';
import { registerRowOfMeter } from '../../../db/queries/summaries';
import { rejudgePoint, type ReferenceDeviation, type Verdict } from '../../engine';
import { worstVerdict } from '../checks/spec';
import type {
  ImpactApi,
  ImpactCheck,
  ImpactMeter,
  ImpactPoint,
  MeterImpact,
  StandardImpact,
  UseRecord,
} from '../contract-impact';
import { LabError, describe } from '../errors';
import { frequencyOrIssue, Issues, parseWith } from '../issues';
import { deviationWithUncertainty, parseDeviation } from '../impact/deviation';
import type { OpGroup, ServiceContext } from './context';
import { registerRowOf, requireMeter } from './lookups';

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

const StandardImpactSchema = z
  .object({
    standard: z
      .string('expected the asset id of a lab standard')
      .trim()
      .min(1, 'expected the asset id of a lab standard'),
    error: z.union([z.string(), z.number()], 'expected the deviation with its unit, such as "0.3 ppm"'),
    uncertainty: z.union([z.string(), z.number()]).optional(),
    since: z.string('expected a date as YYYY-MM-DD').optional(),
  })
  .strict();

const MeterImpactSchema = z
  .object({
    meter: z.string('expected the asset id of a meter').trim().min(1, 'expected the asset id of a meter'),
  })
  .strict();

const UseSchema = z
  .object({
    meter: z.string('expected the asset id of a meter').trim().min(1, 'expected the asset id of a meter'),
    at: z.union([z.string(), z.number()], 'expected a frequency with its unit, such as "9.3 GHz"'),
    purpose: z
      .string('expected what the meter was used for')
      .trim()
      .min(1, 'expected what the meter was used for'),
    usedAt: z.string().optional(),
  })
  .strict();

const ADMITS: ReadonlySet<Verdict> = new Set(['pass', 'conditional-pass']);

function isRealDate(d: string): boolean {
  return (
    ISO_DATE.test(d) &&
    !Number.isNaN(Date.parse(`${d}T00:00:00Z`)) &&
    new Date(`${d}T00:00:00Z`).toISOString().startsWith(d)
  );
}

/** One check judged again: every point made with the standard, the others as they were. */
export function rejudgeCheck(c: ImpactCheckRow, deviation: ReferenceDeviation): ImpactCheck {
  const points: ImpactPoint[] = [];
  const found: Verdict[] = [];
  const left: Verdict[] = [];
  let changed = false;
  for (const p of c.points) {
    const before = { errorHz: p.errorHz, errorPpm: p.errorPpm, expandedHz: p.expandedHz, verdict: p.verdict };
    let after = before;
    if (p.result) {
      const r = rejudgePoint(p.result, p.referenceHz, deviation);
      after = {
        errorHz: r.errorHz,
        errorPpm: r.errorPpm,
        expandedHz: r.budget.expandedHz,
        verdict: r.verdict,
      };
    }
    const verdictChanged = after.verdict !== before.verdict;
    changed ||= verdictChanged;
    (p.phase === 'as-left' ? left : found).push(after.verdict);
    points.push({
      seq: p.seq,
      phase: p.phase,
      referenceHz: p.referenceHz,
      usedStandard: p.result !== null,
      before,
      after,
      verdictChanged,
    });
  }
  return {
    checkId: c.checkId,
    revision: c.revision,
    assetId: c.assetId,
    date: c.date,
    asFoundBefore: c.asFoundVerdict,
    asFoundAfter: worstVerdict(found),
    asLeftBefore: c.asLeftVerdict,
    asLeftAfter: worstVerdict(left.length ? left : found),
    verdictChanged: changed,
    points,
  };
}

function meterImpacts(ctx: ServiceContext, rows: ImpactCheckRow[], checks: ImpactCheck[]): ImpactMeter[] {
  const byMeter = new Map<number, ImpactCheck[]>();
  rows.forEach((r, i) => {
    const list = byMeter.get(r.meterId) ?? [];
    list.push(checks[i] as ImpactCheck);
    byMeter.set(r.meterId, list);
  });
  const out: ImpactMeter[] = [];
  for (const [meterId, list] of byMeter) {
    const db = registerRowOfMeter(ctx.db, meterId);
    if (!db) continue;
    const row = registerRowOf(ctx, db);
    // The state and the due date rest on the newest check; only if it is affected can they move.
    const newest = list.find((c) => c.date === row.lastCheckDate && c.asLeftBefore === row.lastVerdict);
    let stateHolds = true;
    let dueDateHolds = true;
    let reason = 'the newest check is not among the affected ones';
    if (newest) {
      const after = newest.asLeftAfter;
      stateHolds = !(row.state === 'in-service' && after !== null && !ADMITS.has(after));
      dueDateHolds = after === newest.asLeftBefore;
      reason = dueDateHolds
        ? `the newest check (${newest.checkId}) keeps its verdict (${after ?? '-'})`
        : `the newest check (${newest.checkId}) goes from ${newest.asLeftBefore ?? '-'} to ${after ?? '-'}` +
          (stateHolds ? '' : ': the meter should not stay in service on it');
    }
    out.push({
      assetId: row.assetId,
      state: row.state,
      lastCheckDate: row.lastCheckDate,
      dueDate: row.dueDate,
      checkIds: list.map((c) => c.checkId),
      stateHolds,
      dueDateHolds,
      reason,
    });
  }
  return out.sort((a, b) => a.assetId.localeCompare(b.assetId));
}

export function standardImpact(ctx: ServiceContext, query: unknown): StandardImpact {
  const q = parseWith(StandardImpactSchema, query);
  const s = getStandardByAsset(ctx.db, q.standard);
  if (!s)
    throw LabError.field(
      'standard',
      q.standard,
      'the asset id of a lab standard',
      `standard: no lab standard ${describe(q.standard)} in this lab`,
    );
  const error = parseDeviation('error', q.error);
  const expanded = q.uncertainty === undefined ? undefined : parseDeviation('uncertainty', q.uncertainty);
  const deviation = deviationWithUncertainty(error, expanded, s.certificates[0]);
  const until = ctx.clock.today();
  let since = s.certificates[0]?.calibratedOn ?? '0000-01-01';
  if (q.since !== undefined) {
    if (!isRealDate(q.since)) throw LabError.field('since', q.since, 'a date as YYYY-MM-DD');
    if (q.since > until)
      throw LabError.field(
        'since',
        q.since,
        `a date not after today (${until})`,
        `since: ${q.since} is in the future (today is ${until})`,
      );
    since = q.since;
  }
  const rows = checksNamingStandard(ctx.db, s.id, since, until);
  let pointsJudged = 0;
  let pointsChanged = 0;
  const checks = rows.map((r) => {
    const c = rejudgeCheck(r, deviation);
    for (const p of c.points) {
      if (p.usedStandard) pointsJudged++;
      if (p.verdictChanged) pointsChanged++;
    }
    return c;
  });
  return {
    standard: s.assetId,
    deviation: {
      unit: deviation.unit,
      value: deviation.value,
      standardUncertainty: deviation.standardUncertainty,
    },
    since,
    until,
    checks,
    meters: meterImpacts(ctx, rows, checks),
    pointsJudged,
    pointsChanged,
    checksChanged: checks.filter((c) => c.verdictChanged).length,
  };
}

function meterNotFound(assetId: string): LabError {
  return LabError.field(
    'meter',
    assetId,
    'the asset id of a meter in this lab',
    `meter: no meter ${describe(assetId)} in this lab`,
  );
}

export function meterImpact(ctx: ServiceContext, query: unknown): MeterImpact {
  const q = parseWith(MeterImpactSchema, query);
  let meterId: number;
  try {
    meterId = requireMeter(ctx, q.meter).id;
  } catch {
    throw meterNotFound(q.meter);
  }
  const history = meterHistory(ctx.db, meterId);
  const newest = history[history.length - 1];
  const asFound = newest?.asFoundVerdict ?? null;
  const affected = asFound !== null && asFound !== 'pass';
  let since: string | null = null;
  let uses: UseRecord[] = [];
  if (newest && affected) {
    const lastPassing = [...history.slice(0, -1)].reverse().find((c) => c.asLeftVerdict === 'pass');
    since = lastPassing?.date ?? null;
    uses = meterUsesSince(ctx.db, meterId, since ?? '').map(({ meterId: _m, ...u }) => ({
      ...u,
      assetId: q.meter,
    }));
  }
  return {
    assetId: q.meter,
    asFoundVerdict: asFound,
    affected,
    since,
    checkId: newest?.checkId ?? null,
    uses,
  };
}

export function logUse(ctx: ServiceContext, input: unknown): UseRecord {
  const u = parseWith(UseSchema, input);
  const m = (() => {
    try {
      return requireMeter(ctx, u.meter);
    } catch {
      throw meterNotFound(u.meter);
    }
  })();
  const issues = new Issues();
  const frequencyHz = frequencyOrIssue(issues, u.at, 'at');
  const now = ctx.clock.now();
  if (u.usedAt !== undefined && (Number.isNaN(Date.parse(u.usedAt)) || u.usedAt > now))
    issues.add('usedAt', u.usedAt, `a date and time not after now (${now})`);
  issues.throwIfAny();
  const usedAt = u.usedAt ?? now;
  const row = {
    meterId: m.id,
    usedAt,
    usedBy: ctx.actor,
    frequencyHz: frequencyHz as number,
    purpose: u.purpose,
  };
  const id = ctx.db.transaction(() => {
    const newId = insertMeterUse(ctx.db, row, now);
    appendAudit(ctx.db, {
      at: now,
      actor: ctx.actor,
      action: 'log-use',
      entity: 'meter',
      entityId: u.meter,
      before: undefined,
      after: { id: newId, usedAt, frequencyHz: row.frequencyHz, purpose: u.purpose },
    });
    return newId;
  })();
  return {
    id,
    assetId: u.meter,
    usedAt,
    usedBy: ctx.actor,
    frequencyHz: row.frequencyHz,
    purpose: u.purpose,
  };
}

export const impactOps = { standardImpact, meterImpact, logUse } satisfies OpGroup<keyof ImpactApi>;
