// The answer of every trace reader: the data, or the line and what was wrong with it. Readers never
// throw on bad input, so the API can turn a bad file into one clear refusal (exit code 2 on the CLI).

export type ReadResult<T> =
  { ok: true; value: T; warnings: string[] } | { ok: false; line: number | null; message: string };

export function failAt(
  line: number | null,
  message: string,
): { ok: false; line: number | null; message: string } {
  return { ok: false, line, message: line === null ? message : `line ${line}: ${message}` };
}

/** A number as written in a data file: decimal or exponent form, nothing else (no "0x", no "1,5"). */
export function parseNumber(token: string): number | null {
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(token)) return null;
  const v = Number(token);
  return Number.isFinite(v) ? v : null;
}

/** Splits text into lines, keeping the 1-based line number of each. */
export function numberedLines(text: string): { line: number; text: string }[] {
  return text
    .replace(/^\uFEFF/, '')
    .split(/\r\n|\r|\n/)
    .map((t, i) => ({ line: i + 1, text: t }));
}
