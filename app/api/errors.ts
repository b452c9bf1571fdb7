// Typed errors of the LabApi and their wire form. Every refusal names the field, the value
// given and what was expected, in words a technician understands.
import type { z } from 'zod';

export type LabErrorCode = 'invalid-input' | 'not-found' | 'conflict' | 'refused' | 'busy' | 'internal';

export interface FieldIssue {
  /** Dotted path of the field, e.g. "points[2].readings[0].value". */
  field: string;
  value: unknown;
  expected: string;
  message: string;
}

export interface WireError {
  code: LabErrorCode;
  message: string;
  issues: FieldIssue[];
}

export class LabError extends Error {
  readonly code: LabErrorCode;
  readonly issues: FieldIssue[];

  constructor(code: LabErrorCode, message: string, issues: FieldIssue[] = []) {
    super(message);
    this.name = 'LabError';
    this.code = code;
    this.issues = issues;
  }

  static invalid(issues: FieldIssue[]): LabError {
    const first = issues[0];
    const head = first ? first.message : 'invalid input';
    const more = issues.length > 1 ? ` (and ${issues.length - 1} more)` : '';
    return new LabError('invalid-input', head + more, issues);
  }

  static field(field: string, value: unknown, expected: string, message?: string): LabError {
    return LabError.invalid([
      {
        field,
        value,
        expected,
        message: message ?? `${field}: ${describe(value)} is not valid; expected ${expected}`,
      },
    ]);
  }
}

/** Shows a value as a technician typed it: strings quoted, long values cut. */
export function describe(value: unknown): string {
  if (value === undefined) return 'missing';
  let text: string;
  try {
    text = JSON.stringify(value) ?? typeof value;
  } catch {
    text = typeof value;
  }
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

export function pathToField(path: readonly PropertyKey[], prefix = ''): string {
  let out = prefix;
  for (const part of path) {
    if (typeof part === 'number') out += `[${part}]`;
    else out += out ? `.${String(part)}` : String(part);
  }
  return out || '(document)';
}

/** Turns zod issues into field issues; `input` is the raw document, to show the value given. */
export function fromZod(error: z.ZodError, input: unknown, prefix = ''): LabError {
  const issues = error.issues.map((issue): FieldIssue => {
    const field = pathToField(issue.path, prefix);
    const value = valueAt(input, issue.path);
    const expected = issue.message.replace(/^Invalid input: /, '');
    const message =
      value === undefined
        ? `${field}: missing; ${expected}`
        : `${field}: ${describe(value)} is not valid; ${expected}`;
    return { field, value, expected, message };
  });
  return LabError.invalid(issues);
}

function valueAt(input: unknown, path: readonly PropertyKey[]): unknown {
  let cur: unknown = input;
  for (const key of path) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<PropertyKey, unknown>)[key];
  }
  return cur;
}

export function toWire(e: unknown): WireError {
  if (e instanceof LabError) return { code: e.code, message: e.message, issues: e.issues };
  const message = e instanceof Error ? e.message : String(e);
  return { code: 'internal', message, issues: [] };
}

export function fromWire(w: WireError): LabError {
  return new LabError(w.code, w.message, w.issues);
}
