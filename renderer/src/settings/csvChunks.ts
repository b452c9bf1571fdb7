// A history CSV cut into pieces of whole checks, so a long import can show its progress and be
// stopped between pieces: each piece is imported all or nothing by the service, and stopping
// leaves only whole checks behind. csv-parse and csv-stringify (browser builds) read and write the
// RFC 4180 text; a piece keeps the file's header and a map back to the file's own line numbers.
import { parse } from 'csv-parse/browser/esm/sync';
import { stringify } from 'csv-stringify/browser/esm/sync';

export interface CsvChunk {
  text: string;
  checks: number;
  /** Line of the file for each line of the piece (index 0 is the header, line 1), a record whose
   * fields hold newlines taking as many lines in both. */
  fileLine: number[];
}

export interface CsvPlan {
  chunks: CsvChunk[];
  checks: number;
  rows: number;
}

/** Splits the text into pieces of at most `checksPerChunk` checks (rows with one meter and date). */
export function planCsv(text: string, checksPerChunk = 25): CsvPlan {
  const records = parse(text, { info: true, skip_empty_lines: true, bom: true }) as unknown as {
    record: string[];
    info: { lines: number };
  }[];
  const head = records[0];
  if (!head) throw new Error('the file is empty: expected a header line and rows');
  const header = head.record.map((h) => h.trim());
  const meterAt = header.indexOf('meter');
  const dateAt = header.indexOf('date');
  if (meterAt < 0 || dateAt < 0)
    throw new Error(`the header has no ${meterAt < 0 ? '"meter"' : '"date"'} column: is this a history CSV?`);
  // Rows of one check may be anywhere in the file; they travel together, in the file's order.
  const groups = new Map<string, { record: string[]; line: number }[]>();
  for (const r of records.slice(1)) {
    const key = `${r.record[meterAt] ?? ''}\u0000${r.record[dateAt] ?? ''}`;
    const g = groups.get(key) ?? [];
    g.push({ record: r.record, line: r.info.lines });
    groups.set(key, g);
  }
  const all = [...groups.values()];
  const chunks: CsvChunk[] = [];
  for (let i = 0; i < all.length; i += checksPerChunk) {
    const part = all.slice(i, i + checksPerChunk);
    const rows = part.flat();
    chunks.push({
      // A newline inside a field is quoted too (csv-stringify quotes only the record delimiter).
      text: stringify([head.record, ...rows.map((r) => r.record)], {
        record_delimiter: '\r\n',
        quoted_match: /[\r\n]/,
      }),
      checks: part.length,
      fileLine: [head, ...rows.map((r) => ({ record: r.record, info: { lines: r.line } }))].flatMap(linesOf),
    });
  }
  return { chunks, checks: all.length, rows: records.length - 1 };
}

/** The file's lines a record spans, from the line it ends on and the newlines inside its fields. */
function linesOf(r: { record: string[]; info: { lines: number } }): number[] {
  const extra = r.record.reduce((n, field) => n + (field.match(/\n/g)?.length ?? 0), 0);
  return Array.from({ length: extra + 1 }, (_, k) => r.info.lines - extra + k);
}

/** A refusal about a piece, told with the file's line numbers ("lines 3-14" of the piece). */
export function inFileLines(message: string, chunk: CsvChunk): string {
  const at = (n: string) => String(chunk.fileLine[Number(n) - 1] ?? n);
  return message.replace(/\blines? (\d+)(?:[-–](\d+))?/g, (whole, a: string, b: string | undefined) =>
    b === undefined
      ? whole.replace(a, at(a))
      : `${whole.startsWith('lines') ? 'lines' : 'line'} ${at(a)}-${at(b)}`,
  );
}
