// Format 1 of the packed point result (check_point.result_json): read, never written any more.
// New writes use format 2 (app/api/point-pack2.ts, re-exported below as packPointResult and
// PACK_MARK); this file keeps format 1's reader for lab files written before it, and its writer so
// tests can make such rows (test/api/point-pack.test.ts). Everything here is frozen.
//
// Why format 1 was made: a point's full evaluation (budget lines with their labels, decision,
// notes) is about 2.8 KB of JSON, two thirds of it the budget lines, which repeat the same key
// names and the same words in every point; at a fleet's 550,000 points that text was most of the
// lab file (2.4 GB) and most of the time a bulk import spent in SQLite (issue 8).
//
// The form is JSON: the result's own object, keys in their order, behind a first key "~": 1,
// with everything as encodeJson writes it except budget.contributions, where
// - a line whose keys, in order, are one of SHAPES is [shape number, ...its values];
// - any other array is [0, ...its items]; any other object stays an object (keys as they are);
// - a string of WORDS is "~" + its number in base 36, one of the TEMPLATES with its middle part
//   is "~" + number + "|" + middle, and a string that begins with "~" gets one more "~".
// So SQLite's JSON functions still read every number outside the budget lines where they were
// (db/queries/history.ts reads budget.combinedHz so), and what `decodeJson` (app/api/json.ts)
// returns for a packed text is what it returns for the JSON text of the same result, key order,
// non-finite numbers and all: signatures and documents, computed from the decoded record, cannot
// tell them apart (test/api/point-pack.test.ts). A value the form cannot hold exactly (another
// shape, a key "__proto__", an undefined, a class instance) was left to the caller to store as
// plain JSON. Rows written before this form read as before.
//
// The tables below (the words and templates shared with format 2 in point-pack-tables.ts) belong
// to format 1 and never change; a new entry means a new format number, which an older reader
// leaves undecoded rather than misreads.

/** What new writes store (format 2): the writer, and how its texts begin. */
export { packPointResult2 as packPointResult, PACK_MARK_2 as PACK_MARK } from './point-pack2';
import { keysAre, RESULT_TEMPLATES, RESULT_WORDS } from './point-pack-tables';

/** How a format-1 text begins; no result stored as plain JSON begins so (its first key is meanDial). */
export const PACK_MARK_1 = '{"~":1,';

const RESULT_KEYS = [
  'meanDial',
  'indicatedHz',
  'upMeanHz',
  'downMeanHz',
  'thermalCorrectionPpm',
  'airCorrectionPpm',
  'correctedHz',
  'errorHz',
  'errorPpm',
  'budget',
  'expandedPpm',
  'decision',
  'notes',
];
const BUDGET_KEYS = [
  'contributions',
  'combinedHz',
  'effectiveDof',
  'coverageFactor',
  'coverageProbability',
  'expandedHz',
];

/** Budget lines, in the two key orders the engine writes them. */
const SHAPES: readonly (readonly string[])[] = [
  [
    'key',
    'label',
    'type',
    'distribution',
    'unit',
    'standardUncertainty',
    'sensitivity',
    'dof',
    'contributionHz',
  ],
  [
    'key',
    'label',
    'unit',
    'sensitivity',
    'type',
    'distribution',
    'standardUncertainty',
    'dof',
    'contributionHz',
  ],
];

/** Whole values. The non-finite numbers are here as the strings encodeJson writes them, and
 * read back as numbers, as decodeJson reads those strings. */
const WORDS: readonly (string | number)[] = [Infinity, -Infinity, NaN, ...RESULT_WORDS];

/** [before, after] the part that differs from point to point. */
const TEMPLATES = RESULT_TEMPLATES;

const wordCode = new Map<string, string>(WORDS.map((w, i) => [String(w), `~${i.toString(36)}`]));

class Unpackable extends Error {}

function packString(s: string): string {
  const code = wordCode.get(s);
  if (code !== undefined) return code;
  for (let i = 0; i < TEMPLATES.length; i++) {
    const [before, after] = TEMPLATES[i] as readonly [string, string];
    if (s.length >= before.length + after.length && s.startsWith(before) && s.endsWith(after))
      return `~${i.toString(36)}|${s.slice(before.length, s.length - after.length)}`;
  }
  return s.charCodeAt(0) === 0x7e ? `~${s}` : s;
}

function pack(v: unknown): unknown {
  switch (typeof v) {
    case 'number':
      return Number.isFinite(v) ? v : wordCode.get(String(v));
    case 'string':
      return packString(v);
    case 'boolean':
      return v;
    case 'object': {
      if (v === null) return null;
      if (Array.isArray(v)) {
        const out: unknown[] = [0];
        for (const item of v) out.push(pack(item));
        return out;
      }
      const proto = Object.getPrototypeOf(v) as unknown;
      if (proto !== Object.prototype && proto !== null) throw new Unpackable();
      const o = v as Record<string, unknown>;
      for (let i = 0; i < SHAPES.length; i++) {
        const keys = SHAPES[i] as readonly string[];
        if (!keysAre(o, keys)) continue;
        const out: unknown[] = [i + 1];
        for (const k of keys) out.push(packValue(o[k]));
        return out;
      }
      const out: Record<string, unknown> = {};
      for (const k of Object.keys(o)) {
        if (k === '__proto__') throw new Unpackable();
        out[k] = packValue(o[k]);
      }
      return out;
    }
    default:
      throw new Unpackable();
  }
}

/** An object's value: JSON leaves out a key whose value is undefined; keep such values plain. */
function packValue(v: unknown): unknown {
  if (v === undefined) throw new Unpackable();
  return pack(v);
}

const plainObject = (v: unknown): v is Record<string, unknown> => {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) return false;
  const proto = Object.getPrototypeOf(v) as unknown;
  return proto === Object.prototype || proto === null;
};

/** A value outside the budget lines as encodeJson writes it (non-finite numbers as text), for
 * the plain data a result is; anything else is Unpackable. */
function plain(v: unknown): unknown {
  switch (typeof v) {
    case 'number':
      return Number.isFinite(v) ? v : String(v);
    case 'string':
    case 'boolean':
      return v;
    case 'object': {
      if (v === null) return null;
      if (Array.isArray(v)) return v.map(plain);
      if (!plainObject(v)) throw new Unpackable();
      const out: Record<string, unknown> = {};
      for (const k of Object.keys(v)) {
        if (k === '__proto__' || v[k] === undefined) throw new Unpackable();
        out[k] = plain(v[k]);
      }
      return out;
    }
    default:
      throw new Unpackable();
  }
}

/** The format-1 text of a point result, or undefined when the form cannot hold it exactly (the
 * caller then stores the result as JSON with encodeJson). Not used to write any more: kept, frozen,
 * so tests can write rows as older code did. */
export function packPointResult1(value: unknown): string | undefined {
  if (!plainObject(value) || !keysAre(value, RESULT_KEYS)) return undefined;
  const budget = value.budget;
  if (!plainObject(budget) || !keysAre(budget, BUDGET_KEYS) || !Array.isArray(budget.contributions))
    return undefined;
  try {
    const out: Record<string, unknown> = { '~': 1 };
    for (const k of RESULT_KEYS) {
      if (value[k] === undefined) return undefined;
      out[k] = k === 'budget' ? undefined : plain(value[k]);
    }
    const packedBudget: Record<string, unknown> = {};
    for (const k of BUDGET_KEYS) {
      if (budget[k] === undefined) return undefined;
      packedBudget[k] =
        k === 'contributions' ? (budget.contributions as unknown[]).map(pack) : plain(budget[k]);
    }
    out.budget = packedBudget;
    return JSON.stringify(out);
  } catch (e) {
    if (e instanceof Unpackable) return undefined;
    throw e;
  }
}

function unpackString(s: string): unknown {
  if (s.charCodeAt(0) !== 0x7e) {
    // As decodeJson reads these strings.
    return s === 'Infinity' ? Infinity : s === '-Infinity' ? -Infinity : s === 'NaN' ? NaN : s;
  }
  if (s.charCodeAt(1) === 0x7e) return s.slice(1);
  const bar = s.indexOf('|');
  if (bar < 0) {
    const word = WORDS[parseInt(s.slice(1), 36)];
    if (word === undefined) throw new Error(`packed result: unknown word ${s}`);
    return word;
  }
  const template = TEMPLATES[parseInt(s.slice(1, bar), 36)];
  if (!template) throw new Error(`packed result: unknown template ${s.slice(0, bar)}`);
  return template[0] + s.slice(bar + 1) + template[1];
}

function unpack(v: unknown): unknown {
  if (typeof v === 'string') return unpackString(v);
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) {
    const tag = v[0] as unknown;
    if (tag === 0) {
      const out: unknown[] = new Array(v.length - 1);
      for (let i = 1; i < v.length; i++) out[i - 1] = unpack(v[i]);
      return out;
    }
    const keys = typeof tag === 'number' ? SHAPES[tag - 1] : undefined;
    if (!keys || keys.length !== v.length - 1) throw new Error(`packed result: unknown shape ${String(tag)}`);
    const out: Record<string, unknown> = {};
    for (let i = 0; i < keys.length; i++) out[keys[i] as string] = unpack(v[i + 1]);
    return out;
  }
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(v as Record<string, unknown>)) {
    // JSON.parse makes "__proto__" an own key; so does this.
    if (k === '__proto__')
      Object.defineProperty(out, k, {
        value: unpack(x),
        enumerable: true,
        writable: true,
        configurable: true,
      });
    else out[k] = unpack(x);
  }
  return out;
}

/** The result a packed text holds, from the text JSON.parse (with decodeJson's reading of
 * non-finite numbers) made of it; undefined when it is not the packed form after all. */
export function unpackPointResult1(parsed: unknown): unknown {
  if (!plainObject(parsed) || parsed['~'] !== 1) return undefined;
  const own = Object.keys(parsed);
  if (own.length !== RESULT_KEYS.length + 1 || !RESULT_KEYS.every((k, i) => own[i + 1] === k))
    return undefined;
  const budget = parsed.budget;
  if (!plainObject(budget) || !keysAre(budget, BUDGET_KEYS) || !Array.isArray(budget.contributions))
    return undefined;
  const out: Record<string, unknown> = {};
  for (const k of RESULT_KEYS) out[k] = parsed[k];
  out.budget = { ...budget, contributions: (budget.contributions as unknown[]).map(unpack) };
  return out;
}
