// The one JSON dialect of the lab: records at rest, records embedded in documents, signed
// payloads and the HTTP wire. JSON has no Infinity or NaN, yet a Type B input with infinite
// degrees of freedom is common, so non-finite numbers are written as the strings "Infinity",
// "-Infinity" and "NaN" (the stored records have always been written this way; their bytes are
// frozen).
//
// Reading is type-directed: a field the lab's vocabulary types as text (a remark, a name, an
// asset id...) keeps its string even when it reads "NaN"; only the other fields, which hold
// numbers, get the non-finite numbers back. Without that, a remark of exactly "NaN" would come
// back as a number and the signature over its record would no longer verify.

/** Fields that hold text in the lab's records and views (app/model, the contract, the documents'
 * model): a string there is never a number, whatever it reads. Items of an array take the name
 * of the array's field ("standards", "traceabilityExceptions", "flags"). */
export const TEXT_FIELDS: ReadonlySet<string> = new Set([
  'accreditation',
  'action',
  'actor',
  'address',
  'affects',
  'amendReason',
  'amendedBy',
  'asOf',
  'assetId',
  'at',
  'basis',
  'by',
  'calibratedOn',
  'certificateId',
  'comment',
  'createdAt',
  'date',
  'description',
  'dueDate',
  'dueOn',
  'engineVersion',
  'enrolledAt',
  'entity',
  'entityId',
  'exceptions',
  'expected',
  'field',
  'fingerprint',
  'flags',
  'hash',
  'issuedAt',
  'issuedBy',
  'keyFingerprint',
  'label',
  'lastCheckDate',
  'location',
  'madeBy',
  'message',
  'meter',
  'meterAssetId',
  'method',
  'methodName',
  'name',
  'note',
  'notes',
  'number',
  'path',
  'payloadSha256',
  'performedOn',
  'performer',
  'person',
  'port',
  'printedName',
  'printedOn',
  'problem',
  'purpose',
  'rationale',
  'reason',
  'record',
  'recordName',
  'recordedAt',
  'remark',
  'remarks',
  'replaceReason',
  'role',
  'short',
  'signatureB64',
  'signedAt',
  'signer',
  'sourceName',
  'standard',
  'standardAssetId',
  'standards',
  'text',
  'title',
  'traceabilityExceptions',
  'unit',
  'updatedAt',
  'warnings',
  'why',
]);

/** JSON text of a value, non-finite numbers as "Infinity", "-Infinity" and "NaN". */
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

const NON_FINITE = /"(?:-?Infinity|NaN)"/;

/** The value of a JSON text in this dialect: non-finite numbers back in number fields, text
 * fields left as written. Throws SyntaxError on text that is not JSON. */
export function decodeJson(text: string): unknown {
  const value: unknown = JSON.parse(text);
  // Most texts hold no non-finite number at all: nothing to walk.
  return NON_FINITE.test(text) ? reviveNonFinite(value, '') : value;
}

/** Puts non-finite numbers back into a parsed value, in place, by the rule above. */
export function reviveNonFinite(value: unknown, field: string): unknown {
  if (typeof value === 'string') return TEXT_FIELDS.has(field) ? value : asNonFinite(value);
  if (value === null || typeof value !== 'object') return value;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) value[i] = reviveNonFinite(value[i], field);
    return value;
  }
  const o = value as Record<string, unknown>;
  for (const k of Object.keys(o)) {
    const v = o[k];
    const back = reviveNonFinite(v, k);
    // defineProperty, so an own key named "__proto__" stays a plain key.
    if (back !== v)
      Object.defineProperty(o, k, { value: back, writable: true, enumerable: true, configurable: true });
  }
  return o;
}

function asNonFinite(s: string): unknown {
  return s === 'Infinity' ? Infinity : s === '-Infinity' ? -Infinity : s === 'NaN' ? NaN : s;
}
