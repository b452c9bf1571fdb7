// The wire between a LabApi and its thin shells (IPC, loopback HTTP): the result envelope,
// the dispatcher that runs one named operation, and JSON that keeps non-finite numbers.
import { decodeJson, encodeJson } from '../model/json';
import { OPERATIONS } from './contract';
import type { LabApi, OperationName } from './contract';
import { LabError, fromWire, toWire } from './errors';
import type { WireError } from './errors';

export type Envelope<T = unknown> = { ok: true; value: T } | { ok: false; error: WireError };

/** How a client reaches a LabApi: one operation name and its positional arguments. */
export type CallFn = (op: OperationName, args: unknown[]) => Promise<unknown>;

const CODES: ReadonlySet<string> = new Set(['invalid-input', 'not-found', 'conflict', 'refused', 'internal']);

/** Own keys only, so "constructor", "__proto__" or "toString" never reach the api object. */
export function isOperationName(op: unknown): op is OperationName {
  return typeof op === 'string' && Object.prototype.hasOwnProperty.call(OPERATIONS, op);
}

function failure(e: unknown): Envelope<never> {
  try {
    return { ok: false, error: toWire(e) };
  } catch {
    // toWire must not make dispatch throw, whatever was thrown at it.
    return { ok: false, error: { code: 'internal', message: 'unexpected error', issues: [] } };
  }
}

/** Runs one operation named by a caller we do not trust (IPC or HTTP); never throws. */
export async function dispatch(api: LabApi, op: unknown, args: unknown): Promise<Envelope> {
  if (!isOperationName(op)) {
    return failure(
      LabError.field(
        'operation',
        op,
        `one of: ${Object.keys(OPERATIONS).join(', ')}`,
        `unknown operation ${describeOp(op)}`,
      ),
    );
  }
  if (!Array.isArray(args)) {
    return failure(
      LabError.field('args', args, 'an array of arguments', `${op}: arguments must be an array`),
    );
  }
  try {
    // Read without binding; apply(api, ...) below supplies `this`.
    const method: unknown = Reflect.get(api, op);
    if (typeof method !== 'function') throw new LabError('internal', `${op} is not available in this build`);
    const value: unknown = await (method as (...a: unknown[]) => Promise<unknown>).apply(api, args);
    return { ok: true, value };
  } catch (e) {
    return failure(e);
  }
}

function describeOp(op: unknown): string {
  return typeof op === 'string' ? JSON.stringify(op.slice(0, 60)) : `of type ${typeof op}`;
}

function isWireError(x: unknown): x is WireError {
  if (typeof x !== 'object' || x === null) return false;
  const w = x as Record<string, unknown>;
  return (
    typeof w.code === 'string' &&
    CODES.has(w.code) &&
    typeof w.message === 'string' &&
    Array.isArray(w.issues)
  );
}

/** Turns an envelope back into its value, or throws the LabError it carries. */
export function unwrap(envelope: unknown): unknown {
  if (typeof envelope === 'object' && envelope !== null && 'ok' in envelope) {
    const env = envelope as { ok: unknown; value?: unknown; error?: unknown };
    if (env.ok === true) return env.value;
    if (env.ok === false && isWireError(env.error)) throw fromWire(env.error);
  }
  throw new LabError('internal', 'the answer from the lab service was not understood');
}

/** The wire's JSON: the lab's one dialect (app/model/json.ts), so Infinity and NaN (budgets carry
 * infinite degrees of freedom) cross HTTP; IPC's structured clone keeps them anyway. */
export const encodeWire = (value: unknown): string => encodeJson(value);

/** The value of a wire text, non-finite numbers back in number fields. Throws SyntaxError on bad JSON. */
export const decodeWire = (text: string): unknown => decodeJson(text);
