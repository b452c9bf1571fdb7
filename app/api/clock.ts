// The service's only source of time, and the calendar arithmetic it does with it.
// Per-function imports: the date-fns barrel is slow to load at CLI start-up.
import { addMonths } from 'date-fns/addMonths';
import { differenceInCalendarDays } from 'date-fns/differenceInCalendarDays';
import { formatISO } from 'date-fns/formatISO';
import { parseISO } from 'date-fns/parseISO';

/** The service's only source of time, injected so tests run on a fixed clock. */
export interface Clock {
  /** Today's date in the lab, YYYY-MM-DD. */
  today(): string;
  /** Now, ISO 8601 with time zone. */
  now(): string;
}

export const systemClock: Clock = {
  today: () => formatISO(new Date(), { representation: 'date' }),
  now: () => new Date().toISOString(),
};

export function fixedClock(isoDateTime: string): Clock {
  return { today: () => isoDateTime.slice(0, 10), now: () => isoDateTime };
}

export function addMonthsIso(date: string, months: number): string {
  return formatISO(addMonths(parseISO(date), months), { representation: 'date' });
}

export function daysBetween(fromIso: string, toIso: string): number {
  return differenceInCalendarDays(parseISO(toIso), parseISO(fromIso));
}
