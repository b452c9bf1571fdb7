// The history CSV (docs/exchange.md): its columns, and its rows grouped into check documents
// (one per meter and date) that the import validates like any recorded check.
//
// Built for a bulk import of a fleet's history (issue 8: 2,000 checks per second): rows stay
// arrays read by column index (an object per row named by the header cost more than reading the
// file), and the row reader takes a shortcut on unquoted text (app/formats/csv-rows.ts).
import { readCsvRows, type CsvRowsRecord } from '../formats/csv-rows';
import { LabError } from './errors';

/** Columns of the history CSV (RFC 4180), one row per reading. Documented in docs/exchange.md. */
export const CSV_COLUMNS = [
  'meter',
  'date',
  'performer',
  'standards',
  'method',
  'temperature_c',
  'u_temperature_c',
  'pressure_hpa',
  'u_pressure_hpa',
  'humidity_pct',
  'u_humidity_pct',
  'adjusted',
  'point',
  'phase',
  'reference_hz',
  'standard',
  'reading',
  'reading_unit',
  'direction',
  'dip_depth_db',
  'remarks',
] as const;

type CsvColumn = (typeof CSV_COLUMNS)[number];

const OPTIONAL_COLUMNS: readonly CsvColumn[] = [
  'remarks',
  'dip_depth_db',
  'method',
  'u_temperature_c',
  'u_pressure_hpa',
  'u_humidity_pct',
];

export interface CsvCheckDocument {
  doc: { meter: string } & Record<string, unknown>;
  /** The lines the check's rows span, "first-last", for messages. */
  lines: string;
}

interface CsvPoint {
  phase: string;
  reference: string;
  standard: string;
  readings: { value: string | number; direction: string }[];
  dipDepthDb?: number | string;
}

const num = (s: string | undefined): number | string | undefined => {
  if (s === undefined || s === '') return undefined;
  const n = Number(s);
  return Number.isFinite(n) ? n : s;
};

/** Groups CSV rows into check documents (meter + date), each with its line range. */
export function csvToDocuments(text: string): CsvCheckDocument[] {
  let rows: CsvRowsRecord[];
  try {
    rows = readCsvRows(text);
  } catch (e) {
    // Worded as csv-parse words it when it names the columns itself, as before.
    const message = (e instanceof Error ? e.message : String(e)).replace(
      /^Invalid Record Length: expect (\d+),/,
      'Invalid Record Length: columns length is $1,',
    );
    throw LabError.field('csv', undefined, 'a CSV file (RFC 4180)', `csv: ${message}`);
  }
  const header = text.replace(/^\uFEFF/, '').split(/\r?\n/, 1)[0] ?? '';
  const cols = header.split(',').map((c) => c.trim().replace(/^"|"$/g, ''));
  const missing = CSV_COLUMNS.filter((c) => !OPTIONAL_COLUMNS.includes(c) && !cols.includes(c));
  if (missing.length) {
    throw LabError.field(
      'csv header',
      header,
      `the columns ${CSV_COLUMNS.join(', ')}`,
      `csv header: missing column(s) ${missing.join(', ')}`,
    );
  }
  // A column named twice is read from its last place, as naming a row by the header did.
  const place = new Map<string, number>();
  (rows[0]?.record ?? []).forEach((name, i) => place.set(name, i));
  const at = (name: CsvColumn): number => place.get(name) ?? -1;
  const cell = (row: string[], i: number): string | undefined => (i < 0 ? undefined : row[i]);
  const c = Object.fromEntries(CSV_COLUMNS.map((name) => [name, at(name)])) as Record<CsvColumn, number>;

  const groups = new Map<string, CsvRowsRecord[]>();
  for (let k = 1; k < rows.length; k++) {
    const r = rows[k] as CsvRowsRecord;
    const key = `${cell(r.record, c.meter)}\u0000${cell(r.record, c.date)}`;
    const g = groups.get(key);
    if (g) g.push(r);
    else groups.set(key, [r]);
  }
  const out: CsvCheckDocument[] = [];
  for (const g of groups.values()) {
    const first = g[0];
    if (!first) continue;
    const f = first.record;
    const lines = `${first.line}-${g[g.length - 1]?.line ?? first.line}`;
    const points = new Map<string | undefined, CsvPoint>();
    for (const { record: r } of g) {
      const key = cell(r, c.point);
      let p = points.get(key);
      if (!p) {
        const dip = cell(r, c.dip_depth_db);
        p = {
          phase: cell(r, c.phase) as string,
          reference: `${cell(r, c.reference_hz)} Hz`,
          standard: cell(r, c.standard) as string,
          readings: [],
          ...(dip ? { dipDepthDb: num(dip) } : {}),
        };
        points.set(key, p);
      }
      const reading = cell(r, c.reading);
      p.readings.push({
        value: cell(r, c.reading_unit) === 'Hz' ? `${reading} Hz` : (num(reading) ?? (reading as string)),
        direction: cell(r, c.direction) as string,
      });
    }
    out.push({
      lines,
      doc: {
        format: 'dipledger.check/1',
        meter: cell(f, c.meter) as string,
        date: cell(f, c.date),
        performer: cell(f, c.performer),
        standards: (cell(f, c.standards) as string)
          .split(';')
          .map((s) => s.trim())
          .filter(Boolean),
        method: cell(f, c.method) || 'tune-to-dip',
        conditions: {
          temperatureC: num(cell(f, c.temperature_c)),
          temperatureUncertaintyC: num(cell(f, c.u_temperature_c)),
          pressureHpa: num(cell(f, c.pressure_hpa)),
          pressureUncertaintyHpa: num(cell(f, c.u_pressure_hpa)),
          humidityPct: num(cell(f, c.humidity_pct)),
          humidityUncertaintyPct: num(cell(f, c.u_humidity_pct)),
        },
        adjusted: /^(yes|true|1)$/i.test(cell(f, c.adjusted) as string),
        remarks: cell(f, c.remarks) ?? '',
        points: [...points.values()],
      },
    });
  }
  return out;
}
