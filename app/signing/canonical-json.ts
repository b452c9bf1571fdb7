// JSON Canonicalization Scheme, RFC 8785 (A. Rundgren, B. Jordan, S. Erdtman, June 2020): the
// exact text a signature covers.
//
// - §3.1 data model (I-JSON, RFC 7493): null, booleans, finite IEEE 754 doubles, strings of
//   well-formed Unicode, arrays and objects. Anything else is refused with the path to it.
// - §3.2.1 no whitespace between tokens.
// - §3.2.2.2 strings: the ECMAScript JSON.stringify escapes (\b \f \n \r \t \" \\ and \u00xx in
//   lower-case hex for the other controls); everything else as is, UTF-8 on output.
// - §3.2.2.3 numbers: ECMAScript Number::toString (ECMA-262 §7.1.12.1, shortest round-trip
//   digits), -0 as 0; NaN and the infinities refused.
// - §3.2.3 object members sorted by the UTF-16 code units of their names, recursively; arrays
//   keep their order.
// Checked in test/signing/canonical-json.test.ts against the RFC's own examples
// (test/data/rfc8785/) and byte for byte against the records of the demo lab.

/** A value of the RFC 8785 data model. */
export type JsonValue = null | boolean | number | string | JsonValue[] | { [name: string]: JsonValue };

export class CanonicalJsonError extends Error {
  constructor(
    message: string,
    readonly path: string,
  ) {
    super(`${message} at ${path || 'the top level'}`);
    this.name = 'CanonicalJsonError';
  }
}

/** A lone surrogate (high not followed by low, or low not preceded by high). */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

function serializeString(text: string, path: string): string {
  if (LONE_SURROGATE.test(text)) throw new CanonicalJsonError('a string with a lone surrogate', path);
  // JSON.stringify of a well-formed string is exactly the escaping of RFC 8785 §3.2.2.2.
  return JSON.stringify(text);
}

function serializeNumber(value: number, path: string): string {
  if (!Number.isFinite(value)) throw new CanonicalJsonError(`the number ${String(value)}`, path);
  // Number::toString for finite numbers; -0 prints as 0 (RFC 8785 §3.2.2.3).
  return Object.is(value, -0) ? '0' : String(value);
}

function isPlainObject(value: object): value is Record<string, unknown> {
  const proto: unknown = Object.getPrototypeOf(value);
  return proto === Object.prototype || proto === null;
}

/** Appends the canonical text of `value` to `out`. `ancestors` holds the containers being
 * written, so a cycle is refused rather than followed. */
function write(value: unknown, path: string, out: string[], ancestors: Set<object>): void {
  switch (typeof value) {
    case 'string':
      out.push(serializeString(value, path));
      return;
    case 'number':
      out.push(serializeNumber(value, path));
      return;
    case 'boolean':
      out.push(value ? 'true' : 'false');
      return;
    case 'object':
      break;
    default:
      throw new CanonicalJsonError(`a value of type ${typeof value} (not a JSON value)`, path);
  }
  if (value === null) {
    out.push('null');
    return;
  }
  if (ancestors.has(value)) throw new CanonicalJsonError('a circular reference', path);
  ancestors.add(value);
  if (Array.isArray(value)) {
    out.push('[');
    for (let i = 0; i < value.length; i++) {
      if (i > 0) out.push(',');
      write(value[i], `${path}[${i}]`, out, ancestors);
    }
    out.push(']');
  } else if (isPlainObject(value)) {
    // The default sort compares UTF-16 code units, the order RFC 8785 §3.2.3 asks for.
    const names = Object.keys(value).sort();
    out.push('{');
    names.forEach((name, i) => {
      const memberPath = path ? `${path}.${name}` : name;
      if (i > 0) out.push(',');
      out.push(serializeString(name, memberPath), ':');
      write(value[name], memberPath, out, ancestors);
    });
    out.push('}');
  } else {
    throw new CanonicalJsonError('an object that is not plain JSON (a class instance)', path);
  }
  ancestors.delete(value);
}

/** The RFC 8785 canonical text of a JSON value. Throws CanonicalJsonError, naming where, on
 * anything outside the JSON data model (NaN, infinities, undefined, functions, lone surrogates,
 * class instances such as Date, cycles). */
export function canonicalJson(value: unknown): string {
  const out: string[] = [];
  write(value, '', out, new Set());
  return out.join('');
}

/** The canonical text as UTF-8 bytes, the form signatures and hashes cover. */
export function canonicalJsonBytes(value: unknown): Uint8Array {
  return new TextEncoder().encode(canonicalJson(value));
}
