// Reader of Touchstone files (.s1p, .s2p; Version 1.x and 2.0) for sweeps of a meter: the
// through-line response S21 of a two-port, or S11 of a one-port. Never throws on bad input: the
// answer names the line and what was wrong. No Node APIs, so the renderer can use it too.
// Source: IBIS Open Forum, "Touchstone File Format Specification", Version 2.0 (2009), which
// also describes Version 1.x: comments from "!" to the end of a line; one option line
// "# <unit> <parameter> <format> R <n>" with defaults GHz, S, MA, R 50, only the first counting;
// formats DB (20 log10 |S|, angle in degrees), MA, RI; 2-port data of Version 1.x in the order
// N11 N21 N12 N22 on one line, a frequency decrease starting the noise data; Version 2.0
// keywords [Version], [Number of Ports], [Two-Port Data Order] (12_21 or 21_12, required for two
// ports), [Number of Frequencies] (required), [Reference], [Matrix Format], [Network Data],
// [Noise Data], [End] (required), a frequency point that may span lines but starts on a new one.

import { failAt, numberedLines, parseNumber, type ReadResult } from './read-result';

export type TouchstoneFormat = 'DB' | 'MA' | 'RI';

export interface TouchstoneData {
  version: '1' | '2';
  ports: 1 | 2;
  parameter: 'S' | 'Y' | 'Z' | 'H' | 'G';
  format: TouchstoneFormat;
  frequencyUnit: 'Hz' | 'kHz' | 'MHz' | 'GHz';
  referenceOhms: number[];
  frequencyHz: number[];
  /** The response a meter is judged on: S21 of a two-port, S11 of a one-port (real and imaginary). */
  response: { name: 'S21' | 'S11'; re: number[]; im: number[] };
  /** Line of each frequency point, for messages. */
  lines: number[];
}

const UNITS: Record<string, [TouchstoneData['frequencyUnit'], number]> = {
  HZ: ['Hz', 1],
  KHZ: ['kHz', 1e3],
  MHZ: ['MHz', 1e6],
  GHZ: ['GHz', 1e9],
};

function toComplex(format: TouchstoneFormat, a: number, b: number): [number, number] {
  if (format === 'RI') return [a, b];
  const magnitude = format === 'DB' ? 10 ** (a / 20) : a;
  const rad = (b * Math.PI) / 180;
  return [magnitude * Math.cos(rad), magnitude * Math.sin(rad)];
}

function portsFromName(fileName: string | undefined): number | null {
  const m = /\.s(\d+)p$/i.exec(fileName ?? '');
  return m ? Number(m[1]) : null;
}

interface Pending {
  line: number;
  values: number[];
}

/** Reads a Touchstone file. `fileName` gives the port count of a Version 1.x file (.s1p, .s2p). */
export function readTouchstone(text: string, fileName?: string): ReadResult<TouchstoneData> {
  const warnings: string[] = [];
  const lines = numberedLines(text);
  if (lines.every((l) => l.text.replace(/!.*$/, '').trim() === '')) return failAt(null, 'the file is empty');

  let version: '1' | '2' = '1';
  let sawFirst = false;
  let option: {
    unit: TouchstoneData['frequencyUnit'];
    scale: number;
    parameter: TouchstoneData['parameter'];
    format: TouchstoneFormat;
    r: number;
  } | null = null;
  let ports = portsFromName(fileName);
  let portsLine: number | null = null;
  let order: '12_21' | '21_12' | null = null;
  let declaredFrequencies: number | null = null;
  let matrixFormat: 'full' | 'lower' | 'upper' = 'full';
  let reference: number[] | null = null;
  let referenceWanted = 0;
  let inNetwork = false;
  let inNoise = false;
  let inInformation = false;
  let ended = false;
  const points: Pending[] = [];
  let pending: Pending | null = null;
  let lastLine = 1;

  const perPoint = () => {
    const n = ports ?? 0;
    const pairs = matrixFormat === 'full' ? n * n : (n * (n + 1)) / 2;
    return 1 + 2 * pairs;
  };

  for (const { line, text: raw } of lines) {
    const content = raw.replace(/!.*$/, '').trim();
    if (content === '') continue;
    lastLine = line;
    if (ended) {
      return failAt(line, `text after [End]: ${JSON.stringify(content.slice(0, 40))}`);
    }
    if (!sawFirst) {
      sawFirst = true;
      if (/^\[version\]/i.test(content)) {
        const v = content.replace(/^\[version\]/i, '').trim();
        if (!/^2\.\d+$/.test(v)) return failAt(line, `[Version] ${JSON.stringify(v)}: expected 2.0 or 2.1`);
        version = '2';
        continue;
      }
    }
    if (referenceWanted > 0 && reference) {
      for (const tok of content.split(/\s+/)) {
        const v = parseNumber(tok);
        if (v === null || v <= 0)
          return failAt(line, `[Reference]: ${JSON.stringify(tok)} is not a resistance in ohms`);
        reference.push(v);
      }
      referenceWanted = Math.max(0, (ports ?? 0) - reference.length);
      continue;
    }
    if (content.startsWith('#')) {
      if (option) {
        warnings.push(
          `line ${line}: a second option line is ignored (the specification uses only the first)`,
        );
        continue;
      }
      if (version === '2' && inNetwork)
        return failAt(line, 'the option line must come before [Network Data]');
      const tokens = content.slice(1).trim().split(/\s+/).filter(Boolean);
      const o = {
        unit: 'GHz' as TouchstoneData['frequencyUnit'],
        scale: 1e9,
        parameter: 'S' as TouchstoneData['parameter'],
        format: 'MA' as TouchstoneFormat,
        r: 50,
      };
      for (let k = 0; k < tokens.length; k++) {
        const t = (tokens[k] as string).toUpperCase();
        const unit = UNITS[t];
        if (unit) {
          [o.unit, o.scale] = unit;
        } else if (['S', 'Y', 'Z', 'H', 'G'].includes(t)) o.parameter = t as TouchstoneData['parameter'];
        else if (['DB', 'MA', 'RI'].includes(t)) o.format = t as TouchstoneFormat;
        else if (t === 'R') {
          const v = parseNumber(tokens[k + 1] ?? '');
          if (v === null || v <= 0)
            return failAt(line, 'option line: "R" must be followed by the reference resistance in ohms');
          o.r = v;
          k++;
        } else
          return failAt(
            line,
            `option line: ${JSON.stringify(tokens[k])} is not a frequency unit (Hz, kHz, MHz, GHz), parameter (S, Y, Z, H, G), format (DB, MA, RI) or "R n"`,
          );
      }
      option = o;
      continue;
    }
    if (content.startsWith('[')) {
      const m = /^\[([^\]]+)\]\s*(.*)$/.exec(content);
      if (!m)
        return failAt(line, `a keyword without its closing bracket: ${JSON.stringify(content.slice(0, 40))}`);
      const keyword = (m[1] as string).trim().toLowerCase();
      const value = (m[2] as string).trim();
      if (version !== '2')
        return failAt(
          line,
          `[${m[1]}] is a Version 2.0 keyword, but the file does not start with [Version] 2.0`,
        );
      if (inInformation && keyword !== 'end information') continue;
      switch (keyword) {
        case 'version':
          return failAt(line, '[Version] may appear only once, as the first line');
        case 'number of ports': {
          const v = parseNumber(value);
          if (v === null || !Number.isInteger(v) || v < 1)
            return failAt(
              line,
              `[Number of Ports] ${JSON.stringify(value)}: expected a whole number of ports`,
            );
          if (v > 2) return failAt(line, `[Number of Ports] ${v}: only one- and two-port files are read`);
          ports = v;
          portsLine = line;
          break;
        }
        case 'two-port data order':
          if (value !== '12_21' && value !== '21_12')
            return failAt(line, `[Two-Port Data Order] ${JSON.stringify(value)}: expected 12_21 or 21_12`);
          order = value;
          break;
        case 'number of frequencies': {
          const v = parseNumber(value);
          if (v === null || !Number.isInteger(v) || v < 1)
            return failAt(
              line,
              `[Number of Frequencies] ${JSON.stringify(value)}: expected a whole number above 0`,
            );
          declaredFrequencies = v;
          break;
        }
        case 'number of noise frequencies':
          break;
        case 'reference': {
          if (ports === null) return failAt(line, '[Reference] must follow [Number of Ports]');
          reference = [];
          for (const tok of value.split(/\s+/).filter(Boolean)) {
            const v = parseNumber(tok);
            if (v === null || v <= 0)
              return failAt(line, `[Reference]: ${JSON.stringify(tok)} is not a resistance in ohms`);
            reference.push(v);
          }
          referenceWanted = Math.max(0, ports - reference.length);
          break;
        }
        case 'matrix format': {
          const v = value.toLowerCase();
          if (v !== 'full' && v !== 'lower' && v !== 'upper')
            return failAt(line, `[Matrix Format] ${JSON.stringify(value)}: expected Full, Lower or Upper`);
          matrixFormat = v;
          break;
        }
        case 'mixed-mode order':
          return failAt(line, '[Mixed-Mode Order]: mixed-mode data is not a sweep of a meter');
        case 'begin information':
          inInformation = true;
          break;
        case 'end information':
          inInformation = false;
          break;
        case 'network data':
          if (!option)
            return failAt(line, 'the option line ("# GHz S MA R 50") must come before [Network Data]');
          if (ports === null) return failAt(line, '[Number of Ports] is required before [Network Data]');
          if (ports === 2 && order === null)
            return failAt(line, '[Two-Port Data Order] (12_21 or 21_12) is required for a two-port file');
          if (declaredFrequencies === null)
            return failAt(line, '[Number of Frequencies] is required before [Network Data]');
          inNetwork = true;
          break;
        case 'noise data':
          inNetwork = false;
          inNoise = true;
          break;
        case 'end':
          ended = true;
          break;
        default:
          warnings.push(`line ${line}: keyword [${m[1]}] is not used and was skipped`);
      }
      continue;
    }
    if (inInformation || inNoise) continue;
    // A data line.
    if (!option)
      return failAt(
        line,
        'data before the option line: a Touchstone file needs one, such as "# GHz S RI R 50"',
      );
    if (version === '2' && !inNetwork) return failAt(line, 'data outside [Network Data]');
    const tokens = content.split(/\s+/);
    const values: number[] = [];
    for (const tok of tokens) {
      const v = parseNumber(tok);
      if (v === null) return failAt(line, `${JSON.stringify(tok)} is not a number`);
      values.push(v);
    }
    if (version === '1') {
      if (ports === null) {
        // No .sNp name: one- and two-port points are one line each, so the count tells.
        if (values.length === 3) ports = 1;
        else if (values.length === 9) ports = 2;
        else
          return failAt(
            line,
            `cannot tell the number of ports: name the file .s1p or .s2p (${values.length} values on the first data line)`,
          );
      }
      if (ports > 2) return failAt(line, `a ${ports}-port file: only .s1p and .s2p files are read`);
      const previous = points[points.length - 1];
      if (
        ports === 2 &&
        values.length === 5 &&
        previous &&
        (values[0] as number) <= (previous.values[0] as number)
      ) {
        // Noise parameters of a Version 1.x two-port start where the frequency falls.
        inNoise = true;
        continue;
      }
      if (values.length !== perPoint()) {
        return failAt(
          line,
          values.length < perPoint()
            ? `truncated: a ${ports}-port point has ${perPoint()} values (frequency and ${perPoint() - 1} numbers), this line has ${values.length}`
            : `${values.length} values where a ${ports}-port point has ${perPoint()}`,
        );
      }
      points.push({ line, values });
      continue;
    }
    // Version 2: a point may span lines but starts on a new line.
    if (!pending) pending = { line, values: [] };
    pending.values.push(...values);
    if (pending.values.length > perPoint())
      return failAt(
        line,
        `${pending.values.length} values for the point begun on line ${pending.line}, where a ${ports}-port point has ${perPoint()}`,
      );
    if (pending.values.length === perPoint()) {
      points.push(pending);
      pending = null;
    }
  }

  if (pending) {
    return failAt(
      pending.line,
      `truncated: the point begun here has ${pending.values.length} of its ${perPoint()} values`,
    );
  }
  if (!option) return failAt(null, 'no option line ("# GHz S RI R 50") and no data');
  if (version === '2' && !ended) return failAt(lastLine, 'the file ends without [End]');
  if (points.length === 0) return failAt(null, 'no frequency points');
  if (version === '2' && declaredFrequencies !== null && declaredFrequencies !== points.length)
    return failAt(
      lastLine,
      `[Number of Frequencies] says ${declaredFrequencies}, the file has ${points.length} points`,
    );
  if (ports === null || (ports !== 1 && ports !== 2))
    return failAt(portsLine, 'only one- and two-port files are read');

  const frequencyHz: number[] = [];
  const re: number[] = [];
  const im: number[] = [];
  // Index of the pair holding S21 (two-port) or S11 (one-port), after the frequency.
  let pair = 0;
  if (ports === 2) {
    if (matrixFormat === 'upper')
      pair = 1; // N11 N12 N22: a reciprocal meter has S21 = S12
    else if (matrixFormat === 'lower')
      pair = 1; // N11 N21 N22
    else pair = version === '2' && order === '12_21' ? 2 : 1;
  }
  for (let k = 0; k < points.length; k++) {
    const p = points[k] as Pending;
    const fHz = (p.values[0] as number) * option.scale;
    if (!(fHz > 0)) return failAt(p.line, `frequency ${p.values[0]} ${option.unit} is not positive`);
    const prev = frequencyHz[frequencyHz.length - 1];
    if (prev !== undefined && !(fHz > prev))
      return failAt(
        p.line,
        `frequency ${p.values[0]} ${option.unit} does not rise above the point before; frequencies must increase`,
      );
    const [a, b] = toComplex(
      option.format,
      p.values[1 + 2 * pair] as number,
      p.values[2 + 2 * pair] as number,
    );
    frequencyHz.push(fHz);
    re.push(a);
    im.push(b);
  }
  return {
    ok: true,
    warnings,
    value: {
      version,
      ports,
      parameter: option.parameter,
      format: option.format,
      frequencyUnit: option.unit,
      referenceOhms: reference ?? new Array<number>(ports).fill(option.r),
      frequencyHz,
      response: { name: ports === 2 ? 'S21' : 'S11', re, im },
      lines: points.map((p) => p.line),
    },
  };
}
