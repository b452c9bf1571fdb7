// The register CSV: one meter a row, as a lab keeps its register in a spreadsheet. The reader
// never throws: it gives each row's fields as a meter document (text kept as typed, numbers
// read) with the physical line it ends on, and every problem of the text as data naming the
// line, the column, the value and what was expected. Meaning (units against the band, duplicate
// asset ids) is judged by the service. The writer writes the same columns, so an export reads
// back as the same register.
import { parse as parseCsv } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import type { Meter } from '../model/records';

/** The columns, in order, and the meter document field each fills. */
export const REGISTER_COLUMNS = [
  'asset_id',
  'description',
  'construction',
  'port',
  'min',
  'max',
  'dial_kind',
  'accuracy_rel_ppm',
  'accuracy_abs',
  'resolution',
  'chart',
  'alpha_per_k',
  'alpha_uncertainty_per_k',
  'reference_temperature_c',
  'reference_pressure_hpa',
  'reference_humidity_pct',
  'loaded_q',
  'setting_fraction',
  'min_dip_db',
  'max_input_power_w',
  'location',
  'state',
  'interval_months',
  'plan',
] as const;
export type RegisterColumn = (typeof REGISTER_COLUMNS)[number];

const REQUIRED: ReadonlySet<RegisterColumn> = new Set([
  'asset_id',
  'construction',
  'min',
  'max',
  'dial_kind',
  'accuracy_rel_ppm',
  'resolution',
  'alpha_per_k',
]);

const NUMBERS: ReadonlySet<RegisterColumn> = new Set([
  'accuracy_rel_ppm',
  'alpha_per_k',
  'alpha_uncertainty_per_k',
  'reference_temperature_c',
  'reference_pressure_hpa',
  'reference_humidity_pct',
  'loaded_q',
  'setting_fraction',
  'min_dip_db',
  'max_input_power_w',
  'interval_months',
]);

/** The column a meter document field comes from ("reference.temperatureC" -> its column). */
export function columnOfField(field: string): RegisterColumn | undefined {
  const head = field.replace(/^\./, '').split(/[.[]/)[0] ?? '';
  if (head === 'reference') {
    const sub = field.split('.')[1] ?? '';
    if (sub.startsWith('temperature')) return 'reference_temperature_c';
    if (sub.startsWith('pressure')) return 'reference_pressure_hpa';
    if (sub.startsWith('humidity')) return 'reference_humidity_pct';
  }
  const map: Record<string, RegisterColumn> = {
    assetId: 'asset_id',
    description: 'description',
    construction: 'construction',
    port: 'port',
    min: 'min',
    max: 'max',
    dialKind: 'dial_kind',
    accuracyRelPpm: 'accuracy_rel_ppm',
    accuracyAbs: 'accuracy_abs',
    resolution: 'resolution',
    chart: 'chart',
    alphaPerK: 'alpha_per_k',
    alphaUncertaintyPerK: 'alpha_uncertainty_per_k',
    loadedQ: 'loaded_q',
    settingFraction: 'setting_fraction',
    minDipDb: 'min_dip_db',
    maxInputPowerW: 'max_input_power_w',
    location: 'location',
    state: 'state',
    intervalMonths: 'interval_months',
    plan: 'plan',
  };
  return map[head];
}

export interface RegisterCsvIssue {
  line: number;
  column: string;
  value: string;
  expected: string;
  message: string;
}

export interface RegisterCsvRow {
  line: number;
  /** A meter document (dipledger meter.json fields) as the row gives it. */
  document: Record<string, unknown>;
}

export interface RegisterCsvRead {
  rows: RegisterCsvRow[];
  issues: RegisterCsvIssue[];
}

function issue(line: number, column: string, value: string, expected: string): RegisterCsvIssue {
  return {
    line,
    column,
    value,
    expected,
    message: `line ${line}, column ${column}: ${JSON.stringify(value)}: expected ${expected}`,
  };
}

/** Reads a register CSV; never throws. */
export function readRegisterCsv(text: string): RegisterCsvRead {
  const issues: RegisterCsvIssue[] = [];
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parseCsv(text, {
      bom: true,
      trim: true,
      skip_empty_lines: true,
      relax_column_count: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (e) {
    const line = (e as { lines?: number }).lines ?? 1;
    const why = e instanceof Error ? e.message : String(e);
    return { rows: [], issues: [issue(line, '-', '', `text a CSV reader can read (${why})`)] };
  }
  const header = records[0];
  if (!header)
    return { rows: [], issues: [issue(1, '-', '', `a header line: ${REGISTER_COLUMNS.join(',')}`)] };
  const names = header.record.map((h) => h.toLowerCase());
  const index = new Map<string, number>();
  names.forEach((n, i) => {
    if (!(REGISTER_COLUMNS as readonly string[]).includes(n))
      issues.push(
        issue(header.info.lines, n || `(column ${i + 1})`, n, `one of ${REGISTER_COLUMNS.join(', ')}`),
      );
    else if (index.has(n)) issues.push(issue(header.info.lines, n, n, 'each column once'));
    else index.set(n, i);
  });
  for (const c of REQUIRED)
    if (!index.has(c)) issues.push(issue(header.info.lines, c, '', `a column ${c} in the header`));
  if (issues.length > 0) return { rows: [], issues };

  const rows: RegisterCsvRow[] = [];
  for (const r of records.slice(1)) {
    const line = r.info.lines;
    if (r.record.length !== names.length) {
      issues.push(issue(line, '-', r.record.join(','), `${names.length} fields, as in the header`));
      continue;
    }
    const get = (c: RegisterColumn) => {
      const i = index.get(c);
      return i === undefined ? '' : (r.record[i] ?? '');
    };
    const doc: Record<string, unknown> = {};
    const reference: Record<string, number> = {};
    const before = issues.length;
    for (const c of REGISTER_COLUMNS) {
      const v = get(c);
      if (v === '') {
        if (REQUIRED.has(c)) issues.push(issue(line, c, v, 'a value (this column is required)'));
        continue;
      }
      if (NUMBERS.has(c)) {
        const n = Number(v);
        if (!Number.isFinite(n)) {
          issues.push(issue(line, c, v, 'a number'));
          continue;
        }
        if (c.startsWith('reference_'))
          reference[
            c === 'reference_temperature_c'
              ? 'temperatureC'
              : c === 'reference_pressure_hpa'
                ? 'pressureHpa'
                : 'humidityPct'
          ] = n;
        else doc[fieldOf(c)] = n;
        continue;
      }
      if (c === 'chart') {
        const points: { divisions: number; frequency: string }[] = [];
        for (const part of v
          .split(';')
          .map((p) => p.trim())
          .filter(Boolean)) {
          const [d, f] = part.split('=').map((x) => x.trim());
          const divisions = Number(d);
          if (d === undefined || d === '' || !Number.isFinite(divisions) || !f) {
            issues.push(
              issue(
                line,
                c,
                part,
                'chart rows as divisions=frequency separated by ";", such as "12.5=9.3 GHz"',
              ),
            );
            continue;
          }
          points.push({ divisions, frequency: f });
        }
        doc.chart = points;
        continue;
      }
      if (c === 'plan') {
        doc.plan = v
          .split(';')
          .map((p) => p.trim())
          .filter(Boolean);
        continue;
      }
      if (c === 'resolution') {
        // Divisions are a bare number; a frequency carries its unit.
        doc.resolution = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(v) ? Number(v) : v;
        continue;
      }
      doc[fieldOf(c)] = v;
    }
    if (Object.keys(reference).length > 0) doc.reference = reference;
    if (issues.length === before) rows.push({ line, document: doc });
  }
  if (rows.length === 0 && issues.length === 0)
    issues.push(issue(header.info.lines, '-', '', 'at least one meter below the header'));
  return { rows, issues };
}

function fieldOf(c: RegisterColumn): string {
  return c.replace(/_([a-z])/g, (_m, ch: string) => ch.toUpperCase()).replace(/^assetId$/, 'assetId');
}

/** Writes meters in the register CSV's columns (frequencies in Hz with their unit). */
export function writeRegisterCsv(meters: readonly Meter[]): string {
  const hz = (v: number) => `${v} Hz`;
  const rows = meters.map((m) => [
    m.assetId,
    m.description,
    m.construction,
    m.port,
    hz(m.minHz),
    hz(m.maxHz),
    m.dialKind,
    String(m.accuracyRelPpm),
    hz(m.accuracyAbsHz),
    m.dialKind === 'direct' ? hz(m.resolution) : String(m.resolution),
    m.chart.map((c) => `${c.divisions}=${hz(c.frequencyHz)}`).join(';'),
    String(m.alphaPerK),
    String(m.alphaUncertaintyPerK),
    String(m.reference.temperatureC),
    String(m.reference.pressureHpa),
    String(m.reference.humidityPct),
    String(m.loadedQ),
    String(m.settingFraction),
    String(m.minDipDb),
    String(m.maxInputPowerW),
    m.location,
    m.state,
    String(m.intervalMonths),
    m.planHz.map(hz).join(';'),
  ]);
  return stringify([[...REGISTER_COLUMNS], ...rows], { record_delimiter: '\n' });
}
