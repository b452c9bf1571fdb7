// The per-meter analysis two operation groups share (the trend page and fitness for use, and
// the register's flags): a meter's stored checks turned into drift fits, steps, health flags and
// a suggested interval. Dates become years here (the engine has no calendar), with the newest
// check as time zero.
// Per-function imports: the date-fns barrel is slow to load at CLI start-up.
import { addDays } from 'date-fns/addDays';
import { formatISO } from 'date-fns/formatISO';
import { parseISO } from 'date-fns/parseISO';
import { formatFrequency } from '../../engine';
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
} from '../../engine/drift';
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
} from '../../engine/intervals';
import type { MeterRecord } from '../../../db/queries/meters';
import { registerRowOfMeter } from '../../../db/queries/summaries';
import { meterHistory, type HistoryCheckRow, type HistoryPointRow } from '../../../db/queries/history';
import type { LabSettings, Meter, RegisterRow } from '../contract';
import type { FrequencyTrend, HistoryFlag, StepReport } from '../contract-history';
import { daysBetween } from '../clock';
import { LabError } from '../errors';
import type { ServiceContext } from '../ops/context';
import { registerRowOf } from '../ops/lookups';
import { cachedAttributeRecords } from './summaries';

export const DAYS_PER_YEAR = 365.25;
/** The band the lab's coverage is judged over (the product's range). */
export const COVERAGE_FROM_HZ = 1e9;
export const COVERAGE_TO_HZ = 110e9;
/** The variables-data method needs this many observations since the last break at every check
 * frequency (two residual degrees of freedom). */
export const VARIABLES_MIN_POINTS = 4;
/** The attributes method needs this many as-found results in the group of similar meters. */
export const ATTRIBUTES_MIN_RESULTS = 20;
/** Projected exits further out than this are not reported (years). */
export const EXIT_HORIZON_YEARS = 30;
/** A projected exit within this many years of today is a warning, later ones are for the record. */
const EXIT_WARNING_YEARS = 3;

export interface Timeline {
  epoch: string;
  years(date: string): number;
  date(tYears: number): string;
}

export function timeline(epoch: string): Timeline {
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

export const ppmOf = (hz: number, atHz: number) => (hz / atHz) * 1e6;

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
export function effectivePoints(c: HistoryCheckRow): HistoryPointRow[] {
  return c.points.filter((p) => p.phase === (c.adjusted ? 'as-left' : 'as-found'));
}

export const outOfTolerance = (p: HistoryPointRow) => Math.abs(p.errorHz) > p.toleranceHz;

/** A group of similar meters for the attributes method: same construction and band family. */
export function bandFamily(m: Pick<Meter, 'construction' | 'minHz' | 'maxHz'>): string {
  const centre = Math.sqrt(m.minHz * m.maxHz);
  const band = centre < 18e9 ? 'below 18 GHz' : centre < 40e9 ? '18 GHz to 40 GHz' : 'above 40 GHz';
  return `${m.construction} meters ${band}`;
}

export interface MeterAnalysis {
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
export function bandSamples(
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

/** One meter's register row (read alone, not found by searching the whole register). */
export function meterRegisterRow(ctx: ServiceContext, rec: MeterRecord): RegisterRow {
  const row = registerRowOfMeter(ctx.db, rec.id);
  if (!row) throw new LabError('internal', `register row missing for ${rec.meter.assetId}`);
  return registerRowOf(ctx, row);
}

/** A meter's history analysed: drift, steps, health, projected exit and the flags they raise. */
export function analyseMeter(ctx: ServiceContext, rec: MeterRecord, register: RegisterRow): MeterAnalysis {
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
export function driftExitSeverity(
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
export function frequencyTrends(a: MeterAnalysis): FrequencyTrend[] {
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

export function suggest(ctx: ServiceContext, a: MeterAnalysis, settings: LabSettings): IntervalSuggestion {
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
