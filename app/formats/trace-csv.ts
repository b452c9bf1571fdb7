// Reader of delimited traces: frequency with a detector level in dB, linear power or detector
// volts (or real and imaginary S21), one point per line, as instruments and bench notes write
// them. A stepped set of readings typed at the bench is the same thing, only shorter. Never throws
// on bad input: the answer names the line and what was wrong. No Node APIs (renderer-safe).
//
// Hand-split rather than read with csv-parse: these files are columns of plain numbers, often
// separated by spaces or tabs, which RFC 4180 readers do not split; quoting never occurs in them;
// and a message must name the physical line. A square-law diode detector gives a voltage
// proportional to power, often negative-going, so its sign and offset are import settings
// (common practice).

import { failAt, numberedLines, parseNumber, type ReadResult } from './read-result';

export type LevelKind = 'db' | 'linear' | 'volts' | 'ri';
export type FrequencyUnit = 'Hz' | 'kHz' | 'MHz' | 'GHz';

export interface TraceImportOptions {
  /** What the level column holds; taken from the header when it says (dB, W, V, re/im). */
  level?: LevelKind;
  /** Unit of the frequency column; taken from the header when it says (frequency_GHz). */
  frequencyUnit?: FrequencyUnit;
  /** Detector volts: +1 when the voltage rises with power, -1 when it falls (negative-going). */
  detectorSign?: 1 | -1;
  /** Detector volts: the reading with no power, subtracted before the sign. */
  detectorOffsetV?: number;
}

export interface DelimitedTrace {
  level: LevelKind;
  frequencyHz: number[];
  /** Linear power (scalar levels), or real parts (ri). */
  power: number[];
  re: number[];
  im: number[];
  lines: number[];
}

const UNIT_SCALE: Record<FrequencyUnit, number> = { Hz: 1, kHz: 1e3, MHz: 1e6, GHz: 1e9 };

/** Bare frequency values from 1e8 up are read as Hz, as for frequencies typed anywhere else. */
const BARE_HZ_FROM = 1e8;

function unitIn(name: string): FrequencyUnit | undefined {
  const m = /(^|[^a-z])(ghz|mhz|khz|hz)([^a-z]|$)/i.exec(name);
  if (!m) return undefined;
  const u = (m[2] as string).toLowerCase();
  return u === 'ghz' ? 'GHz' : u === 'mhz' ? 'MHz' : u === 'khz' ? 'kHz' : 'Hz';
}

function levelIn(names: string[]): { level?: LevelKind; voltScale: number } {
  const n = names.map((s) => s.toLowerCase());
  if (
    n.length >= 3 &&
    /(^|[^a-z])(re|real)([^a-z]|$)/.test(n[1] ?? '') &&
    /(^|[^a-z])(im|imag)/.test(n[2] ?? '')
  )
    return { level: 'ri', voltScale: 1 };
  const name = n[1] ?? '';
  if (/db/.test(name)) return { level: 'db', voltScale: 1 };
  if (/(^|[^a-z])mv([^a-z]|$)/.test(name)) return { level: 'volts', voltScale: 1e-3 };
  if (/(^|[^a-z])(v|volts?|detector)([^a-z]|$)/.test(name)) return { level: 'volts', voltScale: 1 };
  if (/(^|[^a-z])(mw|w|watts?|power|linear)([^a-z]|$)/.test(name)) return { level: 'linear', voltScale: 1 };
  return { voltScale: 1 };
}

function split(text: string): string[] {
  return text
    .trim()
    .split(/\s*[,;\t]\s*|\s+/)
    .map((t) => t.replace(/^"(.*)"$/, '$1').trim());
}

/** Reads a delimited trace (comma, semicolon, tab or spaces; "#" and "!" start comments). */
export function readDelimitedTrace(
  text: string,
  options: TraceImportOptions = {},
): ReadResult<DelimitedTrace> {
  const rows = numberedLines(text)
    .map((l) => ({ line: l.line, text: l.text.replace(/[#!].*$/, '').trim() }))
    .filter((l) => l.text !== '');
  if (rows.length === 0) return failAt(null, 'the file is empty');
  const warnings: string[] = [];
  let unit = options.frequencyUnit;
  let level = options.level;
  let voltScale = 1;
  let start = 0;
  const first = rows[0] as { line: number; text: string };
  const firstFields = split(first.text);
  if (parseNumber(firstFields[0] ?? '') === null) {
    // A header: it may name the frequency unit and what the level is.
    start = 1;
    unit ??= unitIn(firstFields[0] ?? '');
    const hint = levelIn(firstFields);
    level ??= hint.level;
    voltScale = hint.voltScale;
  }
  if (level === undefined && split((rows[start] ?? first).text).length >= 3) {
    // Three or more numbers a row with nothing saying what they are: Re/Im and dB/angle are both
    // common, and a wrong guess gives a wrong resonance, so ask rather than guess.
    return failAt(
      (rows[start] ?? first).line,
      'more than two columns and no header saying what they hold: choose the level (ri for real and imaginary parts, db, linear or volts for the second column)',
    );
  }
  level ??= 'db';
  const columns = level === 'ri' ? 3 : 2;
  const sign = options.detectorSign ?? 1;
  const offset = options.detectorOffsetV ?? 0;
  const out: DelimitedTrace = { level, frequencyHz: [], power: [], re: [], im: [], lines: [] };
  for (const row of rows.slice(start)) {
    const fields = split(row.text);
    if (fields.length < columns)
      return failAt(
        row.line,
        `truncated: expected ${columns} values (frequency and ${level === 'ri' ? 'real and imaginary parts' : 'level'}), found ${fields.length}`,
      );
    const values: number[] = [];
    for (const tok of fields.slice(0, columns)) {
      const v = parseNumber(tok);
      if (v === null) return failAt(row.line, `${JSON.stringify(tok)} is not a number`);
      values.push(v);
    }
    if (fields.length > columns && out.lines.length === 0)
      warnings.push(`line ${row.line}: only the first ${columns} columns are read`);
    const raw = values[0] as number;
    let fHz: number;
    if (unit) fHz = raw * UNIT_SCALE[unit];
    else if (raw >= BARE_HZ_FROM) fHz = raw;
    else
      return failAt(
        row.line,
        `frequency ${raw} has no unit: name it in the header (such as "frequency_GHz") or choose the unit when importing`,
      );
    if (!(fHz > 0)) return failAt(row.line, `frequency ${raw} is not positive`);
    const prev = out.frequencyHz[out.frequencyHz.length - 1];
    if (prev !== undefined && !(fHz > prev))
      return failAt(
        row.line,
        `frequency ${raw} does not rise above the line before; frequencies must increase`,
      );
    const l = values[1] as number;
    let p: number;
    if (level === 'ri') {
      out.re.push(l);
      out.im.push(values[2] as number);
      p = l * l + (values[2] as number) ** 2;
    } else if (level === 'db') p = 10 ** (l / 10);
    else if (level === 'linear') {
      if (!(l > 0)) return failAt(row.line, `power ${l} is not positive`);
      p = l;
    } else {
      p = sign * (l * voltScale - offset);
      if (!(p > 0))
        return failAt(
          row.line,
          `detector reading ${l} gives no positive power with sign ${sign > 0 ? '+1' : '-1'} and offset ${offset} V` +
            (sign > 0 && l < 0 ? '; a negative-going detector needs sign -1' : ''),
        );
    }
    out.frequencyHz.push(fHz);
    out.power.push(p);
    out.lines.push(row.line);
  }
  if (out.frequencyHz.length === 0) return failAt(first.line, 'a header but no data');
  return { ok: true, value: out, warnings };
}
