// The history group: a meter's trend page, whether meters are fit for use at a frequency (with
// the correction and uncertainty there), and the lab's band coverage. Read-only.
import { coverageFactor, formatFrequency, parseFrequencyHz } from '../../engine';
import { listMeterRecords, registerRows } from '../../../db/queries/meters';
import { certificatesUsed, pointResults, type HistoryPointRow } from '../../../db/queries/history';
import { daysBetween } from '../clock';
import type { LabSettings, Meter, RegisterRow } from '../contract';
import type {
  CoverageReport,
  CoverageSegment,
  HistoryApi,
  TrendReport,
  UseAnswer,
  UseReport,
} from '../contract-history';
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

/** Linear interpolation along the band of the newest check's errors at `hz`. */
function correctionAt(ctx: ServiceContext, points: HistoryPointRow[], hz: number) {
  const sorted = [...points].sort((a, b) => a.referenceHz - b.referenceHz);
  // The reference source's line of each budget is not among the numbers history reads: the
  // stored results of these few points are read whole.
  const results = pointResults(
    ctx.db,
    points.map((p) => p.pointId),
  );
  const ppm = (p: HistoryPointRow) => ({
    e: p.errorPpm,
    u: ppmOf(p.combinedHz, p.referenceHz),
    uRef: ppmOf(
      results.get(p.pointId)?.budget.contributions.find((c) => c.key === 'reference')?.contributionHz ?? 0,
      p.referenceHz,
    ),
  });
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (!first || !last) return null;
  const one = (p: HistoryPointRow, basis: string) => {
    const v = ppm(p);
    return { e: v.e, u: v.u, uInterp: 0, uRead: Math.sqrt(Math.max(v.u ** 2 - v.uRef ** 2, 0)), basis };
  };
  if (hz <= first.referenceHz)
    return one(
      first,
      `nearest check frequency ${formatFrequency(first.referenceHz, 6)} (below it, not extrapolated)`,
    );
  if (hz >= last.referenceHz)
    return one(
      last,
      `nearest check frequency ${formatFrequency(last.referenceHz, 6)} (above it, not extrapolated)`,
    );
  for (let i = 1; i < sorted.length; i++) {
    const lo = sorted[i - 1] as HistoryPointRow;
    const hi = sorted[i] as HistoryPointRow;
    if (hz < lo.referenceHz || hz > hi.referenceHz) continue;
    if (hz === lo.referenceHz) return one(lo, `check frequency ${formatFrequency(lo.referenceHz, 6)}`);
    if (hz === hi.referenceHz) return one(hi, `check frequency ${formatFrequency(hi.referenceHz, 6)}`);
    const a = (hz - lo.referenceHz) / (hi.referenceHz - lo.referenceHz);
    const l = ppm(lo);
    const h = ppm(hi);
    return {
      e: (1 - a) * l.e + a * h.e,
      // Neighbouring points share the reference and most conditions: taken as fully correlated.
      u: (1 - a) * l.u + a * h.u,
      // Between check frequencies the error is not known exactly: rectangular, half-width half
      // the difference of the neighbours (common practice).
      uInterp: Math.abs(h.e - l.e) / 2 / Math.sqrt(3),
      uRead:
        (1 - a) * Math.sqrt(Math.max(l.u ** 2 - l.uRef ** 2, 0)) +
        a * Math.sqrt(Math.max(h.u ** 2 - h.uRef ** 2, 0)),
      basis: `interpolated between ${formatFrequency(lo.referenceHz, 6)} and ${formatFrequency(hi.referenceHz, 6)}`,
    };
  }
  return null;
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
    const c = inBand ? correctionAt(ctx, eff, hz) : null;
    if (c) {
      // Drift since the last check, from the fits at the neighbouring frequencies or the pooled model.
      const dt = daysBetween(newest.date, today) / DAYS_PER_YEAR;
      const slope = slopeAt(a, hz);
      const driftPpm = slope === null ? 0 : slope * dt;
      const uDrift = Math.abs(driftPpm) / Math.sqrt(3);
      if (slope !== null && Math.abs(driftPpm) > 0.1 * c.u && dt > 0)
        warnings.push(
          `Predicted drift since the last check: ${driftPpm >= 0 ? '+' : ''}${driftPpm.toFixed(1)} ppm (${slope.toFixed(1)} ppm per year over ${dt.toFixed(2)} years); included in the uncertainty, not in the correction.`,
        );
      const uCorr = Math.hypot(c.u, c.uInterp);
      const lines = [
        { label: 'correction from the last check (its combined uncertainty)', uPpm: c.u },
        { label: 'interpolation between check frequencies', uPpm: c.uInterp },
        {
          label: 'your reading (repeatability, resolution, setting, conditions as at the check)',
          uPpm: c.uRead,
        },
        { label: 'drift since the last check (rectangular)', uPpm: uDrift },
      ];
      const uc = Math.sqrt(lines.reduce((s, l) => s + l.uPpm ** 2, 0));
      const k = coverageFactor(Infinity);
      correction = {
        correctionPpm: -c.e,
        correctionHz: (-c.e * hz) / 1e6,
        uPpm: uCorr,
        uHz: (uCorr * hz) / 1e6,
        fromCheckDate: newest.date,
        basis: c.basis,
      };
      uncertainty = {
        combinedHz: (uc * hz) / 1e6,
        expandedHz: (k * uc * hz) / 1e6,
        expandedPpm: k * uc,
        coverageFactor: k,
        lines,
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

/** Drift rate (ppm per year) at a frequency: interpolated from the per-frequency fits, else pooled. */
function slopeAt(a: MeterAnalysis, hz: number): number | null {
  const fitted = a.drift?.frequencies.filter((f) => f.fit) ?? [];
  if (fitted.length === 0) return a.drift?.pooled?.driftPpmPerYear ?? null;
  let lo = fitted[0];
  let hi = fitted[fitted.length - 1];
  for (const f of fitted) {
    if (f.frequencyHz <= hz) lo = f;
    if (f.frequencyHz >= hz && hi && f.frequencyHz < hi.frequencyHz) hi = f;
  }
  if (!lo?.fit || !hi?.fit) return null;
  if (hi.frequencyHz === lo.frequencyHz || hz <= lo.frequencyHz) return lo.fit.slope;
  if (hz >= hi.frequencyHz) return hi.fit.slope;
  const t = (hz - lo.frequencyHz) / (hi.frequencyHz - lo.frequencyHz);
  return (1 - t) * lo.fit.slope + t * hi.fit.slope;
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
  const cuts = new Set<number>([COVERAGE_FROM_HZ, COVERAGE_TO_HZ]);
  for (const m of meters) {
    for (const f of [m.minHz, m.maxHz]) if (f > COVERAGE_FROM_HZ && f < COVERAGE_TO_HZ) cuts.add(f);
  }
  const edges = [...cuts].sort((a, b) => a - b);
  const segments: CoverageSegment[] = [];
  for (let i = 1; i < edges.length; i++) {
    const from = edges[i - 1] as number;
    const to = edges[i] as number;
    const cover = meters.filter((m) => m.minHz <= from && m.maxHz >= to);
    const ok = cover.filter(usable).map((m) => m.assetId);
    const names = cover.map((m) => m.assetId);
    const prev = segments[segments.length - 1];
    if (prev && prev.meters.join() === names.join() && prev.usable.join() === ok.join()) {
      prev.toHz = to;
      continue;
    }
    const unusable = cover
      .filter((m) => !usable(m))
      .map((m) => {
        const row = rows.find((r) => r.assetId === m.assetId);
        const why =
          m.state !== 'in-service'
            ? m.state
            : row?.daysToDue === null || row?.daysToDue === undefined
              ? 'never checked'
              : 'overdue';
        return `${m.assetId} ${why}`;
      });
    segments.push({
      fromHz: from,
      toHz: to,
      meters: names,
      usable: ok,
      gap: ok.length === 0,
      note: ok.length
        ? `covered by ${ok.join(', ')}${unusable.length ? ` (also ${unusable.join(', ')})` : ''}`
        : names.length
          ? `gap: only ${unusable.join(', ')}`
          : 'gap: no meter',
    });
  }
  return {
    fromHz: COVERAGE_FROM_HZ,
    toHz: COVERAGE_TO_HZ,
    asOf: ctx.clock.today(),
    segments,
    gaps: segments.filter((s) => s.gap).map((s) => ({ fromHz: s.fromHz, toHz: s.toHz, note: s.note })),
  } satisfies CoverageReport;
}

export const historyOps = { getTrend, fitForUse, coverage } satisfies OpGroup<keyof HistoryApi>;
