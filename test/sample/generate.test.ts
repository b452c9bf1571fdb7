// The demo lab: the generator is deterministic, every part passes the input schemas, and the story told in story.ts shows in the generated readings.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  CheckDocumentSchema,
  LabSettingsSchema,
  MeterSchema,
  PersonSchema,
  StandardSchema,
  type CheckDocumentInput,
} from '../../app/api/schemas';
import { correctionFactor } from '../../app/engine/correction';
import { frequencyAtDivisions } from '../../app/engine/chart';
import {
  BUNDLE_PATH,
  addMonths,
  benchFactor,
  buildBundle,
  certificateOn,
  isoToDays,
  lawDivisions,
  lawFrequencyHz,
  referenceConditionsOf,
  serializeBundle,
} from '../../sample-lab/generate';
import { METERS, STORY_TODAY, type StoryMeter, type StoryRole } from '../../sample-lab/story';

const bundle = buildBundle();

/** "9.300450000 GHz" -> Hz; the generator writes every frequency this way. */
function ghzTextToHz(text: string | number): number {
  if (typeof text !== 'string' || !text.endsWith(' GHz'))
    throw new Error(`expected "... GHz", got ${String(text)}`);
  return Number(text.slice(0, -4)) * 1e9;
}

function storyOf(role: StoryRole): StoryMeter {
  const meter = METERS.find((m) => m.role === role);
  if (!meter) throw new Error(`no meter plays ${role}`);
  return meter;
}

function checksOf(assetId: string): CheckDocumentInput[] {
  return bundle.checks.filter((c) => c.meter === assetId);
}

/** Error of each point of one phase, ppm, corrected to reference conditions with the generator's physics. */
function pointErrorsPpm(
  meter: StoryMeter,
  check: CheckDocumentInput,
  phase: 'as-found' | 'as-left',
): number[] {
  const g = benchFactor(meter.alphaPerK, referenceConditionsOf(meter), check.conditions);
  return check.points
    .filter((p) => (p.phase ?? 'as-found') === phase)
    .map((p) => {
      const readingsHz = p.readings.map((r) =>
        meter.dial.kind === 'divisions'
          ? lawFrequencyHz(meter.dial.law, r.value as number)
          : ghzTextToHz(r.value),
      );
      const meanHz = readingsHz.reduce((a, v) => a + v, 0) / readingsHz.length;
      return (meanHz / g / ghzTextToHz(p.reference) - 1) * 1e6;
    });
}

const mean = (values: number[]) => values.reduce((a, v) => a + v, 0) / values.length;
const worstAbs = (values: number[]) => Math.max(...values.map(Math.abs));
const meanDipDb = (check: CheckDocumentInput) => mean(check.points.map((p) => p.dipDepthDb ?? Number.NaN));

describe('sample bundle: determinism and shape', () => {
  it('buildBundle() equals the committed bundle.json, value for value and byte for byte', () => {
    const text = readFileSync(BUNDLE_PATH, 'utf8');
    expect(buildBundle()).toEqual(JSON.parse(text));
    expect(serializeBundle(buildBundle()) === text).toBe(true);
  });

  it('every part passes the input schemas', () => {
    expect(bundle.format).toBe('dipledger.sample/1');
    expect(LabSettingsSchema.safeParse(bundle.lab).success).toBe(true);
    for (const p of bundle.people) expect(PersonSchema.safeParse(p).success, p.name).toBe(true);
    for (const s of bundle.standards) expect(StandardSchema.safeParse(s).success, s.assetId).toBe(true);
    for (const m of bundle.meters) expect(MeterSchema.safeParse(m).success, m.assetId).toBe(true);
    for (const c of bundle.checks)
      expect(CheckDocumentSchema.safeParse(c).success, `${c.meter} ${c.date}`).toBe(true);
  });

  it('has 3-4 people with technicians, a reviewer and an administrator', () => {
    expect(bundle.people.length).toBeGreaterThanOrEqual(3);
    expect(bundle.people.length).toBeLessThanOrEqual(4);
    for (const role of ['technician', 'reviewer', 'administrator'] as const) {
      expect(bundle.people.some((p) => p.role === role)).toBe(true);
    }
    const names = new Set(bundle.people.map((p) => p.name));
    for (const c of bundle.checks) expect(names.has(c.performer)).toBe(true);
  });

  it('has 8-12 meters from <= 2 GHz to >= 75 GHz, coaxial and waveguide', () => {
    expect(bundle.meters.length).toBeGreaterThanOrEqual(8);
    expect(bundle.meters.length).toBeLessThanOrEqual(12);
    expect(Math.min(...bundle.meters.map((m) => ghzTextToHz(m.min)))).toBeLessThanOrEqual(2e9);
    expect(Math.max(...bundle.meters.map((m) => ghzTextToHz(m.max)))).toBeGreaterThanOrEqual(75e9);
    expect(new Set(bundle.meters.map((m) => m.construction))).toEqual(new Set(['coaxial', 'waveguide']));
    for (const m of bundle.meters) {
      const plan = (m.plan ?? []).map(ghzTextToHz);
      expect(plan.length, m.assetId).toBeGreaterThanOrEqual(5);
      expect(plan.length, m.assetId).toBeLessThanOrEqual(11);
      for (const f of plan) {
        expect(f).toBeGreaterThanOrEqual(ghzTextToHz(m.min));
        expect(f).toBeLessThanOrEqual(ghzTextToHz(m.max));
      }
    }
  });

  it('has a divisions meter with a 10-20 point monotone chart on its cavity law', () => {
    const divisionsMeters = bundle.meters.filter((m) => m.dialKind === 'divisions');
    expect(divisionsMeters.length).toBeGreaterThanOrEqual(1);
    for (const m of divisionsMeters) {
      const story = METERS.find((s) => s.assetId === m.assetId) as StoryMeter;
      if (story.dial.kind !== 'divisions') throw new Error('story and bundle disagree');
      const chart = m.chart ?? [];
      expect(chart.length).toBeGreaterThanOrEqual(10);
      expect(chart.length).toBeLessThanOrEqual(20);
      for (let i = 1; i < chart.length; i++) {
        expect((chart[i]?.divisions as number) > (chart[i - 1]?.divisions as number)).toBe(true);
      }
      for (const row of chart) {
        const frequencyHz = ghzTextToHz(row.frequency);
        // 0.01 div of rounding is under 1 ppm on this cavity.
        expect(Math.abs(lawFrequencyHz(story.dial.law, row.divisions) / frequencyHz - 1)).toBeLessThan(1e-6);
        expect(lawDivisions(story.dial.law, frequencyHz)).toBeCloseTo(row.divisions, 2);
      }
      // Its readings are numbers in divisions; direct meters' readings are frequencies with a unit.
      for (const c of checksOf(m.assetId))
        for (const p of c.points) for (const r of p.readings) expect(typeof r.value).toBe('number');
    }
  });
});

describe('sample bundle: checks and traceability', () => {
  it('is sorted by date, and no check is dated after the story day', () => {
    const dates = bundle.checks.map((c) => c.date);
    expect([...dates].sort()).toEqual(dates);
    for (const d of dates) expect(d <= STORY_TODAY).toBe(true);
    expect(dates[0]! >= '2007-01-01').toBe(true);
  });

  it('gives every meter in or out of service 10-20 years of checks', () => {
    for (const m of bundle.meters) {
      const dates = checksOf(m.assetId).map((c) => c.date);
      const years = (isoToDays(dates[dates.length - 1]!) - isoToDays(dates[0]!)) / 365.25;
      expect(years, m.assetId).toBeGreaterThanOrEqual(10);
      expect(years, m.assetId).toBeLessThanOrEqual(20);
    }
  });

  it('covers every check date with a valid certificate of each standard it lists', () => {
    const standards = new Map(bundle.standards.map((s) => [s.assetId, s]));
    for (const c of bundle.checks) {
      for (const id of c.standards) {
        const standard = standards.get(id);
        expect(standard, id).toBeDefined();
        expect(certificateOn(standard!, c.date), `${c.meter} ${c.date} ${id}`).toBeDefined();
      }
    }
  });

  it('has one standard whose current certificate falls due within about two months of the story day', () => {
    const dueDates = bundle.standards.map((s) =>
      s.certificates
        .map((c) => c.dueOn)
        .sort()
        .at(-1)!,
    );
    const daysLeft = dueDates.map((d) => isoToDays(d) - isoToDays(STORY_TODAY));
    expect(daysLeft.filter((d) => d > 0 && d <= 70)).toHaveLength(1);
    expect(daysLeft.every((d) => d > 0)).toBe(true);
  });

  it('reads each plan frequency 2 up and 2 down, as-found always, as-left only when adjusted', () => {
    for (const c of bundle.checks) {
      const meter = bundle.meters.find((m) => m.assetId === c.meter)!;
      const found = c.points.filter((p) => (p.phase ?? 'as-found') === 'as-found');
      const left = c.points.filter((p) => p.phase === 'as-left');
      expect(found.map((p) => p.reference)).toEqual(meter.plan);
      expect(left.map((p) => p.reference)).toEqual(c.adjusted ? meter.plan : []);
      for (const p of c.points) {
        expect(p.readings.map((r) => r.direction).sort()).toEqual(['down', 'down', 'up', 'up']);
        expect(p.dipDepthDb).toBeGreaterThan(0);
      }
    }
  });

  it('keeps bench conditions in a believable seasonal range', () => {
    for (const c of bundle.checks) {
      expect(c.conditions.temperatureC).toBeGreaterThanOrEqual(19);
      expect(c.conditions.temperatureC).toBeLessThanOrEqual(25);
      expect(c.conditions.humidityPct).toBeGreaterThanOrEqual(30);
      expect(c.conditions.humidityPct).toBeLessThanOrEqual(60);
      expect(c.conditions.pressureHpa).toBeGreaterThanOrEqual(990);
      expect(c.conditions.pressureHpa).toBeLessThanOrEqual(1030);
    }
  });
});

describe('sample bundle: the story shows in the readings', () => {
  it('stepped meter: the mishap check jumps by more than 5x any other year-to-year change, and is adjusted', () => {
    const meter = storyOf('stepped');
    const checks = checksOf(meter.assetId);
    const levels = checks.map((c) => mean(pointErrorsPpm(meter, c, 'as-found')));
    const mishap = checks.findIndex((c) => c.adjusted);
    expect(mishap).toBeGreaterThan(0);
    expect(checks[mishap]!.remarks).toMatch(/fell/);
    const jump = Math.abs(levels[mishap]! - levels[mishap - 1]!);
    const otherChanges = levels
      .slice(1)
      .map((level, i) => ({ change: Math.abs(level - levels[i]!), pair: i + 1 }))
      .filter((c) => c.pair !== mishap && c.pair !== mishap + 1)
      .map((c) => c.change);
    expect(jump).toBeGreaterThan(300);
    expect(jump).toBeGreaterThan(5 * Math.max(...otherChanges));
    // As-left is back near zero, and so is the next periodic check.
    expect(Math.abs(mean(pointErrorsPpm(meter, checks[mishap]!, 'as-left')))).toBeLessThan(60);
    expect(Math.abs(levels[mishap + 1]!)).toBeLessThan(100);
  });

  it('drifting meter: rises every year and its latest check is at 80-100 % of tolerance', () => {
    const meter = storyOf('drifting');
    const checks = checksOf(meter.assetId);
    const worst = checks.map((c) => worstAbs(pointErrorsPpm(meter, c, 'as-found')) / meter.accuracyRelPpm);
    expect(worst.at(-1)).toBeGreaterThanOrEqual(0.8);
    expect(worst.at(-1)).toBeLessThan(1);
    for (const w of worst) expect(w).toBeLessThan(1);
    const levels = checks.map((c) => mean(pointErrorsPpm(meter, c, 'as-found')));
    for (let i = 1; i < levels.length; i++) expect(levels[i]!).toBeGreaterThan(levels[i - 1]!);
    expect(checks.some((c) => c.adjusted)).toBe(false);
  });

  it('overdue meter: its last check plus its interval is before the story day; no other meter in service is overdue', () => {
    const overdue = storyOf('overdue');
    for (const m of bundle.meters.filter((x) => x.state === 'in-service')) {
      const last = checksOf(m.assetId).at(-1)!.date;
      const due = addMonths(last, m.intervalMonths ?? 12);
      if (m.assetId === overdue.assetId) expect(due < STORY_TODAY).toBe(true);
      else expect(due >= STORY_TODAY, m.assetId).toBe(true);
    }
  });

  it('fading-dip meter: the dip falls from about 4 dB to about 1.2 dB, still above its minimum', () => {
    const meter = storyOf('fading-dip');
    const dips = checksOf(meter.assetId).map(meanDipDb);
    expect(dips[0]!).toBeGreaterThanOrEqual(3.6);
    expect(dips.at(-1)!).toBeLessThanOrEqual(1.5);
    expect(dips.at(-1)!).toBeGreaterThan(meter.minDipDb);
    for (let i = 1; i < dips.length; i++) expect(dips[i]!).toBeLessThanOrEqual(dips[i - 1]! + 0.1);
    // Other meters keep their dip.
    for (const m of METERS.filter((x) => x.role !== 'fading-dip' && x.role !== 'withdrawn')) {
      const others = checksOf(m.assetId).map(meanDipDb);
      expect(others[0]! - others.at(-1)!, m.assetId).toBeLessThan(0.6);
    }
  });

  it('quarantined meter: out of tolerance on its last check; withdrawn meter: out at its last check, none since', () => {
    const quarantined = storyOf('quarantined');
    const lastQ = checksOf(quarantined.assetId).at(-1)!;
    expect(worstAbs(pointErrorsPpm(quarantined, lastQ, 'as-found'))).toBeGreaterThan(
      quarantined.accuracyRelPpm,
    );
    expect(bundle.meters.find((m) => m.assetId === quarantined.assetId)!.state).toBe('quarantined');

    const withdrawn = storyOf('withdrawn');
    const checks = checksOf(withdrawn.assetId);
    expect(worstAbs(pointErrorsPpm(withdrawn, checks.at(-1)!, 'as-found'))).toBeGreaterThan(
      withdrawn.accuracyRelPpm,
    );
    for (const c of checks.slice(0, -1)) {
      expect(worstAbs(pointErrorsPpm(withdrawn, c, 'as-found'))).toBeLessThan(withdrawn.accuracyRelPpm);
    }
    expect(checks.at(-1)!.date < '2018-01-01').toBe(true);
    expect(bundle.meters.find((m) => m.assetId === withdrawn.assetId)!.state).toBe('withdrawn');
  });

  it('steady meters stay inside tolerance and drift only slowly', () => {
    for (const meter of METERS.filter(
      (m) => m.role === 'steady' || m.role === 'chart' || m.role === 'overdue',
    )) {
      const levels = checksOf(meter.assetId).map((c) => mean(pointErrorsPpm(meter, c, 'as-found')));
      for (const c of checksOf(meter.assetId)) {
        expect(worstAbs(pointErrorsPpm(meter, c, 'as-found')) / meter.accuracyRelPpm).toBeLessThan(0.5);
      }
      const perYear = Math.abs(levels.at(-1)! - levels[0]!) / levels.length;
      expect(perYear, meter.assetId).toBeLessThan(40);
    }
  });

  it('adjusted checks bring the mean error close to zero', () => {
    for (const c of bundle.checks.filter((x) => x.adjusted)) {
      const meter = METERS.find((m) => m.assetId === c.meter)!;
      const found = Math.abs(mean(pointErrorsPpm(meter, c, 'as-found')));
      const left = Math.abs(mean(pointErrorsPpm(meter, c, 'as-left')));
      expect(left).toBeLessThan(found / 5);
    }
  });
});

describe('sample bundle against the engine (independent physics agree)', () => {
  it("the generator's bench factor equals the engine's correction factor", () => {
    for (const c of bundle.checks.slice(0, 40)) {
      const meter = METERS.find((m) => m.assetId === c.meter)!;
      const reference = referenceConditionsOf(meter);
      const mine = benchFactor(meter.alphaPerK, reference, c.conditions);
      const engine = correctionFactor({ ...c.conditions, alphaPerK: meter.alphaPerK }, reference);
      expect(Math.abs(mine / engine - 1)).toBeLessThan(1e-12);
    }
  });

  it("the engine's chart interpolant reads every divisions reading within 2 ppm of the cavity law", () => {
    for (const m of bundle.meters.filter((x) => x.dialKind === 'divisions')) {
      const story = METERS.find((s) => s.assetId === m.assetId)!;
      if (story.dial.kind !== 'divisions') throw new Error('story and bundle disagree');
      const chart = (m.chart ?? []).map((row) => ({
        divisions: row.divisions,
        frequencyHz: ghzTextToHz(row.frequency),
      }));
      for (const c of checksOf(m.assetId)) {
        for (const p of c.points) {
          for (const r of p.readings) {
            const lawHz = lawFrequencyHz(story.dial.law, r.value as number);
            // Throws if a reading fell off the chart: the chart must reach past the band.
            expect(Math.abs(frequencyAtDivisions(chart, r.value as number) / lawHz - 1)).toBeLessThan(2e-6);
          }
        }
      }
    }
  });
});
