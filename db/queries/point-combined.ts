// check_point.combined_hz (migration 0009): a point's result.budget.combinedHz, the one number
// history analysis reads that had no column of its own, kept beside the stored result so that
// writing a point does not have SQLite parse the result's JSON for the history index.
//
// A cell holds a finite number as itself (REAL) and anything else as its JSON text, the text
// `result_json -> '$.budget.combinedHz'` gives: SQLite stores NaN as NULL, and the stored result
// keeps non-finite numbers as the strings "NaN", "Infinity", "-Infinity" (app/api/json.ts). The
// column has no declared type, so SQLite keeps each value as it was given (a REAL column would
// turn -0 into 0 and number-like text into numbers by its own conversion).
// Points written before 0009 have no cell (NULL), nor does a result without combinedHz: for them
// history reads the JSON text out of the stored result, as before, through the history index,
// which holds COMBINED_HZ_SQL (db/queries/history.ts) for every point.
// Either way a point reads back as the number that decoding its whole stored result gives: -0 as
// 0 (JSON writes it "0"), a missing value as undefined (test/db/cheaper-writes-migration.test.ts).
import { decodeStoredJson as decodeJson, encodeJson } from '../codec/stored-json';

/** A cell of combined_hz, or the JSON text of combinedHz read out of the stored result. */
export type CombinedHzCell = number | string | null;

/** What a point's combined_hz holds for result.budget.combinedHz `value`. */
export function combinedHzCell(value: unknown): CombinedHzCell {
  if (typeof value === 'number' && Number.isFinite(value)) return value === 0 ? 0 : value;
  return value === undefined ? null : encodeJson(value);
}

/** The number a point's combinedHz is, as decoding its whole stored result gives it. */
export function combinedHzOfCell(cell: CombinedHzCell): number {
  if (typeof cell === 'number') return cell;
  return (cell === null ? undefined : decodeJson(cell)) as number;
}
