// The history CSV (docs/exchange.md): its columns, and its rows grouped into check documents
// (one per meter and date) that the import validates like any recorded check.
//
// Built for a bulk import of a fleet's history (issue 8: 2,000 checks per second): fields are read
// by column index (an object per row named by the header cost more than reading the file), each
// row is grouped as it is read and only the fields a document takes are read out of it, and the
// row reader takes a shortcut on unquoted text (app/formats/csv-rows.ts). The documents are those
// grouping every row after reading the whole file gave (test/api/csv-documents.test.ts).
import { eachCsvRow, type CsvRow, type CsvRowSink } from '../formats/csv-rows';
import { CSV_COLUMNS } from '../formats/history-csv';
import { LabError } from './errors';

/** Columns of the history CSV (RFC 4180), one row per reading. Documented in docs/exchange.md. */
export { CSV_COLUMNS };

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

type Places = Record<CsvColumn, number>;

/** The rows of one check (meter + date) as they are read: its first row whole, its points built
 * from their first rows, and its readings. */
interface CheckRows {
  first: string[];
  firstLine: number;
  lastLine: number;
  points: Map<string | undefined, CsvPoint>;
}

/** A CSV row sink (app/formats/csv-rows.ts) that groups rows into checks as they are read, so
 * only the fields a check document takes are read out of a row, and outlive it. */
class CheckGrouper implements CsvRowSink {
  /** Where each column is, from the first record (the header); -1 for a column not there. */
  places: Places | undefined;
  readonly checks = new Map<string, CheckRows>();
  // The check and point of the row before: rows of a point come one after another, and comparing
  // two strings costs less than finding a new key in a map.
  private last: { meter?: string; date?: string; check?: CheckRows; pointKey?: string; point?: CsvPoint } =
    {};

  row(r: CsvRow): void {
    const c = this.places;
    if (!c) {
      // A column named twice is read from its last place, as naming a row by the header did.
      const place = new Map<string, number>();
      r.record().forEach((name, i) => place.set(name, i));
      this.places = Object.fromEntries(CSV_COLUMNS.map((name) => [name, place.get(name) ?? -1])) as Places;
      return;
    }
    const last = this.last;
    const meter = cellOf(r, c.meter);
    const date = cellOf(r, c.date);
    let check = last.check && meter === last.meter && date === last.date ? last.check : undefined;
    if (!check) {
      const key = `${meter}\u0000${date}`;
      check = this.checks.get(key);
      if (!check) {
        check = { first: r.record(), firstLine: r.line, lastLine: r.line, points: new Map() };
        this.checks.set(key, check);
      }
      this.last = { meter, date, check };
    }
    check.lastLine = r.line;
    const pointKey = cellOf(r, c.point);
    let p = this.last.point && pointKey === this.last.pointKey ? this.last.point : check.points.get(pointKey);
    if (!p) {
      const dip = cellOf(r, c.dip_depth_db);
      p = {
        phase: cellOf(r, c.phase) as string,
        reference: `${cellOf(r, c.reference_hz)} Hz`,
        standard: cellOf(r, c.standard) as string,
        readings: [],
        ...(dip ? { dipDepthDb: num(dip) } : {}),
      };
      check.points.set(pointKey, p);
    }
    this.last.pointKey = pointKey;
    this.last.point = p;
    const reading = cellOf(r, c.reading);
    p.readings.push({
      value: cellOf(r, c.reading_unit) === 'Hz' ? `${reading} Hz` : (num(reading) ?? (reading as string)),
      direction: cellOf(r, c.direction) as string,
    });
  }
}

const cellOf = (row: CsvRow, i: number): string | undefined =>
  i < 0 || i >= row.width ? undefined : row.field(i);
const cell = (row: string[], i: number): string | undefined => (i < 0 ? undefined : row[i]);

/** Groups CSV rows into check documents (meter + date), each with its line range. */
export function csvToDocuments(text: string): CsvCheckDocument[] {
  let grouped: CheckGrouper;
  try {
    grouped = eachCsvRow(text, () => new CheckGrouper());
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
  const c = grouped.places;
  if (!c) return [];
  const out: CsvCheckDocument[] = [];
  for (const g of grouped.checks.values()) {
    const f = g.first;
    out.push({
      lines: `${g.firstLine}-${g.lastLine}`,
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
        points: [...g.points.values()],
      },
    });
  }
  return out;
}
