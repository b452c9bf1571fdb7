// The wire between a LabApi and its thin shells (IPC, loopback HTTP): the result envelope,
// the dispatcher that runs one named operation, and JSON that keeps non-finite numbers.
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

// JSON turns Infinity and NaN into null, yet budgets carry Infinity degrees of freedom;
// a tagged object keeps them across HTTP (IPC's structured clone keeps them anyway).
const NONFINITE_TAG = '$nonfinite';

/** JSON.stringify that keeps Infinity, -Infinity and NaN. */
export function encodeWire(value: unknown): string {
  return JSON.stringify(value, (_key, v: unknown) =>
    typeof v === 'number' && !Number.isFinite(v) ? { [NONFINITE_TAG]: String(v) } : v,
  );
}

/** JSON.parse that restores what encodeWire tagged. Throws SyntaxError on bad JSON. */
export function decodeWire(text: string): unknown {
  return JSON.parse(text, (_key, v: unknown) => {
    if (typeof v === 'object' && v !== null && !Array.isArray(v)) {
      const keys = Object.keys(v);
      const tag = (v as Record<string, unknown>)[NONFINITE_TAG];
      if (keys.length === 1 && (tag === 'Infinity' || tag === '-Infinity' || tag === 'NaN'))
        return Number(tag);
    }
    return v;
  });
}
