// Builds the demo-lab bundle ("dipledger.sample/1") from story.ts, deterministically, and writes sample-lab/bundle.json when run as a script.
// The truth is simulated here on its own (air index, expansion, cavity law) rather than with
// app/engine, so the engine's corrections can be tested against data it did not make.
// Run: npx tsx sample-lab/generate.ts
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import {
  CheckDocumentSchema,
  LabSettingsSchema,
  MeterSchema,
  PersonSchema,
  StandardSchema,
  type CheckDocumentInput,
  type LabSettingsInput,
  type MeterInput,
  type PersonInput,
  type StandardInput,
} from '../app/api/schemas';
import type { Direction, ReferenceConditions } from '../app/engine/model';
import {
  LAB,
  METERS,
  PEOPLE,
  STANDARDS,
  STORY_TODAY,
  type StoryMeter,
  type StoryStandard,
  type Te011Law,
} from './story';

export const SAMPLE_FORMAT = 'dipledger.sample/1';

export interface SampleBundle {
  format: typeof SAMPLE_FORMAT;
  lab: LabSettingsInput;
  people: PersonInput[];
  standards: StandardInput[];
  meters: MeterInput[];
  checks: CheckDocumentInput[];
}

export const BUNDLE_PATH = fileURLToPath(new URL('./bundle.json', import.meta.url));

/** Reference air of every meter except its temperature (graduation conditions, common practice). */
const REFERENCE_PRESSURE_HPA = 1013.25;
const REFERENCE_HUMIDITY_PCT = 50;

// ---------------------------------------------------------------------------------------------
// Seeded randomness. mulberry32 and FNV-1a are written out here on purpose: the bundle must come
// out byte-identical on every machine and every future version, with no dependency whose
// algorithm could change. One stream per meter (seeded by its asset id) so that editing one
// meter's story does not reshuffle the others.

/** mulberry32 (Tommy Ettinger's 32-bit generator): uniform numbers in [0, 1). */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** FNV-1a 32-bit hash of a string: turns an asset id into a seed. */
export function fnv1a(text: string): number {
  let hash = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    hash ^= text.charCodeAt(i);
    hash = Math.imul(hash, 0x01000193) >>> 0;
  }
  return hash;
}

class Random {
  private readonly next: () => number;
  constructor(seedText: string) {
    this.next = mulberry32(fnv1a(seedText));
  }
  uniform(): number {
    return this.next();
  }
  /** Standard normal by Box-Muller (two uniforms per call: no cached state to reason about). */
  normal(): number {
    const u1 = 1 - this.next(); // in (0, 1], so the log is finite
    const u2 = this.next();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  }
  integer(lowInclusive: number, highInclusive: number): number {
    return lowInclusive + Math.floor(this.next() * (highInclusive - lowInclusive + 1));
  }
}

// ---------------------------------------------------------------------------------------------
// Dates as ISO strings; arithmetic in whole UTC days (the generator, not the engine, may use Date).

const DAY_MS = 86_400_000;

export function isoToDays(iso: string): number {
  const [y, m, d] = iso.split('-').map(Number) as [number, number, number];
  return Date.UTC(y, m - 1, d) / DAY_MS;
}

export function daysToIso(days: number): string {
  return new Date(days * DAY_MS).toISOString().slice(0, 10);
}

function addDays(iso: string, days: number): string {
  return daysToIso(isoToDays(iso) + days);
}

/** Calendar months later (or earlier), the day clamped to the month's length. */
export function addMonths(iso: string, months: number): string {
  const [y, m, d] = iso.split('-').map(Number) as [number, number, number];
  const index = y * 12 + (m - 1) + months;
  const year = Math.floor(index / 12);
  const month = index - year * 12;
  const lastDay = new Date(Date.UTC(year, month + 1, 0)).getUTCDate();
  return daysToIso(Date.UTC(year, month, Math.min(d, lastDay)) / DAY_MS);
}

/** Saturday and Sunday move to the Monday after: the lab checks on working days. */
function workingDay(iso: string): string {
  const weekday = new Date(isoToDays(iso) * DAY_MS).getUTCDay();
  return weekday === 6 ? addDays(iso, 2) : weekday === 0 ? addDays(iso, 1) : iso;
}

function yearsBetween(fromIso: string, toIso: string): number {
  return (isoToDays(toIso) - isoToDays(fromIso)) / 365.25;
}

// ---------------------------------------------------------------------------------------------
// The physics of the truth.

/** Water-vapour pressure from relative humidity, hPa (ITU-R P.453-14 eqs 9-10, over water). */
export function vapourPressureHpa(temperatureC: number, pressureHpa: number, humidityPct: number): number {
  const t = temperatureC;
  const enhancement = 1 + 1e-4 * (7.2 + pressureHpa * (0.032 + 5.9e-6 * t * t));
  const saturationHpa = enhancement * 6.1121 * Math.exp(((18.678 - t / 234.5) * t) / (t + 257.14));
  return (humidityPct / 100) * saturationHpa;
}

/** Radio refractivity N = (n - 1) 1e6 of moist air (ITU-R P.453-14 eqs 1-3). */
export function airRefractivityN(temperatureC: number, pressureHpa: number, humidityPct: number): number {
  const temperatureK = temperatureC + 273.15;
  const vapourHpa = vapourPressureHpa(temperatureC, pressureHpa, humidityPct);
  return (
    (77.6 * (pressureHpa - vapourHpa)) / temperatureK +
    (72 * vapourHpa) / temperatureK +
    (3.75e5 * vapourHpa) / (temperatureK * temperatureK)
  );
}

export interface BenchConditions {
  temperatureC: number;
  pressureHpa: number;
  humidityPct: number;
}

/**
 * How much higher the dial reads at the bench than at its graduation conditions when tuned to the
 * same true frequency: the cavity is longer by (1 + alpha dT) and the air index is n, not n_ref,
 * so the graduation that resonates at f is f (1 + alpha dT) n / n_ref.
 */
export function benchFactor(
  alphaPerK: number,
  reference: ReferenceConditions,
  bench: BenchConditions,
): number {
  const n = 1 + airRefractivityN(bench.temperatureC, bench.pressureHpa, bench.humidityPct) * 1e-6;
  const nRef =
    1 + airRefractivityN(reference.temperatureC, reference.pressureHpa, reference.humidityPct) * 1e-6;
  return (1 + alphaPerK * (bench.temperatureC - reference.temperatureC)) * (n / nRef);
}

/** Frequency of the TE011-like micrometer cavity at a reading in divisions, Hz. */
export function lawFrequencyHz(law: Te011Law, divisions: number): number {
  const length = divisions - law.d0Div;
  return Math.sqrt(law.aGhz2 + law.cGhz2Div2 / (length * length)) * 1e9;
}

/** Reading in divisions at which the micrometer cavity resonates at frequencyHz (the law inverted). */
export function lawDivisions(law: Te011Law, frequencyHz: number): number {
  const ghz = frequencyHz / 1e9;
  return law.d0Div - Math.sqrt(law.cGhz2Div2 / (ghz * ghz - law.aGhz2));
}

export function referenceConditionsOf(meter: StoryMeter): ReferenceConditions {
  return {
    temperatureC: meter.referenceTemperatureC,
    pressureHpa: REFERENCE_PRESSURE_HPA,
    humidityPct: REFERENCE_HUMIDITY_PCT,
  };
}

// ---------------------------------------------------------------------------------------------
// Formatting: frequencies as text with a unit, exact to the hertz.

/** Exact text of a whole number of hertz in GHz with nine decimals, e.g. "9.300450000 GHz". */
export function formatGhz(frequencyHz: number): string {
  const hz = Math.round(frequencyHz);
  const whole = Math.floor(hz / 1e9);
  const fraction = hz - whole * 1e9;
  return `${whole}.${String(fraction).padStart(9, '0')} GHz`;
}

function formatResolution(resolutionHz: number): string {
  if (resolutionHz >= 1e6 && resolutionHz % 1e6 === 0) return `${resolutionHz / 1e6} MHz`;
  if (resolutionHz >= 1e3 && resolutionHz % 1e3 === 0) return `${resolutionHz / 1e3} kHz`;
  return `${resolutionHz} Hz`;
}

/** Rounds to a step; adding 0 turns -0 into 0 so the JSON round-trips to equal values. */
function roundTo(value: number, step: number): number {
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return Number((Math.round(value / step) * step).toFixed(decimals)) + 0;
}

const ghzToHz = (ghz: number): number => Math.round(ghz * 1e9);

// ---------------------------------------------------------------------------------------------
// Lab, people, standards, meters.

function buildPeople(): PersonInput[] {
  return PEOPLE.map((p) => ({ name: p.name, role: p.role }));
}

function valueFrom<T extends { fromYear: number }>(rows: T[], year: number): T {
  let chosen = rows[0] as T;
  for (const row of rows) if (row.fromYear <= year) chosen = row;
  return chosen;
}

/** Yearly certificates, newest first then reversed: each recalibration a few days before the last one fell due. */
function buildCertificates(standard: StoryStandard): StandardInput['certificates'] {
  const random = new Random(`certificates/${standard.assetId}`);
  const newestFirst: StandardInput['certificates'] = [];
  let calibratedOn = standard.newestCalibratedOn;
  for (let i = 0; calibratedOn >= standard.historyFrom; i++) {
    const year = Number(calibratedOn.slice(0, 4));
    const issuer = valueFrom(standard.issuers, year);
    newestFirst.push({
      certificateId: `${issuer.prefix}-${year}-${String(random.integer(100, 9999)).padStart(4, '0')}`,
      issuedBy: issuer.name,
      calibratedOn,
      dueOn: addMonths(calibratedOn, 12),
      expandedUncertaintyPpm: valueFrom(standard.uncertainty, year).expandedPpm,
      coverageFactor: 2,
    });
    const early = standard.earlyDays[i % standard.earlyDays.length] as number;
    // The previous certificate fell due `early` days after this calibration.
    calibratedOn = addMonths(addDays(calibratedOn, early), -12);
  }
  return newestFirst.reverse();
}

function buildStandards(): StandardInput[] {
  return STANDARDS.map((s) => ({
    assetId: s.assetId,
    description: s.description,
    certificates: buildCertificates(s),
  }));
}

function buildMeter(meter: StoryMeter): MeterInput {
  const dial = meter.dial;
  const input: MeterInput = {
    assetId: meter.assetId,
    description: meter.description,
    construction: meter.construction,
    port: meter.port,
    min: formatGhz(ghzToHz(meter.minGhz)),
    max: formatGhz(ghzToHz(meter.maxGhz)),
    dialKind: dial.kind,
    accuracyRelPpm: meter.accuracyRelPpm,
    accuracyAbs: '0 Hz',
    resolution: dial.kind === 'direct' ? formatResolution(dial.resolutionHz) : dial.resolutionDiv,
    alphaPerK: meter.alphaPerK,
    alphaUncertaintyPerK: meter.alphaUncertaintyPerK,
    reference: referenceConditionsOf(meter),
    loadedQ: meter.loadedQ,
    settingFraction: 0.05,
    minDipDb: meter.minDipDb,
    maxInputPowerW: meter.maxInputPowerW,
    location: meter.location,
    state: meter.state,
    intervalMonths: meter.intervalMonths,
    plan: meter.planGhz.map((ghz) => formatGhz(ghzToHz(ghz))),
  };
  if (dial.kind === 'divisions') {
    // The chart a maker would print: round frequencies, divisions from the cavity law to 0.01 div.
    input.chart = dial.chartFrequenciesGhz.map((ghz) => ({
      divisions: roundTo(lawDivisions(dial.law, ghzToHz(ghz)), 0.01),
      frequency: formatGhz(ghzToHz(ghz)),
    }));
  }
  return input;
}

// ---------------------------------------------------------------------------------------------
// Checks.

/** Check dates: nominal dates a few days either side onto working days, plus unscheduled ones. */
export function checkDates(meter: StoryMeter): string[] {
  const random = new Random(`schedule/${meter.assetId}`);
  const dates: string[] = [];
  for (let k = 0; ; k++) {
    const nominal = addMonths(meter.schedule.first, k * meter.schedule.everyMonths);
    if (nominal > meter.schedule.until) break;
    const shiftDays = k === 0 ? 0 : random.integer(-12, 12);
    let date = workingDay(addDays(nominal, shiftDays));
    if (date >= STORY_TODAY) date = workingDay(addDays(nominal, -14));
    dates.push(date);
  }
  dates.push(...meter.schedule.extra);
  return dates.sort();
}

/** Bench conditions by season: warmer and damper in summer, pressure with the weather. */
function benchConditions(date: string, random: Random): BenchConditions {
  const dayOfYear = isoToDays(date) - isoToDays(`${date.slice(0, 4)}-01-01`);
  const summer = Math.sin((2 * Math.PI * (dayOfYear - 105)) / 365.25); // peaks in late July
  const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));
  return {
    temperatureC: roundTo(clamp(21.8 + 1.8 * summer + 0.6 * random.normal(), 19, 25), 0.1),
    pressureHpa: roundTo(clamp(1012 + 8 * random.normal(), 990, 1030), 0.1),
    humidityPct: roundTo(clamp(44 + 10 * summer + 3 * random.normal(), 30, 60), 1),
  };
}

function performerOn(date: string, random: Random): string {
  const year = Number(date.slice(0, 4));
  const available = PEOPLE.filter(
    (p) => p.role === 'technician' && (p.checksFromYear ?? 0) <= year && year <= (p.checksToYear ?? 9999),
  );
  const person = available[random.integer(0, available.length - 1)];
  if (!person) throw new Error(`story: no technician does checks in ${year}`);
  return person.name;
}

function standardsFor(meter: StoryMeter): string[] {
  // Below 40 GHz the synthesized generator is the source; above it, the millimetre-wave source.
  return meter.minGhz >= 40 ? ['STD-02', 'STD-03'] : ['STD-01', 'STD-03'];
}

/** The first check on or after a date (events and remarks attach to it). */
function firstCheckOnOrAfter(dates: string[], on: string): string | undefined {
  return dates.find((d) => d >= on);
}

const DIRECTIONS: Direction[] = ['up', 'down', 'up', 'down'];

function buildChecks(meter: StoryMeter): CheckDocumentInput[] {
  const random = new Random(`checks/${meter.assetId}`);
  const dates = checkDates(meter);
  const firstDate = dates[0] as string;
  const lastDate = dates[dates.length - 1] as string;
  const span = Math.max(yearsBetween(firstDate, lastDate), 1e-9);
  const reference = referenceConditionsOf(meter);
  const truth = meter.truth;
  const bandPosition = (ghz: number) => (ghz - meter.minGhz) / (meter.maxGhz - meter.minGhz);

  // Fixed per-frequency graduation errors and dip variations: the meter's own fingerprint.
  const pointOffsetsPpm = meter.planGhz.map(() => truth.pointSpreadPpm * random.normal());
  const pointDipDb = meter.planGhz.map(() => 0.15 * random.normal());

  const adjustments = new Map<string, number>();
  for (const e of meter.events) {
    if (e.kind !== 'adjust') continue;
    const at = firstCheckOnOrAfter(dates, e.on);
    if (at) adjustments.set(at, e.residualPpm);
  }
  const remarks = new Map<string, string>();
  for (const r of meter.remarks) {
    const at = firstCheckOnOrAfter(dates, r.on);
    if (at) remarks.set(at, remarks.has(at) ? `${remarks.get(at)} ${r.text}` : r.text);
  }

  let adjustmentPpm = 0; // running effect of all re-indexings so far
  const checks: CheckDocumentInput[] = [];
  for (const date of dates) {
    const years = yearsBetween(firstDate, date);
    const bench = benchConditions(date, random);
    const g = benchFactor(meter.alphaPerK, reference, bench);
    const performer = performerOn(date, random);

    // The common (band-wide) error and its tilt across the band, at this date.
    let commonPpm = truth.initialErrorPpm + truth.driftPpmPerYear * years + adjustmentPpm;
    let tiltPpm = truth.tiltPpmPerYearPerBand * years;
    for (const e of meter.events) {
      if (e.kind === 'step' && e.on <= date) {
        commonPpm += e.commonPpm;
        tiltPpm += e.tiltPpm;
      }
    }

    const dipTrendDb = truth.dipDb.first + (truth.dipDb.last - truth.dipDb.first) * (years / span);
    const dips = meter.planGhz.map((_, i) =>
      roundTo(Math.max(0.3, dipTrendDb + (pointDipDb[i] as number) + 0.08 * random.normal()), 0.1),
    );

    const measure = (phase: 'as-found' | 'as-left', common: number): CheckDocumentInput['points'] =>
      meter.planGhz.map((ghz, i) => {
        const referenceHz = ghzToHz(ghz);
        const errorPpm = common + tiltPpm * (bandPosition(ghz) - 0.5) + (pointOffsetsPpm[i] as number);
        const settingSigmaHz = (truth.settingNoiseFraction * referenceHz) / meter.loadedQ / 20;
        const readings = DIRECTIONS.map((direction) => {
          const hysteresis = ((direction === 'down' ? 1 : -1) * truth.hysteresisPpm) / 2;
          const dialHz =
            referenceHz * (1 + errorPpm * 1e-6) * g * (1 + hysteresis * 1e-6) +
            settingSigmaHz * random.normal();
          const dial = meter.dial;
          const value: string | number =
            dial.kind === 'direct'
              ? formatGhz(Math.round(dialHz / dial.resolutionHz) * dial.resolutionHz)
              : roundTo(lawDivisions(dial.law, dialHz), dial.resolutionDiv);
          return { value, direction };
        });
        return { phase, reference: formatGhz(referenceHz), readings, dipDepthDb: dips[i] as number };
      });

    const points = measure('as-found', commonPpm);
    const residualPpm = adjustments.get(date);
    if (residualPpm !== undefined) {
      adjustmentPpm += residualPpm - commonPpm;
      points.push(...measure('as-left', residualPpm));
    }

    checks.push({
      format: 'dipledger.check/1',
      meter: meter.assetId,
      date,
      performer,
      standards: standardsFor(meter),
      method: 'tune-to-dip',
      conditions: bench,
      adjusted: residualPpm !== undefined,
      remarks: remarks.get(date) ?? '',
      points,
    });
  }
  return checks;
}

// ---------------------------------------------------------------------------------------------
// Assembly and validation.

/** Certificate of a standard valid on a date (calibratedOn <= date <= dueOn), if any. */
export function certificateOn(
  standard: StandardInput,
  date: string,
): StandardInput['certificates'][number] | undefined {
  return standard.certificates.find((c) => c.calibratedOn <= date && date <= c.dueOn);
}

function validate(bundle: SampleBundle): void {
  const problems: string[] = [];
  const check = (what: string, result: { success: boolean; error?: { message: string } }) => {
    if (!result.success) problems.push(`${what}: ${result.error?.message ?? 'invalid'}`);
  };
  check('lab', LabSettingsSchema.safeParse(bundle.lab));
  bundle.people.forEach((p) => check(`person ${p.name}`, PersonSchema.safeParse(p)));
  bundle.standards.forEach((s) => check(`standard ${s.assetId}`, StandardSchema.safeParse(s)));
  bundle.meters.forEach((m) => check(`meter ${m.assetId}`, MeterSchema.safeParse(m)));
  bundle.checks.forEach((c) => check(`check ${c.meter} ${c.date}`, CheckDocumentSchema.safeParse(c)));

  // Story rules the schemas cannot see.
  const standards = new Map(bundle.standards.map((s) => [s.assetId, s]));
  for (const c of bundle.checks) {
    if (c.date >= STORY_TODAY) problems.push(`check ${c.meter} ${c.date}: dated on or after ${STORY_TODAY}`);
    for (const id of c.standards) {
      const standard = standards.get(id);
      if (!standard || !certificateOn(standard, c.date)) {
        problems.push(`check ${c.meter} ${c.date}: no valid certificate of ${id}`);
      }
    }
  }
  if (problems.length > 0) throw new Error(`the sample bundle is invalid:\n${problems.join('\n')}`);
}

/** The whole demo lab; the same bytes on every run. */
export function buildBundle(): SampleBundle {
  const checks = METERS.flatMap(buildChecks).sort((a, b) =>
    a.date === b.date ? (a.meter < b.meter ? -1 : a.meter > b.meter ? 1 : 0) : a.date < b.date ? -1 : 1,
  );
  const bundle: SampleBundle = {
    format: SAMPLE_FORMAT,
    lab: LAB,
    people: buildPeople(),
    standards: buildStandards(),
    meters: METERS.map(buildMeter),
    checks,
  };
  validate(bundle);
  return bundle;
}

/** Pretty JSON; key order is the order the builders write, which is fixed. */
export function serializeBundle(bundle: SampleBundle): string {
  return `${JSON.stringify(bundle, null, 2)}\n`;
}

const invokedPath = process.argv[1];
if (invokedPath && path.resolve(invokedPath) === fileURLToPath(import.meta.url)) {
  const bundle = buildBundle();
  writeFileSync(BUNDLE_PATH, serializeBundle(bundle));
  const readings = bundle.checks.reduce((n, c) => n + c.points.reduce((m, p) => m + p.readings.length, 0), 0);
  console.log(
    `wrote ${path.relative(process.cwd(), BUNDLE_PATH)}: ${bundle.meters.length} meters, ${bundle.checks.length} checks, ${readings} readings`,
  );
}
