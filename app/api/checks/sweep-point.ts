// Check points by the sweep method: read the point's trace, fit its resonance, parse the
// dial graduation and judge the point with the fit's u(f0) in place of the operator's lines.
// Called from prepareCheck (checks/prepare.ts); writes nothing. Problems are added to the document's
// issue list, each naming its field, so one refusal still names every problem.
import { evaluateSweepPoint } from '../../engine/sweep-point';
import {
  fitResonances,
  requireTrustworthy,
  ResonanceError,
  type FitModel,
  type ResonanceReport,
  type Trace,
} from '../../engine/resonance';
import type { Conditions, DecisionRule } from '../../engine/model';
import { parseFrequencyHz } from '../../engine';
import type { Issues } from '../issues';
import { specOf } from './spec';
import { readSweepFile, type SweepFile } from '../../formats/sweep-file';
import { readDelimitedTrace } from '../../formats/trace-csv';
import type { Meter } from '../contract';
import type { StandardRecord } from '../../../db/queries/standards';
import type { SweepData } from '../../../db/queries/sweeps';
import type { SweepInput } from '../schemas-sweep';
import type { PreparedPoint } from './prepared';

/** Number of parameters of each fit model, for the degrees of freedom of u(f0). */
const FIT_PARAMETERS = { 'scalar-lorentzian': 5, 'complex-circle': 6 } as const;

/** Reads a sweep input (file text or typed points) into a trace; adds an issue and returns
 * undefined when it cannot. */
export function sweepTrace(
  issues: Issues,
  sweep: SweepInput,
  field: string,
): { file: SweepFile; sourceKind: SweepData['sourceKind'] } | undefined {
  const options = {
    level: sweep.level,
    frequencyUnit: sweep.frequencyUnit,
    detectorSign: sweep.detectorSign,
    detectorOffsetV: sweep.detectorOffsetV,
  };
  const given = [sweep.text !== undefined, sweep.points !== undefined].filter(Boolean).length;
  if (given !== 1) {
    issues.add(
      field,
      sweep.file ?? '(none)',
      'the text of one trace file, or typed points',
      sweep.file !== undefined && sweep.text === undefined
        ? `${field}.file: ${JSON.stringify(sweep.file)} must be read by the client (the command line reads it); the service takes the file's text`
        : `${field}: give either the text of a trace file or typed points, not ${given === 0 ? 'neither' : 'both'}`,
    );
    return undefined;
  }
  if (sweep.points !== undefined) {
    // Typed readings: frequencies carry their units like any typed frequency.
    const rows: string[] = [];
    for (const [k, pt] of sweep.points.entries()) {
      const r = parseFrequencyHz(pt.frequency, `${field}.points[${k}].frequency`);
      if (!r.ok) {
        issues.fromParse(
          `${field}.points[${k}].frequency`,
          pt.frequency,
          r.message,
          'a frequency such as "9.3 GHz"',
        );
        return undefined;
      }
      rows.push(`${r.hz},${pt.level}`);
    }
    const read = readDelimitedTrace(rows.join('\n'), { ...options, frequencyUnit: 'Hz' });
    if (!read.ok) {
      // Line k of the text built here is typed point k - 1.
      const m = /^line (\d+): (.*)$/.exec(read.message);
      const at = m ? `${field}.points[${Number(m[1]) - 1}]` : `${field}.points`;
      issues.add(at, undefined, 'typed points that make a trace', `${at}: ${m ? m[2] : read.message}`);
      return undefined;
    }
    const d = read.value;
    const trace: Trace = { kind: 'scalar', frequencyHz: d.frequencyHz, power: d.power };
    return {
      sourceKind: 'typed',
      file: {
        source: 'delimited',
        level: d.level,
        trace,
        lines: d.lines,
        description: `${d.frequencyHz.length} typed points`,
      },
    };
  }
  const name = sweep.name ?? sweep.file ?? 'trace';
  const read = readSweepFile(sweep.text as string, name, options);
  if (!read.ok) {
    issues.add(
      `${field}.text`,
      name,
      'a readable trace file (.s1p, .s2p or delimited)',
      `${field} (${name}): ${read.message}`,
    );
    return undefined;
  }
  return { file: read.value, sourceKind: read.value.source };
}

/** Fits a trace; adds an issue and returns undefined when no resonance can be had from it, or the
 * fit fails its own judgement (the reason named). */
export function fitOrIssue(
  issues: Issues,
  trace: Trace,
  field: string,
  name: string,
  model: FitModel = 'auto',
): ResonanceReport | undefined {
  try {
    return requireTrustworthy(fitResonances(trace, { model }));
  } catch (e) {
    if (e instanceof ResonanceError) {
      issues.add(field, name, 'a sweep across one clear dip', `${field} (${name}): ${e.message}`);
      return undefined;
    }
    throw e;
  }
}

export interface SweepPointContext {
  issues: Issues;
  /** Field prefix of the point, e.g. "points[2]". */
  field: string;
  point: {
    phase: 'as-found' | 'as-left';
    standard?: string | undefined;
    dipDepthDb?: number | undefined;
    dialSetting?: string | number | undefined;
    sweep?: SweepInput | undefined;
  };
  method: 'tune-to-dip' | 'sweep';
  meter: Meter;
  conditions: Conditions;
  /** The standards of the check that had a valid certificate, and the asset ids listed. */
  standards: { record: StandardRecord; certificate: StandardRecord['certificates'][number] }[];
  listedStandards: string[];
  rule: DecisionRule;
  /** The service's reading parser (Hz for direct-reading meters, divisions otherwise). */
  readingValue(issues: Issues, meter: Meter, value: string | number, field: string): number | undefined;
}

/** Validates and computes one swept point; undefined when an issue was recorded. */
export function prepareSweepPoint(c: SweepPointContext): PreparedPoint | undefined {
  const { issues, field, point, meter } = c;
  const sweep = point.sweep;
  if (!sweep) return undefined;
  if (c.method !== 'sweep') {
    issues.add(
      `${field}.sweep`,
      c.method,
      'method "sweep" for a check with swept points',
      `${field}.sweep: the check's method is "${c.method}"; a swept point needs method "sweep"`,
    );
    return undefined;
  }
  const stdAsset = point.standard ?? c.listedStandards[0];
  if (point.standard !== undefined && !c.listedStandards.includes(point.standard)) {
    issues.add(`${field}.standard`, point.standard, 'one of the standards listed for this check');
    return undefined;
  }
  const std = c.standards.find((s) => s.record.assetId === stdAsset);
  const dial =
    point.dialSetting === undefined
      ? undefined
      : c.readingValue(issues, meter, point.dialSetting, `${field}.dialSetting`);
  const read = sweepTrace(issues, sweep, `${field}.sweep`);
  if (!read || dial === undefined || !std) return undefined;
  const name = sweep.name ?? sweep.file ?? 'typed points';
  const fit = fitOrIssue(issues, read.file.trace, `${field}.sweep`, name, sweep.model);
  if (!fit) return undefined;
  const f0 = fit.main.f0Hz;
  if (f0 < meter.minHz || f0 > meter.maxHz) {
    issues.add(
      `${field}.sweep`,
      name,
      `a resonance inside the band of ${meter.assetId}`,
      `${field}.sweep (${name}): the fitted resonance ${(f0 / 1e9).toFixed(6)} GHz is outside the band of ${meter.assetId}`,
    );
    return undefined;
  }
  let result;
  try {
    result = evaluateSweepPoint(
      specOf(meter),
      c.conditions,
      {
        dialSetting: dial,
        f0Hz: f0,
        f0UncertaintyHz: fit.main.f0UncertaintyHz,
        fitDof: Math.max(
          1,
          fit.main.pointsUsed * (fit.main.method === 'complex-circle' ? 2 : 1) -
            (fit.main.parameters ?? FIT_PARAMETERS[fit.main.method]),
        ),
        reference: {
          expandedUncertaintyPpm: std.certificate.expandedUncertaintyPpm,
          coverageFactor: std.certificate.coverageFactor,
        },
      },
      c.rule,
    );
  } catch (e) {
    issues.add(
      field,
      undefined,
      'a point that can be judged',
      `${field}: ${e instanceof Error ? e.message : String(e)}`,
    );
    return undefined;
  }
  for (const s of fit.spurious)
    result.notes.push(`spurious response at ${(s.f0Hz / 1e9).toFixed(6)} GHz (${s.depthDb.toFixed(2)} dB)`);
  const trace = read.file.trace;
  return {
    phase: point.phase,
    referenceHz: f0,
    standard: std.record,
    certificate: std.certificate,
    readings: [],
    dipDepthDb: point.dipDepthDb ?? fit.main.depthDb,
    result,
    sweep: {
      dialSetting: dial,
      sourceName: name,
      sourceKind: read.sourceKind,
      levelKind: read.file.level,
      frequencyHz: Array.from(trace.frequencyHz),
      level: Array.from(trace.kind === 'complex' ? trace.re : trace.power),
      imag: trace.kind === 'complex' ? Array.from(trace.im) : null,
      fit,
    },
  };
}
