// A time axis for the history charts: calendar dates as milliseconds and ticks on whole years,
// thinned so a long history stays readable.
export const DAY_MS = 86_400_000;

/** A calendar date (YYYY-MM-DD, or a timestamp starting with one) as milliseconds, UTC. */
export function dateMs(date: string): number {
  return Date.parse(`${date.slice(0, 10)}T00:00:00Z`);
}

export const yearOf = (ms: number): number => new Date(ms).getUTCFullYear();

/** 1 January of every year (every 2nd or 5th on long spans) inside [x0, x1]. */
export function yearTicks(x0: number, x1: number): number[] {
  const span = yearOf(x1) - yearOf(x0);
  const step = span > 24 ? 5 : span > 10 ? 2 : 1;
  const out: number[] = [];
  for (let y = yearOf(x0) + 1; y <= yearOf(x1); y++) if (y % step === 0) out.push(Date.UTC(y, 0, 1));
  return out;
}
