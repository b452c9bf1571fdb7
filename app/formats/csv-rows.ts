// Rows of an RFC 4180 file with the physical line each ends on, as csv-parse reads them with
// { skip_empty_lines, trim, info, bom }: the history import's reader.
//
// csv-parse is the reader; this module only adds a shortcut for the text a bulk import nearly
// always is (an export of ours, or a spreadsheet's: no quote character at all, one kind of line
// break). There RFC 4180 has nothing left to decide: a record is a physical line and its fields
// are split at every comma. csv-parse spent 2.2 s of CPU on the 110,000 rows of 2,500 checks
// (more than the import's whole time budget for them), the split about 0.3 s. Anything else
// (a quote, mixed or bare CR line breaks, a line of blanks, a row of another length) goes to
// csv-parse, which also words every refusal as before. test/formats/csv-rows.test.ts compares
// both readers on generated text.
import { parse as parseCsv } from 'csv-parse/sync';

export interface CsvRowsRecord {
  record: string[];
  /** The 1-based physical line the record ends on (csv-parse's info.lines). */
  line: number;
}

/** Throws csv-parse's own errors for a malformed file. */
export function readCsvRows(text: string): CsvRowsRecord[] {
  return plainRows(text) ?? parsedRows(text);
}

function parsedRows(text: string): CsvRowsRecord[] {
  const parsed = parseCsv(text, {
    skip_empty_lines: true,
    trim: true,
    info: true,
    bom: true,
  }) as unknown as { record: string[]; info: { lines: number } }[];
  return parsed.map((p) => ({ record: p.record, line: p.info.lines }));
}

/** The rows of a file with no quoting and one kind of line break, or undefined when the file
 * needs the full reader. */
export function plainRows(text: string): CsvRowsRecord[] | undefined {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.includes('"')) return undefined;
  const crlf = body.includes('\r');
  const lines = body.split(crlf ? '\r\n' : '\n');
  // A CR left after splitting at CRLF is a bare CR (or a CRLF file with LF-only lines): csv-parse
  // decides what those mean.
  if (crlf && lines.some((l) => l.includes('\r') || l.includes('\n'))) return undefined;
  const out: CsvRowsRecord[] = [];
  let width = -1;
  for (let i = 0; i < lines.length; i++) {
    const l = lines[i] as string;
    if (l.length === 0) continue;
    const record = l.split(',');
    for (let j = 0; j < record.length; j++) record[j] = (record[j] as string).trim();
    // A line of blanks only: csv-parse's rule for it (skipped or one empty field) decides.
    if (record.length === 1 && record[0] === '') return undefined;
    if (width < 0) width = record.length;
    // A row of another length is an error csv-parse words; let it.
    else if (record.length !== width) return undefined;
    out.push({ record, line: i + 1 });
  }
  return out;
}
