// The history import's row reader (app/formats/csv-rows.ts) against csv-parse, the reader it
// shortcuts: the same rows, the same line numbers and the same refusals, on generated text with
// blanks, odd whitespace, empty lines, both line breaks, quoted fields and rows of other lengths.
// Also the row a sink is handed (eachCsvRow): each field read on its own is the record's field,
// and a file the shortcut gives up on part way reaches the sink once, whole, from csv-parse.
import fc from 'fast-check';
import { parse as parseCsv } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { eachCsvRow, plainRows, readCsvRows, type CsvRow } from '../../app/formats/csv-rows';

function csvParse(text: string): { record: string[]; line: number }[] | { error: string } {
  try {
    return (
      parseCsv(text, { skip_empty_lines: true, trim: true, info: true, bom: true }) as unknown as {
        record: string[];
        info: { lines: number };
      }[]
    ).map((p) => ({ record: p.record, line: p.info.lines }));
  } catch (e) {
    return { error: e instanceof Error ? e.message : String(e) };
  }
}

function ours(text: string): { record: string[]; line: number }[] | { error: string } {
  try {
    return readCsvRows(text);
  } catch (e) {
    return { error: e instanceof Error ? e.message : String(e) };
  }
}

const blank = fc.constantFrom(' ', '\t', '\u00a0', '\u2003', '\u3000', '\ufeff', '\u2028', '');
const plainCell = fc
  .tuple(blank, fc.stringMatching(/^[A-Za-z0-9 .;:+\-éµ%]{0,8}$/), fc.constantFrom('', ' ', '\t', '\u00a0'))
  .map(([a, b, c]) => a + b + c);
// Now and then a quoted field (a comma, a line break or a quote inside), which only csv-parse reads.
const cell = fc.oneof(
  { weight: 40, arbitrary: plainCell },
  { weight: 1, arbitrary: fc.constantFrom('"a,b"', '"x"', '""', '"two\nlines"', '"q ""q"""') },
);
const row = (width: number) =>
  fc.oneof(
    { weight: 8, arbitrary: fc.array(cell, { minLength: width, maxLength: width }) },
    { weight: 1, arbitrary: fc.array(cell, { minLength: 1, maxLength: width + 2 }) },
  );
const file = fc.integer({ min: 1, max: 5 }).chain((width) =>
  fc.record({
    rows: fc.array(
      fc.oneof({ weight: 6, arbitrary: row(width) }, { weight: 1, arbitrary: fc.constant<string[]>([]) }),
      {
        maxLength: 8,
      },
    ),
    eol: fc.constantFrom('\r\n', '\n', 'mixed', '\r'),
    bom: fc.boolean(),
    trailing: fc.boolean(),
  }),
);

function textOf(f: { rows: string[][]; eol: string; bom: boolean; trailing: boolean }): string {
  const lines = f.rows.map((r) => r.join(','));
  let text = '';
  lines.forEach((l, i) => {
    const eol = f.eol === 'mixed' ? (i % 2 ? '\n' : '\r\n') : f.eol;
    text += l + (i < lines.length - 1 || f.trailing ? eol : '');
  });
  return (f.bom ? '\ufeff' : '') + text;
}

describe('readCsvRows', () => {
  it('reads what csv-parse reads: rows, line numbers and refusals', () => {
    let shortcut = 0;
    fc.assert(
      fc.property(file, (f) => {
        const text = textOf(f);
        if (plainRows(text)) shortcut++;
        expect(ours(text)).toEqual(csvParse(text));
      }),
      { numRuns: 2000 },
    );
    // The comparison means something only if the shortcut took a good share of the cases.
    expect(shortcut).toBeGreaterThan(500);
  });

  it('hands a sink each row once, whose fields read one by one are the record, from one reader', () => {
    let restarts = 0;
    fc.assert(
      fc.property(file, (f) => {
        const text = textOf(f);
        const expected = csvParse(text);
        let starts = 0;
        const seen: { record: string[]; line: number }[] = [];
        const start = () => {
          starts++;
          seen.length = 0;
          return {
            row(r: CsvRow) {
              const record = r.record();
              expect(r.width).toBe(record.length);
              for (let i = 0; i < r.width; i++) expect(r.field(i)).toBe(record[i]);
              seen.push({ record, line: r.line });
            },
          };
        };
        try {
          eachCsvRow(text, start);
        } catch (e) {
          expect({ error: e instanceof Error ? e.message : String(e) }).toEqual(expected);
          return;
        }
        expect(seen).toEqual(expected);
        // A fresh sink only when the shortcut gave up (on a quote, a stray CR, a length or blanks).
        expect(starts).toBe(plainRows(text) ? 1 : 2);
        if (starts === 2 && seen.length > 0) restarts++;
      }),
      { numRuns: 2000 },
    );
    expect(restarts).toBeGreaterThan(50);
  });

  it('hands quoted text, bare CR and lines of blanks to csv-parse', () => {
    expect(plainRows('a,b\r\n"c",d')).toBeUndefined();
    expect(plainRows('a,b\rc,d')).toBeUndefined();
    expect(plainRows('a,b\r\nc,d\ne,f')).toBeUndefined();
    expect(plainRows('a,b\n   \nc,d')).toBeUndefined();
    expect(plainRows('a,b\nc,d,e')).toBeUndefined();
    expect(readCsvRows('a,b\n"c, d",e')).toEqual([
      { record: ['a', 'b'], line: 1 },
      { record: ['c, d', 'e'], line: 2 },
    ]);
  });

  it('takes the shortcut on a plain file and numbers its lines', () => {
    expect(plainRows('\ufeffa , b\r\n\r\n c,d \r\n')).toEqual([
      { record: ['a', 'b'], line: 1 },
      { record: ['c', 'd'], line: 3 },
    ]);
  });

  it('refuses a row of the wrong length in csv-parse words', () => {
    expect(() => readCsvRows('a,b\nc,d\ne,f,g')).toThrow(/Invalid Record Length: expect 2, got 3 on line 3/);
  });
});
