// The history group: a meter's trend page, whether meters are fit for use at a frequency (with
// the correction and uncertainty there), and the lab's band coverage. Read-only.
import { formatFrequency, parseFrequencyHz } from '../../engine';
import { correctionAt, slopeAt, useBudget, type UsePoint } from '../../engine/fitness';
import { coverageSegments } from '../../engine/coverage';
import { listMeterRecords, registerRows } from '../../../db/queries/meters';
import { certificatesUsed, pointResults, type HistoryPointRow } from '../../../db/queries/history';
import { daysBetween } from '../clock';
import type { LabSettings, Meter, RegisterRow } from '../contract';
import type { CoverageReport, HistoryApi, TrendReport, UseAnswer, UseReport } from '../contract-history';
import { LabError, describe } from '../errors';
import {
  analyseMeter,
  DAYS_PER_YEAR,
  effectivePoints,
  frequencyTrends,
  meterRegisterRow,
  outOfTolerance,
  COVERAGE_FROM_HZ,
  COVERAGE_TO_HZ,
  EXIT_HORIZON_YEARS,
  ppmOf,
  suggest,
  type MeterAnalysis,
} from '../history/analysis';
import type { OpGroup, ServiceContext } from './context';
import { registerRowOf, requireLab, requireMeter } from './lookups';

function trendReport(ctx: ServiceContext, a: MeterAnalysis, settings: LabSettings): TrendReport {
  const s = suggest(ctx, a, settings);
  const tl = a.tl;
  const m = a.rec.meter;
  const pooled = a.drift?.pooled ?? null;
  const notes = [
    "Fits are weighted by each point's standard uncertainty and never claim less scatter than the points state (scale = max(1, reduced chi-square)).",
    'Prediction intervals: NIST/SEMATECH e-Handbook 4.5.1.2, 95 %. Steps: the as-found error outside the 99.73 % prediction from the checks before it at half or more of the check frequencies.',
    "A suggested interval supports the lab's own decision; it is printed on certificates only where the lab has turned that on (ISO/IEC 17025:2017 7.8.4.3).",
  ];
  return {
    assetId: m.assetId,
    state: m.state,
    asOf: ctx.clock.today(),
    epochDate: tl?.epoch ?? null,
    lastCheckDate: a.register.lastCheckDate,
    dueDate: a.register.dueDate,
    segmentFromDate:
      tl && a.drift?.segmentStartYears !== null && a.drift ? tl.date(a.drift.segmentStartYears ?? 0) : null,
    frequencies: frequencyTrends(a),
    pooled: pooled && {
      driftPpmPerYear: pooled.driftPpmPerYear,
      uDriftPpmPerYear: pooled.uDriftPpmPerYear,
      dof: pooled.dof,
      residualSdPpm: pooled.residualSdPpm,
      points: pooled.n,
      frequencies: pooled.frequencies,
    },
    steps: a.steps,
    health: {
      minDipDb: m.minDipDb,
      dip: tl ? (a.health?.dip ?? []).map((d) => ({ date: tl.date(d.tYears), minDb: d.minDb })) : [],
      dipSlopeDbPerYear: a.health?.dipFit?.slope ?? null,
      dipFallFraction: a.health?.dipFallFraction ?? null,
      dipReachesMinimumDate:
        tl && a.health?.dipReachesMinimumYears != null && a.health.dipReachesMinimumYears < EXIT_HORIZON_YEARS
          ? tl.date(a.health.dipReachesMinimumYears)
          : null,
    },
    flags: a.flags,
    projectedExitDate: a.projectedExitDate,
    suggestion: {
      months: s.months,
      currentMonths: s.currentMonths,
      change: s.change,
      method: s.method,
      methodName: s.methodName,
      boundedBy: s.boundedBy,
      rationale: s.rationale,
    },
    printSuggestedInterval: settings.printSuggestedInterval,
    notes,
  };
}

/** The newest check's points as the engine's fitness takes them: ppm of each reference, with the
 * reference source's line of each budget (not among the numbers history reads: the stored
 * results of these few points are read whole). */
function usePoints(ctx: ServiceContext, points: HistoryPointRow[]): UsePoint[] {
  const results = pointResults(
    ctx.db,
    points.map((p) => p.pointId),
  );
  return points.map((p) => ({
    frequencyHz: p.referenceHz,
    errorPpm: p.errorPpm,
    uPpm: ppmOf(p.combinedHz, p.referenceHz),
    uReferencePpm: ppmOf(
      results.get(p.pointId)?.budget.contributions.find((c) => c.key === 'reference')?.contributionHz ?? 0,
      p.referenceHz,
    ),
  }));
}

function useAnswer(ctx: ServiceContext, a: MeterAnalysis, hz: number): UseAnswer {
  const m = a.rec.meter;
  const today = ctx.clock.today();
  const reasons: UseAnswer['reasons'] = [];
  const warnings: string[] = [];
  if (m.state === 'withdrawn')
    reasons.push({ code: 'withdrawn', message: `${m.assetId} is withdrawn from use.` });
  if (m.state === 'quarantined')
    reasons.push({
      code: 'quarantined',
      message: `${m.assetId} is quarantined pending investigation or repair.`,
    });
  if (hz < m.minHz || hz > m.maxHz)
    reasons.push({
      code: 'outside-band',
      message: `${formatFrequency(hz, 6)} is outside the band of ${m.assetId} (${formatFrequency(m.minHz, 4)} to ${formatFrequency(m.maxHz, 4)}).`,
    });
  const newest = a.checks[a.checks.length - 1];
  if (!newest) reasons.push({ code: 'never-checked', message: `${m.assetId} has never been checked.` });
  const r = a.register;
  if (r.daysToDue !== null && r.daysToDue < 0)
    reasons.push({
      code: 'overdue',
      message: `${m.assetId} was due on ${r.dueDate ?? ''}: overdue by ${-r.daysToDue} days.`,
    });
  let correction: UseAnswer['correction'] = null;
  let uncertainty: UseAnswer['uncertainty'] = null;
  if (newest) {
    const eff = effectivePoints(newest);
    const bad = eff.filter(outOfTolerance);
    if (bad.length)
      reasons.push({
        code: 'out-of-tolerance',
        message: `At the last check (${newest.date}) ${bad.length} point(s) were out of tolerance, e.g. ${formatFrequency(bad[0]?.referenceHz ?? 0, 6)} at ${bad[0]?.errorPpm.toFixed(0) ?? ''} ppm.`,
      });
    for (const c of certificatesUsed(ctx.db, newest.checkId)) {
      if (c.dueOn < newest.date || c.calibratedOn > newest.date)
        reasons.push({
          code: 'expired-standard',
          message: `The last check (${newest.date}) used ${c.standardAssetId} under certificate ${c.certificateId}, valid ${c.calibratedOn} to ${c.dueOn}: not valid on the check date.`,
        });
    }
    for (const f of a.flags) {
      if (f.code === 'step-at-newest') reasons.push({ code: 'step', message: f.message });
      else if (f.code === 'dip-below-minimum')
        reasons.push({ code: 'dip-below-minimum', message: f.message });
      else if (f.severity !== 'info') warnings.push(f.message);
    }
    const inBand = hz >= m.minHz && hz <= m.maxHz;
    const c = inBand ? correctionAt(usePoints(ctx, eff), hz) : null;
    if (c) {
      // Drift since the last check, from the fits at the neighbouring frequencies or the pooled model.
      const dt = daysBetween(newest.date, today) / DAYS_PER_YEAR;
      const slope = slopeAt(
        (a.drift?.frequencies ?? []).map((f) => ({
          frequencyHz: f.frequencyHz,
          slopePpmPerYear: f.fit?.slope ?? null,
        })),
        a.drift?.pooled?.driftPpmPerYear ?? null,
        hz,
      );
      const b = useBudget(c, slope, dt);
      if (slope !== null && Math.abs(b.driftPpm) > 0.1 * c.uPpm && dt > 0)
        warnings.push(
          `Predicted drift since the last check: ${b.driftPpm >= 0 ? '+' : ''}${b.driftPpm.toFixed(1)} ppm (${slope.toFixed(1)} ppm per year over ${dt.toFixed(2)} years); included in the uncertainty, not in the correction.`,
        );
      correction = {
        correctionPpm: b.correctionPpm,
        correctionHz: (b.correctionPpm * hz) / 1e6,
        uPpm: b.uCorrectionPpm,
        uHz: (b.uCorrectionPpm * hz) / 1e6,
        fromCheckDate: newest.date,
        basis: c.basis,
      };
      uncertainty = {
        combinedHz: (b.combinedPpm * hz) / 1e6,
        expandedHz: (b.coverageFactor * b.combinedPpm * hz) / 1e6,
        expandedPpm: b.expandedPpm,
        coverageFactor: b.coverageFactor,
        lines: b.lines,
      };
    }
  }
  if (r.daysToDue !== null && r.daysToDue >= 0 && r.daysToDue <= 30)
    warnings.push(`Due in ${r.daysToDue} days (${r.dueDate ?? ''}).`);
  return {
    assetId: m.assetId,
    description: m.description,
    frequencyHz: hz,
    fit: reasons.length === 0,
    reasons,
    correction,
    uncertainty,
    dueDate: r.dueDate,
    daysToDue: r.daysToDue,
    warnings,
  };
}

function parseFrequencyOr400(value: unknown): number {
  if (typeof value !== 'string' && typeof value !== 'number')
    throw LabError.field('frequency', value, 'a frequency with its unit, such as "9.3 GHz"');
  const r = parseFrequencyHz(value, 'frequency');
  if (!r.ok)
    throw LabError.field('frequency', value, 'a frequency with its unit, such as "9.3 GHz"', r.message);
  return r.hz;
}

export function getTrend(ctx: ServiceContext, assetId: unknown) {
  if (typeof assetId !== 'string' || assetId.trim() === '')
    throw LabError.field('assetId', assetId, 'the asset id of a meter, such as "WG-202"');
  const rec = requireMeter(ctx, assetId);
  const settings = requireLab(ctx);
  return trendReport(ctx, analyseMeter(ctx, rec, meterRegisterRow(ctx, rec)), settings);
}

export function fitForUse(ctx: ServiceContext, query: unknown) {
  const q = (query ?? {}) as { assetId?: unknown; frequency?: unknown };
  const hz = parseFrequencyOr400(q.frequency);
  const today = ctx.clock.today();
  const notes = [
    'The correction is the negative of the error found at the last check, interpolated along the band; the uncertainty assumes a reading taken as at a check (same method, conditions corrected to the reference conditions).',
    "Fit for use supports, and never replaces, the lab's quality system. Mind the meter's maximum input power, and RF exposure near open waveguide.",
  ];
  if (q.assetId !== undefined) {
    if (typeof q.assetId !== 'string' || q.assetId.trim() === '')
      throw LabError.field('assetId', q.assetId, 'the asset id of a meter, such as "WG-202"');
    const rec = requireMeter(ctx, q.assetId);
    const a = analyseMeter(ctx, rec, meterRegisterRow(ctx, rec));
    return { frequencyHz: hz, asOf: today, answers: [useAnswer(ctx, a, hz)], notes } satisfies UseReport;
  }
  const rows = registerRows(ctx.db).map((r) => registerRowOf(ctx, r));
  const covering = listMeterRecords(ctx.db).filter((r) => hz >= r.meter.minHz && hz <= r.meter.maxHz);
  if (covering.length === 0) {
    const bands = listMeterRecords(ctx.db)
      .filter((r) => r.meter.state !== 'withdrawn')
      .map(
        (r) => `${r.meter.assetId} ${formatFrequency(r.meter.minHz, 3)}-${formatFrequency(r.meter.maxHz, 3)}`,
      );
    throw LabError.field(
      'frequency',
      q.frequency,
      "a frequency inside the band of one of the lab's meters",
      `frequency: ${describe(q.frequency)} (${formatFrequency(hz, 6)}) is outside every meter's band${bands.length ? ` (${bands.join(', ')})` : ''}`,
    );
  }
  const answers = covering.map((rec) => {
    const row = rows.find((r) => r.assetId === rec.meter.assetId) as RegisterRow;
    return useAnswer(ctx, analyseMeter(ctx, rec, row), hz);
  });
  answers.sort((x, y) => {
    if (x.fit !== y.fit) return x.fit ? -1 : 1;
    const ux = x.uncertainty?.expandedPpm ?? Infinity;
    const uy = y.uncertainty?.expandedPpm ?? Infinity;
    if (ux !== uy) return ux - uy;
    return (y.daysToDue ?? -Infinity) - (x.daysToDue ?? -Infinity);
  });
  return { frequencyHz: hz, asOf: today, answers, notes } satisfies UseReport;
}

export function coverage(ctx: ServiceContext) {
  const rows = registerRows(ctx.db).map((r) => registerRowOf(ctx, r));
  const meters = listMeterRecords(ctx.db).map((r) => r.meter);
  const usable = (m: Meter) => {
    const row = rows.find((r) => r.assetId === m.assetId);
    return (
      m.state === 'in-service' &&
      row?.daysToDue !== null &&
      row?.daysToDue !== undefined &&
      row.daysToDue >= 0
    );
  };
  const why = (m: Meter) => {
    const row = rows.find((r) => r.assetId === m.assetId);
    return m.state !== 'in-service'
      ? m.state
      : row?.daysToDue === null || row?.daysToDue === undefined
        ? 'never checked'
        : 'overdue';
  };
  const segments = coverageSegments(
    meters.map((m) => ({
      assetId: m.assetId,
      minHz: m.minHz,
      maxHz: m.maxHz,
      usable: usable(m),
      why: why(m),
    })),
    COVERAGE_FROM_HZ,
    COVERAGE_TO_HZ,
  );
  return {
    fromHz: COVERAGE_FROM_HZ,
    toHz: COVERAGE_TO_HZ,
    asOf: ctx.clock.today(),
    segments,
    gaps: segments.filter((s) => s.gap).map((s) => ({ fromHz: s.fromHz, toHz: s.toHz, note: s.note })),
  } satisfies CoverageReport;
}

export const historyOps = { getTrend, fitForUse, coverage } satisfies OpGroup<keyof HistoryApi>;
