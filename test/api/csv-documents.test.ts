// The history CSV's check documents (csvToDocuments, app/api/import-csv.ts), now grouped row by
// row as the file is read and taking only the fields a document needs (issue 8), against the
// documents grouped the way they were before, from every row csv-parse reads
// (previousDocuments below, the former code with csv-parse as its reader): the same documents,
// key order and line ranges included, and the same refusals, on generated files (columns in any
// order, optional ones left out, a column twice, checks and points interleaved, blanks, quoted
// fields, both line breaks, rows of other lengths) and on the synthetic fleet's history.
import fc from 'fast-check';
import { parse as parseCsv } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { CSV_COLUMNS, csvToDocuments, type CsvCheckDocument } from '../../app/api/import-csv';
import { LabError } from '../../app/api/errors';
import { historyCsv } from '../bench/fleet-data';

type Column = (typeof CSV_COLUMNS)[number];
const OPTIONAL: readonly Column[] = [
  'remarks',
  'dip_depth_db',
  'method',
  'u_temperature_c',
  'u_pressure_hpa',
  'u_humidity_pct',
];

const num = (s: string | undefined): number | string | undefined => {
  if (s === undefined || s === '') return undefined;
  const n = Number(s);
  return Number.isFinite(n) ? n : s;
};

/** csvToDocuments as it was, reading every row with csv-parse first. */
function previousDocuments(text: string): CsvCheckDocument[] {
  let rows: { record: string[]; line: number }[];
  try {
    rows = (
      parseCsv(text, { skip_empty_lines: true, trim: true, info: true, bom: true }) as unknown as {
        record: string[];
        info: { lines: number };
      }[]
    ).map((p) => ({ record: p.record, line: p.info.lines }));
  } catch (e) {
    const message = (e instanceof Error ? e.message : String(e)).replace(
      /^Invalid Record Length: expect (\d+),/,
      'Invalid Record Length: columns length is $1,',
    );
    throw LabError.field('csv', undefined, 'a CSV file (RFC 4180)', `csv: ${message}`);
  }
  const header = text.replace(/^\uFEFF/, '').split(/\r?\n/, 1)[0] ?? '';
  const cols = header.split(',').map((c) => c.trim().replace(/^"|"$/g, ''));
  const missing = CSV_COLUMNS.filter((c) => !OPTIONAL.includes(c) && !cols.includes(c));
  if (missing.length) {
    throw LabError.field(
      'csv header',
      header,
      `the columns ${CSV_COLUMNS.join(', ')}`,
      `csv header: missing column(s) ${missing.join(', ')}`,
    );
  }
  const place = new Map<string, number>();
  (rows[0]?.record ?? []).forEach((name, i) => place.set(name, i));
  const at = (name: Column): number => place.get(name) ?? -1;
  const cell = (row: string[], i: number): string | undefined => (i < 0 ? undefined : row[i]);
  const c = Object.fromEntries(CSV_COLUMNS.map((name) => [name, at(name)])) as Record<Column, number>;
  const groups = new Map<string, { record: string[]; line: number }[]>();
  for (let k = 1; k < rows.length; k++) {
    const r = rows[k] as { record: string[]; line: number };
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
    const points = new Map<string | undefined, Record<string, unknown>>();
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
      (p.readings as unknown[]).push({
        value: cell(r, c.reading_unit) === 'Hz' ? `${reading} Hz` : (num(reading) ?? reading),
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

/** The documents as JSON text (key order counts: a refusal quotes values as JSON), or the refusal. */
function outcome(read: (t: string) => CsvCheckDocument[], text: string): string {
  try {
    return JSON.stringify(read(text));
  } catch (e) {
    if (e instanceof LabError) return `refused: ${e.message} ${JSON.stringify(e.issues)}`;
    throw e;
  }
}

const blank = fc.constantFrom('', '', '', ' ', '\t', '\u00a0');
const padded = (values: fc.Arbitrary<string>) =>
  fc.tuple(blank, values, blank).map(([a, v, b]) => `${a}${v}${b}`);
const CELLS: Record<Column, fc.Arbitrary<string>> = {
  meter: fc.constantFrom('M-1', 'M-2', 'M-3', ''),
  date: fc.constantFrom('2020-01-15', '2021-02-03', '2021-2-3'),
  performer: fc.constantFrom('Ines Marlow', 'Oskar Veldt', ''),
  standards: fc.constantFrom('SYN-1', 'SYN-1;SYN-2', ' SYN-1 ; ; SYN-2', ''),
  method: fc.constantFrom('tune-to-dip', 'sweep', ''),
  temperature_c: fc.constantFrom('21.5', '', 'warm', '1e3', 'Infinity'),
  u_temperature_c: fc.constantFrom('', '0.3', 'x'),
  pressure_hpa: fc.constantFrom('1008.2', '', '1.008e3'),
  u_pressure_hpa: fc.constantFrom('', '1'),
  humidity_pct: fc.constantFrom('45', '', '-3'),
  u_humidity_pct: fc.constantFrom('', '5'),
  adjusted: fc.constantFrom('yes', 'no', 'TRUE', '1', 'Yes please', ''),
  point: fc.constantFrom('1', '2', '3', ''),
  phase: fc.constantFrom('as-found', 'as-left', ''),
  reference_hz: fc.constantFrom('10000000000', '9.3e9', '', 'abc'),
  standard: fc.constantFrom('SYN-1', 'SYN-2', ''),
  reading: fc.constantFrom('10000500000', '12.34', '', 'abc', '-0', '1e400'),
  reading_unit: fc.constantFrom('Hz', 'div', 'hz', ''),
  direction: fc.constantFrom('up', 'down', 'sideways', ''),
  dip_depth_db: fc.constantFrom('', '2.5', 'deep', '0'),
  remarks: fc.constantFrom('', 'fine', 'ok; checked'),
};

/** One time in `every` a value, else null. */
const rarely = <T>(value: fc.Arbitrary<T>, every: number) =>
  fc.oneof({ weight: every - 1, arbitrary: fc.constant(null) }, { weight: 1, arbitrary: value });
// Every column, in any order; optional ones left out at will, now and then a required one too,
// and now and then a column named twice.
const columns = fc
  .record({
    order: fc.shuffledSubarray([...CSV_COLUMNS], { minLength: CSV_COLUMNS.length }),
    leaveOut: fc.subarray([...OPTIONAL]),
    required: rarely(fc.constantFrom(...CSV_COLUMNS.filter((c) => !OPTIONAL.includes(c))), 12),
    twice: rarely(fc.nat(), 4),
  })
  .map(({ order, leaveOut, required, twice }) => {
    const cols = order.filter((c) => !leaveOut.includes(c) && c !== required);
    return twice === null ? cols : [...cols, cols[twice % cols.length] as Column];
  });

const historyFile = columns.chain((cols) =>
  fc.record({
    cols: fc.constant(cols),
    rows: fc.array(
      fc.oneof(
        { weight: 80, arbitrary: fc.tuple(...cols.map((c) => padded(CELLS[c]))) },
        // A row of another length, a line of blanks, an empty line, a quoted field.
        { weight: 1, arbitrary: fc.constantFrom<string[]>(['x'], ['  '], [''], ['"M-1, quoted"', 'x']) },
      ),
      { maxLength: 30 },
    ),
    eol: fc.constantFrom('\r\n', '\n'),
    bom: fc.boolean(),
    trailing: fc.boolean(),
    headerBlank: fc.constantFrom('', ' '),
  }),
);

function textOf(f: {
  cols: readonly string[];
  rows: readonly (readonly string[])[];
  eol: string;
  bom: boolean;
  trailing: boolean;
  headerBlank: string;
}): string {
  const lines = [f.cols.map((c) => `${f.headerBlank}${c}`).join(','), ...f.rows.map((r) => r.join(','))];
  return (f.bom ? '\ufeff' : '') + lines.join(f.eol) + (f.trailing ? f.eol : '');
}

describe('csvToDocuments groups rows as it did', () => {
  it('the same documents or the same refusal as reading every row first, on generated files', () => {
    const kinds = { docs: 0, refused: 0, manyChecks: 0 };
    fc.assert(
      fc.property(historyFile, (f) => {
        const text = textOf(f);
        const ours = outcome(csvToDocuments, text);
        expect(ours).toBe(outcome(previousDocuments, text));
        if (ours.startsWith('refused')) kinds.refused++;
        else {
          kinds.docs++;
          if ((JSON.parse(ours) as unknown[]).length > 2) kinds.manyChecks++;
        }
      }),
      { numRuns: 3000 },
    );
    // Both outcomes and files of several interleaved checks came up often enough to mean something.
    expect(kinds.docs).toBeGreaterThan(500);
    expect(kinds.refused).toBeGreaterThan(300);
    expect(kinds.manyChecks).toBeGreaterThan(200);
  });

  it('the same documents for the synthetic fleet history (direct and divisions meters, adjustments)', () => {
    const { csv, checks } = historyCsv(0, 8);
    const ours = csvToDocuments(csv);
    expect(ours).toHaveLength(checks);
    expect(JSON.stringify(ours)).toBe(JSON.stringify(previousDocuments(csv)));
    // A check's rows interleaved with another's are still one check with the full line range.
    const lines = csv.split('\r\n');
    const [header, ...rows] = lines;
    const mixed = [header, ...rows.filter((_, i) => i % 2 === 0), ...rows.filter((_, i) => i % 2 === 1)].join(
      '\n',
    );
    expect(JSON.stringify(csvToDocuments(mixed))).toBe(JSON.stringify(previousDocuments(mixed)));
  });
});
