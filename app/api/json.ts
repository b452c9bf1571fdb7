// JSON that keeps Infinity and NaN (a Type B input with infinite degrees of freedom is common):
// non-finite numbers travel as the strings "Infinity", "-Infinity" and "NaN".
import { PACK_MARK_1, unpackPointResult1 } from './point-pack';
import { PACK_MARK_2, unpackPointResult2 } from './point-pack2';

export function encodeJson(value: unknown, space?: number): string {
  // The same text a replacer turning non-finite numbers into strings gives, but a replacer puts
  // JSON.stringify on its slow path (a bulk import encodes every point's result), so the
  // non-finite numbers are replaced in a copy first (test/api/json-encode.test.ts compares both).
  return JSON.stringify(nonFiniteAsText(value, ''), null, space);
}

/** A copy of `v` as JSON.stringify would walk it, with non-finite numbers as strings. */
function nonFiniteAsText(v: unknown, key: string): unknown {
  if (typeof v === 'number') return Number.isFinite(v) ? v : String(v);
  if (v === null || typeof v !== 'object') return v;
  const toJson = (v as { toJSON?: unknown }).toJSON;
  if (typeof toJson === 'function') return nonFiniteAsText(toJson.call(v, key) as unknown, key);
  // Boxed primitives are serialised by their value, which a replacer never saw as a number.
  if (v instanceof Number || v instanceof String || v instanceof Boolean) return v;
  if (Array.isArray(v)) return v.map((item, i) => nonFiniteAsText(item, String(i)));
  // No prototype, so an own key named "__proto__" stays a plain key as JSON.stringify sees it.
  const out = Object.create(null) as Record<string, unknown>;
  for (const k of Object.keys(v)) out[k] = nonFiniteAsText((v as Record<string, unknown>)[k], k);
  return out;
}

/** The value of a JSON text; a point result stored packed (format 2, app/api/point-pack2.ts, or
 * format 1, app/api/point-pack.ts) reads as the result it holds. */
export function decodeJson(text: string): unknown {
  if (text.startsWith(PACK_MARK_2)) {
    const packed = unpackPointResult2(text);
    if (packed !== undefined) return packed;
  }
  const value: unknown = JSON.parse(text, (_key, v: unknown) =>
    v === 'Infinity' ? Infinity : v === '-Infinity' ? -Infinity : v === 'NaN' ? NaN : v,
  );
  return text.startsWith(PACK_MARK_1) ? (unpackPointResult1(value) ?? value) : value;
}
