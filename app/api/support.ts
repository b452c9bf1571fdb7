// Shared pieces of the service: the clock, date arithmetic, verdict order, zod parsing into
// LabError, and the issue collector that lets one refusal name every problem at once.
// Per-function imports: the date-fns barrel costs about half a second of CLI start-up.
import { addMonths } from 'date-fns/addMonths';
import { differenceInCalendarDays } from 'date-fns/differenceInCalendarDays';
import { formatISO } from 'date-fns/formatISO';
import { parseISO } from 'date-fns/parseISO';
import type { z } from 'zod';
import { parseFrequencyHz } from '../engine';
import type { MeterSpec, Verdict } from '../engine/model';
import type { Meter } from './contract';
import { LabError, describe, fromZod, type FieldIssue } from './errors';

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

const VERDICT_ORDER: Verdict[] = ['pass', 'conditional-pass', 'conditional-fail', 'fail'];

export function worstVerdict(verdicts: Verdict[]): Verdict | null {
  let worst = -1;
  for (const v of verdicts) worst = Math.max(worst, VERDICT_ORDER.indexOf(v));
  return worst < 0 ? null : (VERDICT_ORDER[worst] ?? null);
}

export function addMonthsIso(date: string, months: number): string {
  return formatISO(addMonths(parseISO(date), months), { representation: 'date' });
}

export function daysBetween(fromIso: string, toIso: string): number {
  return differenceInCalendarDays(parseISO(toIso), parseISO(fromIso));
}

export function parseWith<S extends z.ZodType>(schema: S, input: unknown, prefix = ''): z.output<S> {
  const result = schema.safeParse(input, { reportInput: true });
  if (!result.success) throw fromZod(result.error, input, prefix);
  return result.data;
}

export function specOf(m: Meter): MeterSpec {
  return {
    minHz: m.minHz,
    maxHz: m.maxHz,
    dialKind: m.dialKind,
    accuracyRelPpm: m.accuracyRelPpm,
    accuracyAbsHz: m.accuracyAbsHz,
    resolution: m.resolution,
    chart: m.dialKind === 'divisions' ? m.chart : undefined,
    alphaPerK: m.alphaPerK,
    alphaUncertaintyPerK: m.alphaUncertaintyPerK,
    reference: m.reference,
    loadedQ: m.loadedQ,
    settingFraction: m.settingFraction,
  };
}

/** Collects field issues so one refusal can name every problem of a document at once. */
export class Issues {
  readonly list: FieldIssue[] = [];
  add(field: string, value: unknown, expected: string, message?: string): void {
    this.list.push({
      field,
      value,
      expected,
      message: message ?? `${field}: ${describe(value)}: ${expected}`,
    });
  }
  fromParse(field: string, value: unknown, message: string, expected: string): void {
    this.list.push({ field, value, expected, message });
  }
  throwIfAny(): void {
    if (this.list.length > 0) throw LabError.invalid(this.list);
  }
}

export function frequencyOrIssue(issues: Issues, input: string | number, field: string): number | undefined {
  const r = parseFrequencyHz(input, field);
  if (r.ok) return r.hz;
  issues.fromParse(field, input, r.message, 'a frequency with its unit, such as "9.3 GHz"');
  return undefined;
}
