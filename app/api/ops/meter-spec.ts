// A meter's specification checked against itself and the register: the one validation behind
// adding a meter, editing its specification and importing a register, so each refuses the same
// things in the same words (band min above max, a plan frequency outside the band, a duplicate
// asset id...). Field names are given by the caller: a form's names, or a CSV's line and column.
import { checkInBand, parseDivisions, parseFrequencyHz } from '../../engine';
import { getMeterByAsset } from '../../../db/queries/meters';
import type { Meter } from '../contract';
import { describe } from '../errors';
import { frequencyOrIssue, type Issues } from '../issues';
import type { MeterSchema } from '../schemas';
import type { z } from 'zod';
import type { ServiceContext } from './context';

export type MeterFields = z.output<typeof MeterSchema>;

export interface SpecOptions {
  /** Refuse an asset id already in the register (adding and importing; not editing). */
  newAssetId: boolean;
  /** How a field is named in refusals (default: the field itself). */
  name?: (field: string) => string;
}

/** The meter the fields describe, or undefined with the reasons added to `issues`. */
export function meterFromFields(
  ctx: ServiceContext,
  m: MeterFields,
  issues: Issues,
  options: SpecOptions,
): Meter | undefined {
  const at = options.name ?? ((f: string) => f);
  const before = issues.list.length;
  const minHz = frequencyOrIssue(issues, m.min, at('min'));
  const maxHz = frequencyOrIssue(issues, m.max, at('max'));
  const absHz = parseFrequencyHz(m.accuracyAbs, at('accuracyAbs'));
  const accuracyAbsHz = absHz.ok ? absHz.hz : 0;
  if (!absHz.ok && !/^\s*0(\.0*)?\s*[a-z]*\s*$/i.test(String(m.accuracyAbs))) {
    issues.fromParse(at('accuracyAbs'), m.accuracyAbs, absHz.message, 'a frequency such as "10 kHz"');
  }
  if (minHz !== undefined && maxHz !== undefined && !(maxHz > minHz)) {
    issues.add(
      at('max'),
      m.max,
      `a frequency above min (${describe(m.min)})`,
      `${at('max')}: ${describe(m.max)} is not above ${at('min')} ${describe(m.min)}; the band's min must be below its max`,
    );
  }
  let resolution: number | undefined;
  if (m.dialKind === 'direct') {
    const r = parseFrequencyHz(m.resolution, at('resolution'));
    // A resolution is small (kHz to MHz), so a bare number is always ambiguous here.
    if (r.ok && typeof m.resolution === 'string' && /[a-z]/i.test(m.resolution)) resolution = r.hz;
    else
      issues.add(
        at('resolution'),
        m.resolution,
        'the dial resolution as a frequency with unit, such as "1 MHz"',
      );
  } else {
    const d = parseDivisions(m.resolution, at('resolution'));
    if (d.ok && d.divisions > 0) resolution = d.divisions;
    else issues.add(at('resolution'), m.resolution, 'the dial resolution in divisions, such as 0.01');
  }
  const chart = m.chart.map((c, i) => ({
    divisions: c.divisions,
    frequencyHz: frequencyOrIssue(issues, c.frequency, at(`chart[${i}].frequency`)) ?? NaN,
  }));
  if (m.dialKind === 'divisions') {
    if (chart.length < 2)
      issues.add(at('chart'), m.chart, 'a chart of at least two points for a divisions meter');
    const sorted = [...chart].sort((a, b) => a.divisions - b.divisions);
    const up = sorted.every((c, i) => i === 0 || c.frequencyHz > (sorted[i - 1]?.frequencyHz ?? -Infinity));
    const down = sorted.every((c, i) => i === 0 || c.frequencyHz < (sorted[i - 1]?.frequencyHz ?? Infinity));
    if (chart.length >= 2 && !up && !down)
      issues.add(at('chart'), m.chart, 'a chart whose frequency rises or falls steadily with divisions');
  }
  const planHz: number[] = [];
  m.plan.forEach((p, i) => {
    const hz = frequencyOrIssue(issues, p, at(`plan[${i}]`));
    if (hz === undefined || minHz === undefined || maxHz === undefined) return;
    const out = checkInBand(hz, minHz, maxHz, at(`plan[${i}]`));
    if (out) issues.fromParse(at(`plan[${i}]`), p, out, 'a frequency inside the band');
    else planHz.push(hz);
  });
  // Meters are never deleted, so an asset id once used stays taken: never reused.
  if (options.newAssetId && getMeterByAsset(ctx.db, m.assetId))
    issues.add(
      at('assetId'),
      m.assetId,
      'an asset id not already in the register',
      `${at('assetId')}: ${m.assetId} is already in the register (an asset id is never reused)`,
    );
  if (issues.list.length > before) return undefined;
  return {
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
}

/** A stored meter written back as the fields of a meter document (frequencies in Hz with
 * their unit), so an edit can lay only the changed fields over it and validate the whole. */
export function fieldsOfMeter(m: Meter): Record<string, unknown> {
  const hz = (v: number) => `${v} Hz`;
  return {
    assetId: m.assetId,
    description: m.description,
    construction: m.construction,
    port: m.port,
    min: hz(m.minHz),
    max: hz(m.maxHz),
    dialKind: m.dialKind,
    accuracyRelPpm: m.accuracyRelPpm,
    accuracyAbs: hz(m.accuracyAbsHz),
    resolution: m.dialKind === 'direct' ? hz(m.resolution) : m.resolution,
    chart: m.chart.map((c) => ({ divisions: c.divisions, frequency: hz(c.frequencyHz) })),
    alphaPerK: m.alphaPerK,
    alphaUncertaintyPerK: m.alphaUncertaintyPerK,
    reference: { ...m.reference },
    loadedQ: m.loadedQ,
    settingFraction: m.settingFraction,
    minDipDb: m.minDipDb,
    maxInputPowerW: m.maxInputPowerW,
    location: m.location,
    state: m.state,
    intervalMonths: m.intervalMonths,
    plan: m.planHz.map(hz),
  };
}
