// The history group: turns a meter's stored checks into drift fits, steps, health flags, a
// suggested interval, and the fit-for-use answer at a frequency. Read-only; dates become years
// here (the engine has no calendar), with the newest check as time zero.
// Per-function imports: the date-fns barrel costs about half a second of CLI start-up.
import { addDays } from 'date-fns/addDays';
import { formatISO } from 'date-fns/formatISO';
import { parseISO } from 'date-fns/parseISO';
import { coverageFactor, formatFrequency, parseFrequencyHz } from '../engine';
import {
  analyseDrift,
  analyseHealth,
  predict,
  predictor,
  projectedExit,
  STEP_COVERAGE,
  DIP_FADE_FRACTION,
  type DriftAnalysis,
  type HealthAnalysis,
  type HistoryCheck,
} from '../engine/drift';
import {
  ALERT_FRACTION,
  applyAlertZone,
  predictedConformity,
  suggestByAttributes,
  suggestByStaircase,
  suggestByVariables,
  type AttributeRecord,
  type IntervalSuggestion,
  type VariablesFrequency,
} from '../engine/intervals';
import { getMeterByAsset, listMeterRecords, registerRows, type MeterRecord } from '../../db/queries/meters';
import { registerRowOfMeter } from '../../db/queries/summaries';
import {
  certificatesUsed,
  meterHistory,
  pointResults,
  type HistoryCheckRow,
  type HistoryPointRow,
} from '../../db/queries/history';
import type { LabSettings, Meter, RegisterRow } from './contract';
import type {
  CoverageReport,
  CoverageSegment,
  FrequencyTrend,
  HistoryApi,
  HistoryFlag,
  StepReport,
  TrendReport,
  UseAnswer,
  UseReport,
} from './contract-history';
import type { OpGroup, ServiceContext } from './context';
import { LabError, describe } from './errors';
import { daysBetween } from './support';
import { cachedAttributeRecords, cachedRegisterFlags, type FlagSummary, type FlagWord } from './summaries';

const DAYS_PER_YEAR = 365.25;
/** The band the lab's coverage is judged over (the product's range). */
export const COVERAGE_FROM_HZ = 1e9;
export const COVERAGE_TO_HZ = 110e9;
/** The variables-data method needs this many observations since the last break at every check
 * frequency (two residual degrees of freedom). */
export const VARIABLES_MIN_POINTS = 4;
/** The attributes method needs this many as-found results in the group of similar meters. */
export const ATTRIBUTES_MIN_RESULTS = 20;
/** Projected exits further out than this are not reported (years). */
const EXIT_HORIZON_YEARS = 30;
/** A projected exit within this many years of today is a warning, later ones are for the record. */
const EXIT_WARNING_YEARS = 3;

interface Timeline {
  epoch: string;
  years(date: string): number;
  date(tYears: number): string;
}

function timeline(epoch: string): Timeline {
  const e = parseISO(epoch);
  // A history asks for the same few dates many times (each check's date, the band's samples):
  // the calendar arithmetic is done once per date.
  const yearsOf = new Map<string, number>();
  const dateOf = new Map<number, string>();
  return {
    epoch,
    years: (date) => {
      let y = yearsOf.get(date);
      if (y === undefined) {
        y = daysBetween(epoch, date) / DAYS_PER_YEAR;
        yearsOf.set(date, y);
      }
      return y;
    },
    date: (t) => {
      const days = Math.round(t * DAYS_PER_YEAR);
      let d = dateOf.get(days);
      if (d === undefined) {
        d = formatISO(addDays(e, days), { representation: 'date' });
        dateOf.set(days, d);
      }
      return d;
    },
  };
}

const ppmOf = (hz: number, atHz: number) => (hz / atHz) * 1e6;

function toHistoryCheck(c: HistoryCheckRow, tl: Timeline): HistoryCheck {
  return {
    tYears: tl.years(c.date),
    adjusted: c.adjusted,
    points: c.points.map((p) => ({
      frequencyHz: p.referenceHz,
      phase: p.phase,
      errorPpm: p.errorPpm,
      uPpm: ppmOf(p.combinedHz, p.referenceHz),
      // The stated tolerance: in ppm of the reading it was set at (reference + error), as the
      // accuracy is stated. Over the reference it would read 1001 ppm for a 1000 ppm meter found
      // 1000 ppm high, and move with each check's error.
      tolerancePpm: ppmOf(p.toleranceHz, p.referenceHz + p.errorHz),
    })),
  };
}

/** The points that describe the meter as it was left: as-left after an adjustment, else as-found. */
function effectivePoints(c: HistoryCheckRow): HistoryPointRow[] {
  return c.points.filter((p) => p.phase === (c.adjusted ? 'as-left' : 'as-found'));
}

const outOfTolerance = (p: HistoryPointRow) => Math.abs(p.errorHz) > p.toleranceHz;

/** A group of similar meters for the attributes method: same construction and band family. */
export function bandFamily(m: Pick<Meter, 'construction' | 'minHz' | 'maxHz'>): string {
  const centre = Math.sqrt(m.minHz * m.maxHz);
  const band = centre < 18e9 ? 'below 18 GHz' : centre < 40e9 ? '18 GHz to 40 GHz' : 'above 40 GHz';
  return `${m.construction} meters ${band}`;
}

interface MeterAnalysis {
  rec: MeterRecord;
  register: RegisterRow;
  checks: HistoryCheckRow[];
  tl: Timeline | null;
  drift: DriftAnalysis | null;
  health: HealthAnalysis | null;
  /** Projected exit (years) of each of drift.frequencies, null where none. */
  exits: (number | null)[];
  projectedExitDate: string | null;
  /** Whether that exit falls on or before the due date (the drift-exit flag is then a warning
   * whatever the day). */
  exitBeforeDue: boolean;
  flags: HistoryFlag[];
  steps: StepReport[];
}

/** Evenly spaced samples of the prediction band, enough for a smooth curve on a chart. */
function bandSamples(
  fromYears: number,
  toYears: number,
  at: (x: number) => { value: number; halfWidth: number },
) {
  const n = 48;
  return Array.from({ length: n + 1 }, (_, i) => {
    const x = fromYears + ((toYears - fromYears) * i) / n;
    return { x, ...at(x) };
  });
}

function registerRowOf(ctx: ServiceContext, rec: MeterRecord): RegisterRow {
  // One meter's row, not the whole register searched (the fleet benchmark's page figure).
  const row = registerRowOfMeter(ctx.db, rec.id);
  if (!row) throw new LabError('internal', `register row missing for ${rec.meter.assetId}`);
  return ctx.registerRow(row);
}

function analyseMeter(ctx: ServiceContext, rec: MeterRecord, register: RegisterRow): MeterAnalysis {
  const m = rec.meter;
  const checks = meterHistory(ctx.db, rec.id);
  const newest = checks[checks.length - 1];
  if (!newest) {
    return {
      rec,
      register,
      checks,
      tl: null,
      drift: null,
      health: null,
      exits: [],
      projectedExitDate: null,
      exitBeforeDue: false,
      flags: [],
      steps: [],
    };
  }
  const tl = timeline(newest.date);
  const drift = analyseDrift(checks.map((c) => toHistoryCheck(c, tl)));
  const health = analyseHealth(
    checks.map((c) => ({
      tYears: tl.years(c.date),
      dipDepthsDb: c.points
        .filter((p) => p.phase === 'as-found' && p.dipDepthDb !== null)
        .map((p) => p.dipDepthDb as number),
      loadedQ: [],
    })),
    m.minDipDb,
  );
  const exits = drift.frequencies.map((f) =>
    f.fit ? projectedExit(f.fit, 0, f.tolerancePpm, { uNew: f.uNewPpm, horizon: EXIT_HORIZON_YEARS }) : null,
  );
  const exitDates = exits.filter((x): x is number => x !== null).map((x) => tl.date(x));
  const projectedExitDate = exitDates.length ? (exitDates.sort()[0] ?? null) : null;

  const steps: StepReport[] = drift.steps
    .filter((s) => s.isStep || s.flaggedCount > 0)
    .map((s) => ({
      date: tl.date(s.tYears),
      isStep: s.isStep,
      flaggedFrequencies: s.flaggedCount,
      testedFrequencies: s.tests.length,
      tests: s.tests,
    }));

  const flags: HistoryFlag[] = [];
  const newestIndex = checks.length - 1;
  for (const s of drift.steps) {
    if (!s.isStep) continue;
    const date = tl.date(s.tYears);
    const c = checks[s.checkIndex];
    const moved = `the as-found error moved beyond the ${(STEP_COVERAGE * 100).toFixed(2)} % prediction from the checks before it at ${s.flaggedCount} of ${s.tests.length} check frequencies`;
    if (s.checkIndex === newestIndex && !c?.adjusted) {
      flags.push({
        code: 'step-at-newest',
        severity: 'stop',
        date,
        message: `Step at the newest check (${date}): ${moved}. Find the cause (a knock, a fall, a slipping dial) before using the meter; the trend starts again from this check.`,
        short: `STEP ${date}`,
      });
    } else {
      flags.push({
        code: 'step',
        severity: s.checkIndex === newestIndex ? 'warning' : 'info',
        date,
        message: `Step on ${date}: ${moved}${c?.adjusted ? '; the meter was adjusted then' : ''}. History before it is not used to extrapolate.`,
        short: `step ${date}`,
      });
    }
  }
  const exitBeforeDue =
    projectedExitDate !== null && register.dueDate !== null && projectedExitDate <= register.dueDate;
  if (projectedExitDate) {
    flags.push({
      code: 'drift-exit',
      severity: driftExitSeverity(tl, projectedExitDate, exitBeforeDue, ctx.clock.today()),
      date: projectedExitDate,
      message: `Drift: the 95 % prediction band of a check reaches the tolerance on ${projectedExitDate}${exitBeforeDue ? `, before the due date ${register.dueDate ?? ''}` : ''}.`,
      short: `drift: exits ${projectedExitDate.slice(0, 7)}`,
    });
  }
  const pooled = drift.pooled;
  if (pooled && Math.abs(pooled.driftPpmPerYear) > 2 * pooled.uDriftPpmPerYear) {
    flags.push({
      code: 'drift',
      severity: 'info',
      date: null,
      message: `Drifts ${pooled.driftPpmPerYear.toFixed(1)} ppm per year (u = ${pooled.uDriftPpmPerYear.toFixed(1)} ppm per year) across the band since ${tl.date(drift.segmentStartYears ?? 0)}.`,
      short: `drift ${pooled.driftPpmPerYear.toFixed(0)} ppm/yr`,
    });
  }
  const used = asFoundUsedFraction(newest);
  if (used !== null && used >= ALERT_FRACTION && !newest.adjusted) {
    flags.push({
      code: 'alert-zone',
      severity: 'warning',
      date: newest.date,
      message: `The newest check (${newest.date}) found the meter using ${(used * 100).toFixed(0)} % of its tolerance (alert level ${(ALERT_FRACTION * 100).toFixed(0)} %) and it was not adjusted: adjust it or shorten its interval.`,
      short: `${(used * 100).toFixed(0)} % of tol.`,
    });
  }
  if (health.belowMinimum && health.newestDipDb !== null) {
    flags.push({
      code: 'dip-below-minimum',
      severity: 'stop',
      date: newest.date,
      message: `Dip depth ${health.newestDipDb.toFixed(1)} dB at the newest check is under the meter's minimum of ${m.minDipDb} dB: the resonance cannot be set reliably. Clean, replate or repair.`,
      short: `dip < ${m.minDipDb} dB`,
    });
  } else if (health.fading && health.dipFallFraction !== null) {
    const at = health.dipReachesMinimumYears;
    const reach =
      at === null || at >= EXIT_HORIZON_YEARS
        ? ''
        : at <= 0
          ? `; the fitted line is already at the ${m.minDipDb} dB minimum`
          : `; at this rate it reaches the ${m.minDipDb} dB minimum about ${tl.date(at)}`;
    flags.push({
      code: 'dip-fading',
      severity: 'warning',
      date: newest.date,
      message: `Dip fading: the fitted depth fell ${(health.dipFallFraction * 100).toFixed(0)} % since the first check (flag at ${(DIP_FADE_FRACTION * 100).toFixed(0)} %), now ${health.newestDipDb?.toFixed(1) ?? '-'} dB${reach}. Tarnished plating or worn contacts are the usual causes.`,
      short: 'dip fading',
    });
  }
  if (health.qFalling) {
    flags.push({
      code: 'q-falling',
      severity: 'warning',
      date: newest.date,
      message: `Loaded Q fell by ${((health.qFallFraction ?? 0) * 100).toFixed(0)} % since the first sweep.`,
      short: 'Q falling',
    });
  }
  if (health.spurious) {
    flags.push({
      code: 'spurious-response',
      severity: 'warning',
      date: newest.date,
      message: 'Spurious responses in the newest sweeps: check that the main dip was the one read.',
      short: 'spurious',
    });
  }
  const fitted = drift.frequencies.filter((f) => f.fit).length;
  if (fitted === 0) {
    flags.push({
      code: 'few-checks',
      severity: 'info',
      date: null,
      message: `Fewer than 3 checks since ${tl.date(drift.segmentStartYears ?? 0)}: no drift model yet.`,
      short: 'few checks',
    });
  }
  return { rec, register, checks, tl, drift, health, exits, projectedExitDate, exitBeforeDue, flags, steps };
}

/** The drift-exit flag's severity: the one thing in a meter's flags that changes with the day
 * (a projected exit within a few years of today is worth the coordinator's attention in the due
 * list; one before the due date always is). */
function driftExitSeverity(
  tl: Timeline,
  exitDate: string,
  beforeDue: boolean,
  today: string,
): HistoryFlag['severity'] {
  const soon = tl.years(exitDate) <= tl.years(today) + EXIT_WARNING_YEARS;
  return beforeDue || soon ? 'warning' : 'info';
}

/** The drift chart of each check frequency: its history, fit, prediction at the due date, exit
 * and prediction band (the trend page only; the register needs none of it). */
function frequencyTrends(a: MeterAnalysis): FrequencyTrend[] {
  const { tl, drift, register } = a;
  if (!tl || !drift) return [];
  const m = a.rec.meter;
  const dueYears = register.dueDate ? tl.years(register.dueDate) : m.intervalMonths / 12;
  const frequencies: FrequencyTrend[] = drift.frequencies.map((f, i) => {
    const fit = f.fit;
    const exit = a.exits[i] ?? null;
    const atDue = fit ? predict(fit, dueYears, 0.95, f.uNewPpm) : null;
    const segmentStart = drift.segmentStartYears ?? 0;
    return {
      frequencyHz: f.frequencyHz,
      tolerancePpm: f.tolerancePpm,
      history: f.observations.map((o) => ({
        date: tl.date(o.tYears),
        phase: o.phase,
        errorPpm: o.errorPpm,
        uPpm: o.uPpm,
        used: o.segment === drift.currentSegment,
      })),
      fit: fit && {
        points: fit.n,
        dof: fit.dof,
        interceptPpm: fit.intercept,
        slopePpmPerYear: fit.slope,
        uInterceptPpm: fit.uIntercept,
        uSlopePpmPerYear: fit.uSlope,
        residualSdPpm: fit.residualSd,
        birgeRatio: fit.birgeRatio,
        fromDate: tl.date(segmentStart),
      },
      atDue:
        fit && atDue
          ? {
              date: tl.date(dueYears),
              predictedPpm: atDue.value,
              halfWidthPpm: atDue.halfWidth,
              probabilityOfConformity: predictedConformity(
                { frequencyHz: f.frequencyHz, fit, tolerancePpm: f.tolerancePpm, uNewPpm: f.uNewPpm },
                dueYears,
              ),
            }
          : null,
      projectedExitDate: exit === null ? null : tl.date(exit),
      band: fit
        ? bandSamples(
            segmentStart,
            Math.max(dueYears, exit === null ? 0 : Math.min(exit, dueYears + 3)) + 0.25,
            predictor(fit, 0.95, f.uNewPpm),
          ).map((b) => ({ date: tl.date(b.x), predictedPpm: b.value, halfWidthPpm: b.halfWidth }))
        : [],
    };
  });
  return frequencies;
}

function attributeRecords(
  ctx: ServiceContext,
  family: string,
): { records: AttributeRecord[]; meters: string[] } {
  // From the per-meter summaries (app/api/summaries.ts): reading and decoding every meter's
  // history in the group made one meter's page cost seconds at fleet scale.
  return cachedAttributeRecords(ctx.db, (g) => bandFamily(g) === family);
}

function suggest(ctx: ServiceContext, a: MeterAnalysis, settings: LabSettings): IntervalSuggestion {
  const policy = { minMonths: settings.intervalMinMonths, maxMonths: settings.intervalMaxMonths };
  const newest = a.checks[a.checks.length - 1];
  return applyAlertZone(
    suggestByMethod(ctx, a, settings),
    newest ? { worstUsedFraction: asFoundUsedFraction(newest), adjusted: newest.adjusted } : null,
    policy,
  );
}

/** Largest |error| / tolerance over a check's as-found points (null without any). */
function asFoundUsedFraction(c: HistoryCheckRow): number | null {
  const found = c.points.filter((p) => p.phase === 'as-found');
  return found.length ? Math.max(...found.map((p) => Math.abs(p.errorHz) / p.toleranceHz)) : null;
}

function suggestByMethod(ctx: ServiceContext, a: MeterAnalysis, settings: LabSettings): IntervalSuggestion {
  const m = a.rec.meter;
  const policy = { minMonths: settings.intervalMinMonths, maxMonths: settings.intervalMaxMonths };
  const target = settings.reliabilityTarget;
  const drift = a.drift;
  const newest = a.checks[a.checks.length - 1];
  const newestFreqs = new Set(newest ? effectivePoints(newest).map((p) => p.referenceHz) : []);
  const fitted: VariablesFrequency[] = [];
  let enough = drift !== null && newestFreqs.size > 0;
  for (const f of drift?.frequencies ?? []) {
    if (!newestFreqs.has(f.frequencyHz)) continue;
    if (!f.fit || f.fit.n < VARIABLES_MIN_POINTS) {
      enough = false;
      continue;
    }
    fitted.push({ frequencyHz: f.frequencyHz, fit: f.fit, tolerancePpm: f.tolerancePpm, uNewPpm: f.uNewPpm });
  }
  if (enough && fitted.length > 0) {
    return suggestByVariables(fitted, 0, target, m.intervalMonths, policy, (hz) => formatFrequency(hz, 4));
  }
  const family = bandFamily(m);
  const group = attributeRecords(ctx, family);
  const segmentPoints = Math.min(
    ...(drift?.frequencies.filter((f) => newestFreqs.has(f.frequencyHz)) ?? []).map(
      (f) => f.observations.filter((o) => o.segment === drift?.currentSegment).length,
    ),
    Infinity,
  );
  const tooFew = `Too few checks since the last adjustment or step for a drift model (${Number.isFinite(segmentPoints) ? segmentPoints : 0} at a check frequency; ${VARIABLES_MIN_POINTS} needed).`;
  if (group.records.length >= ATTRIBUTES_MIN_RESULTS) {
    const s = suggestByAttributes(
      group.records,
      target,
      m.intervalMonths,
      policy,
      `the group of ${family} (${group.meters.join(', ')})`,
    );
    return { ...s, rationale: `${s.rationale} ${tooFew}`, reason: `${s.reason} ${tooFew}` };
  }
  const last = newest
    ? {
        inTolerance: !newest.points.filter((p) => p.phase === 'as-found').some(outOfTolerance),
        worstUsedFraction: asFoundUsedFraction(newest),
      }
    : null;
  return suggestByStaircase(
    last,
    m.intervalMonths,
    policy,
    `${tooFew} The group of ${family} has ${group.records.length} as-found results (${ATTRIBUTES_MIN_RESULTS} needed for the attributes method).`,
  );
}

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

/** Short words for the register (warnings and stops only), used by the due list. */
export function registerFlags(ctx: ServiceContext, row: RegisterRow): string[] {
  return registerFlagsAll(ctx, [row])[0] ?? [];
}

/** Register flag words of many rows at once, from the per-meter summaries where current. */
export function registerFlagsAll(ctx: ServiceContext, rows: RegisterRow[]): string[][] {
  const today = ctx.clock.today();
  return cachedRegisterFlags(
    ctx,
    rows,
    (_meterId, row) => {
      const rec = getMeterByAsset(ctx.db, row.assetId);
      return rec ? flagSummary(analyseMeter(ctx, rec, row)) : { epoch: null, words: [] };
    },
    (summary) => registerWords(summary, today),
  );
}

/** The flags of an analysis that the register shows on some day (warnings and stops), without
 * the day: the drift-exit word keeps its date unless it is a warning whatever the day. */
function flagSummary(a: MeterAnalysis): FlagSummary {
  const words: FlagWord[] = [];
  for (const f of a.flags) {
    if (f.code === 'drift-exit' && !a.exitBeforeDue && f.date !== null)
      words.push({ short: f.short, exitDate: f.date });
    else if (f.severity !== 'info') words.push({ short: f.short });
  }
  return { epoch: a.tl?.epoch ?? null, words };
}

/** The register's words of a flag summary on `today` (analyseMeter's severities on that day). */
function registerWords(summary: FlagSummary, today: string): string[] {
  const tl = summary.epoch === null ? null : timeline(summary.epoch);
  return summary.words
    .filter(
      (w) => w.exitDate === undefined || (tl && driftExitSeverity(tl, w.exitDate, false, today) !== 'info'),
    )
    .map((w) => w.short);
}

export const historyOps: OpGroup<keyof HistoryApi> = (ctx) => ({
  getTrend(assetId) {
    if (typeof assetId !== 'string' || assetId.trim() === '')
      throw LabError.field('assetId', assetId, 'the asset id of a meter, such as "WG-202"');
    const rec = ctx.meterOr404(assetId);
    const settings = ctx.lab();
    return trendReport(ctx, analyseMeter(ctx, rec, registerRowOf(ctx, rec)), settings);
  },

  fitForUse(query) {
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
      const rec = ctx.meterOr404(q.assetId);
      const a = analyseMeter(ctx, rec, registerRowOf(ctx, rec));
      return { frequencyHz: hz, asOf: today, answers: [useAnswer(ctx, a, hz)], notes } satisfies UseReport;
    }
    const rows = registerRows(ctx.db).map((r) => ctx.registerRow(r));
    const covering = listMeterRecords(ctx.db).filter((r) => hz >= r.meter.minHz && hz <= r.meter.maxHz);
    if (covering.length === 0) {
      const bands = listMeterRecords(ctx.db)
        .filter((r) => r.meter.state !== 'withdrawn')
        .map(
          (r) =>
            `${r.meter.assetId} ${formatFrequency(r.meter.minHz, 3)}-${formatFrequency(r.meter.maxHz, 3)}`,
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
  },

  coverage() {
    const rows = registerRows(ctx.db).map((r) => ctx.registerRow(r));
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
  },
});
