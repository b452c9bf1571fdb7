// JSON that keeps Infinity and NaN (a Type B input with infinite degrees of freedom is common):
// non-finite numbers travel as the strings "Infinity", "-Infinity" and "NaN".
export function encodeJson(value: unknown, space?: number): string {
  return JSON.stringify(
    value,
    (_key, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v),
    space,
  );
}

export function decodeJson(text: string): unknown {
  return JSON.parse(text, (_key, v: unknown) =>
    v === 'Infinity' ? Infinity : v === '-Infinity' ? -Infinity : v === 'NaN' ? NaN : v,
  );
}
