// Input checking shared by every operation: zod parsing into LabError, and the issue collector
// that lets one refusal name every problem of a document at once.
import type { z } from 'zod';
import { parseFrequencyHz } from '../engine';
import { LabError, describe, fromZod, type FieldIssue } from './errors';

export function parseWith<S extends z.ZodType>(schema: S, input: unknown, prefix = ''): z.output<S> {
  const result = schema.safeParse(input, { reportInput: true });
  if (!result.success) throw fromZod(result.error, input, prefix);
  return result.data;
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
