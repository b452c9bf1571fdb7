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
//
// A bulk import reads rows one at a time through a sink (eachCsvRow), taking only the fields it
// needs: holding every field of the file until its last line was read made the garbage
// collector's copying of them most of the time of reading it, and splitting a row into all of
// its fields cost twice what slicing out the half dozen a reading needs does (issue 8).
import { parse as parseCsv } from 'csv-parse/sync';

export interface CsvRowsRecord {
  record: string[];
  /** The 1-based physical line the record ends on (csv-parse's info.lines). */
  line: number;
}

/** One row as a sink sees it. Valid only during the call that hands it over: keep record(), or
 * the fields, not the row. */
export interface CsvRow {
  /** The number of fields. */
  readonly width: number;
  /** The 1-based physical line the row ends on (csv-parse's info.lines). */
  readonly line: number;
  /** Field i (0-based, below width), trimmed as the whole record has it. */
  field(i: number): string;
  /** Every field. */
  record(): string[];
}

/** Takes the rows of a file one at a time, in order. */
export interface CsvRowSink {
  row(row: CsvRow): void;
}

/** Throws csv-parse's own errors for a malformed file. */
export function readCsvRows(text: string): CsvRowsRecord[] {
  return eachCsvRow(text, collector).rows;
}

function collector(): CsvRowSink & { rows: CsvRowsRecord[] } {
  const rows: CsvRowsRecord[] = [];
  return { rows, row: (r) => rows.push({ record: r.record(), line: r.line }) };
}

/**
 * Hands every row of the file to a sink made by `start` and returns that sink; throws csv-parse's
 * own errors for a malformed file. A file the shortcut gives up on part way is read again by
 * csv-parse into a fresh sink, so the sink returned has seen the whole file once, from one reader.
 */
export function eachCsvRow<S extends CsvRowSink>(text: string, start: () => S): S {
  const sink = start();
  if (visitPlainRows(text, sink)) return sink;
  const again = start();
  const row = new RecordRow();
  for (const r of parsedRows(text)) {
    row.set(r.record, r.line);
    again.row(row);
  }
  return again;
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
  const sink = collector();
  return visitPlainRows(text, sink) ? sink.rows : undefined;
}

/** A row csv-parse read. */
class RecordRow implements CsvRow {
  private fields: string[] = [];
  line = 0;
  get width(): number {
    return this.fields.length;
  }
  set(fields: string[], line: number): void {
    this.fields = fields;
    this.line = line;
  }
  field(i: number): string {
    return this.fields[i] as string;
  }
  record(): string[] {
    return this.fields;
  }
}

/** A line of a plain file: a field is the text between two commas, trimmed, as split(',') and
 * trim() give it. */
class PlainRow implements CsvRow {
  text = '';
  line = 0;
  width = 0;
  /** Where field i starts (ends[i - 1] + 1) and ends: the commas, then the end of the line. */
  ends = new Int32Array(64);
  set(text: string, line: number): void {
    this.text = text;
    this.line = line;
    let n = 0;
    for (let at = text.indexOf(','); at >= 0; at = text.indexOf(',', at + 1)) {
      if (n + 1 >= this.ends.length) {
        const more = new Int32Array(this.ends.length * 2);
        more.set(this.ends);
        this.ends = more;
      }
      this.ends[n++] = at;
    }
    this.ends[n] = text.length;
    this.width = n + 1;
  }
  field(i: number): string {
    const from = i === 0 ? 0 : (this.ends[i - 1] as number) + 1;
    return this.text.slice(from, this.ends[i]).trim();
  }
  record(): string[] {
    const out: string[] = [];
    for (let i = 0; i < this.width; i++) out.push(this.field(i));
    return out;
  }
}

/** Hands the rows of a file with no quoting and one kind of line break to `sink` and answers true;
 * answers false as soon as the file turns out to need the full reader (the rows handed over until
 * then are to be thrown away). */
function visitPlainRows(text: string, sink: CsvRowSink): boolean {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.includes('"')) return false;
  const crlf = body.includes('\r');
  const eol = crlf ? '\r\n' : '\n';
  const row = new PlainRow();
  let width = -1;
  let from = 0;
  for (let line = 1; from <= body.length; line++) {
    const end = body.indexOf(eol, from);
    const l = body.slice(from, end < 0 ? body.length : end);
    from = end < 0 ? body.length + 1 : end + eol.length;
    // A CR left after splitting at CRLF is a bare CR (or a CRLF file with LF-only lines):
    // csv-parse decides what those mean.
    if (crlf && (l.includes('\r') || l.includes('\n'))) return false;
    if (l.length === 0) continue;
    row.set(l, line);
    // A line of blanks only: csv-parse's rule for it (skipped or one empty field) decides.
    if (row.width === 1 && row.field(0) === '') return false;
    if (width < 0) width = row.width;
    // A row of another length is an error csv-parse words; let it.
    else if (row.width !== width) return false;
    sink.row(row);
  }
  return true;
}
