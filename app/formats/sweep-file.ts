// One entry for every kind of sweep file: picks the Touchstone or the delimited reader by the
// file's name or its first line, and hands back the trace the resonance fit takes. Never throws.

import type { Trace } from '../engine/resonance';
import { readTouchstone } from './touchstone';
import { readDelimitedTrace, type LevelKind, type TraceImportOptions } from './trace-csv';
import { failAt, type ReadResult } from './read-result';

export interface SweepFile {
  source: 'touchstone' | 'delimited';
  /** What the trace's level is: complex S21/S11, or a scalar level converted to linear power. */
  level: LevelKind | 'touchstone';
  trace: Trace;
  /** Line of each point in the file. */
  lines: number[];
  description: string;
}

function looksLikeTouchstone(text: string): boolean {
  const first = text
    .replace(/^\uFEFF/, '')
    .split(/\r\n|\r|\n/)
    .map((l) => l.replace(/!.*$/, '').trim())
    .find((l) => l !== '');
  return first !== undefined && (first.startsWith('#') || /^\[version\]/i.test(first));
}

export function readSweepFile(
  text: string,
  fileName: string,
  options: TraceImportOptions = {},
): ReadResult<SweepFile> {
  if (typeof text !== 'string') return failAt(null, 'the file is not text');
  const touchstone =
    /\.(s\dp|ts)$/i.test(fileName) || (!/\.(csv|txt|tsv|dat)$/i.test(fileName) && looksLikeTouchstone(text));
  if (touchstone) {
    const r = readTouchstone(text, fileName);
    if (!r.ok) return r;
    const d = r.value;
    if (d.parameter !== 'S')
      return failAt(null, `the file holds ${d.parameter}-parameters; a sweep of a meter needs S-parameters`);
    return {
      ok: true,
      warnings: r.warnings,
      value: {
        source: 'touchstone',
        level: 'touchstone',
        trace: { kind: 'complex', frequencyHz: d.frequencyHz, re: d.response.re, im: d.response.im },
        lines: d.lines,
        description: `Touchstone ${d.version === '2' ? '2.0' : '1.x'}, ${d.response.name} (${d.format}), ${d.frequencyHz.length} points`,
      },
    };
  }
  const r = readDelimitedTrace(text, options);
  if (!r.ok) return r;
  const d = r.value;
  const trace: Trace =
    d.level === 'ri'
      ? { kind: 'complex', frequencyHz: d.frequencyHz, re: d.re, im: d.im }
      : { kind: 'scalar', frequencyHz: d.frequencyHz, power: d.power };
  const words: Record<LevelKind, string> = {
    db: 'level in dB',
    linear: 'linear power',
    volts: 'detector volts',
    ri: 'real and imaginary S21',
  };
  return {
    ok: true,
    warnings: r.warnings,
    value: {
      source: 'delimited',
      level: d.level,
      trace,
      lines: d.lines,
      description: `delimited trace, ${words[d.level]}, ${d.frequencyHz.length} points`,
    },
  };
}
