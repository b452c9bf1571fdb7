// Format 2 of the packed point result (check_point.result_json): what new writes store.
//
// Why a second format (issue 8, import speed): format 1 (app/api/point-pack.ts) kept every number
// as decimal text, and writing some 50 doubles a point as shortest round-trip decimals was most of
// what packing a point cost (a bulk import has about 45 us a point in all) and most of its
// 1.45 kB. Here the numbers travel as their IEEE-754 bits, which cost nothing to format and are
// exact by construction. Measured interleaved in one process on the demo lab's and a bench
// fleet's points (tmp/pointpack2/bench.ts when written): packing about 4.5-5 us a point against
// 12-14 us for format 1, reading about 3-4 us against about 40-55 us, about 600 bytes a point
// against 1,450.
//
// The text is a JSON object: {"~":2,"budget":{"combinedHz":X},"n":N,"s":S,"t":T}, where
// - X is result.budget.combinedHz written as JSON.stringify writes it (a non-finite one as the
//   string encodeJson writes), so SQLite's `result_json -> '$.budget.combinedHz'` gives the text
//   it gave for a plain JSON row (db/queries/history.ts and the index of migration 0007 read it);
//   the "budget" member is left out when the result has no budget.combinedHz;
// - N is base64 of little-endian float64s: the numbers no shorter code of S holds, in order;
// - S is the value, one character per node in document order (OPS and the tables below): an
//   object with one of the KEY_LISTS is one character followed by its values; any other object
//   is "{", each key (taken from T) and value, "}"; an array is "[", its items, "]"; a string of
//   WORDS is one character; one of TEMPLATES is its character, its middle part taken from T; any
//   other string is "$", itself taken from T; a number is a constant's character, "=" (X), a
//   reference to one of the last few numbers of N, or "." (the next number of N);
// - T is the list of those strings, in order.
// What JSON would not give back as it was is stored as JSON gives it back: -0 as 0, and the
// strings "Infinity", "-Infinity" and "NaN" as those numbers (decodeJson reads them so). So
// decodeJson (app/api/json.ts) returns for such a text what it returns for the JSON text of the
// same result: same values, key order and types (test/api/point-pack.test.ts,
// test/api/point-pack2.test.ts). A value the form cannot hold exactly (a class instance, an
// undefined, a function, a key "__proto__", a budget.combinedHz that is not a number) is left to
// the caller to store as plain JSON. A damaged text is refused, never misread.
//
// Frozen: PACK_MARK_2, the layout above, OPS, CONSTANT_OPS and every table below with its
// characters (words and templates shared with format 1 in point-pack-tables.ts) belong to format 2 and never change once shipped (test/api/point-pack2.test.ts holds
// a text written when it shipped). A change is format 3, a new mark; the reader keeps reading
// formats 1 and 2 and plain JSON. Buffer is Node's: this runs in the main process, never in the
// renderer.
import { Buffer } from 'node:buffer';
import { keysAre, RESULT_TEMPLATES, RESULT_WORDS } from './point-pack-tables';

/** How a format-2 text begins. */
export const PACK_MARK_2 = '{"~":2,';

/** Objects whose own keys are exactly one of these lists, in order, are written as one character
 * (KEY_LIST_OPS, same position) followed by their values. */
const KEY_LISTS: readonly (readonly string[])[] = [
  [
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
  ],
  ['contributions', 'combinedHz', 'effectiveDof', 'coverageFactor', 'coverageProbability', 'expandedHz'],
  // Budget lines, in the two key orders the engine writes them.
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
  ['rule', 'verdict', 'acceptanceLimitHz', 'toleranceHz', 'guardBandHz', 'probabilityOfConformity', 'tur'],
  ['kind'],
  ['kind', 'multipleOfU'],
  ['kind', 'guardBandPpm'],
];
const KEY_LIST_OPS = ':;<>@/|~';

/** Whole strings, one character each (WORD_OPS, same position). */
const WORDS = RESULT_WORDS;
const WORD_OPS = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmn';

/** [before, after] the part that differs from point to point (TEMPLATE_OPS, same position). */
const TEMPLATES = RESULT_TEMPLATES;
const TEMPLATE_OPS = 'vwxyz';

/** The other characters of S; none needs escaping in a JSON string. */
const OPS = {
  array: '[',
  arrayEnd: ']',
  object: '{',
  objectEnd: '}',
  /** The next number of N. */
  double: '.',
  /** The number in the text's budget.combinedHz. */
  combined: '=',
  /** The 1st to 4th number of N before the next one (a budget repeats some: a sensitivity on
   * two lines, a standard uncertainty as its contribution, U as the guard band). */
  back: "!%&'",
  /** The next string of T, as it is. */
  string: '$',
} as const;
/** Values with a character of their own: -1 and 0 to 9 (JSON writes -0 as 0), the non-finite
 * numbers (written as strings by encodeJson, read as numbers by decodeJson), null, true, false. */
const CONSTANT_OPS = '#0123456789^`?_+-';
const CONSTANTS: readonly unknown[] = [
  -1,
  0,
  1,
  2,
  3,
  4,
  5,
  6,
  7,
  8,
  9,
  Infinity,
  -Infinity,
  NaN,
  null,
  true,
  false,
];
const SMALL_MIN = -1;
const SMALL_MAX = 9;

// What each character means: a kind, and an index into the kind's table.
const K_DOUBLE = 1;
const K_ARRAY = 2;
const K_OBJECT = 3;
const K_COMBINED = 4;
const K_BACK = 5;
const K_STRING = 6;
const K_CONSTANT = 7;
const K_WORD = 8;
const K_TEMPLATE = 9;
const K_KEY_LIST = 10;
const OP_KIND = new Uint8Array(128);
const OP_ARG = new Uint8Array(128);
function define(chars: string, kind: number): void {
  for (let i = 0; i < chars.length; i++) {
    const c = chars.charCodeAt(i);
    if (c >= 128 || OP_KIND[c] !== 0 || c === 0x22 || c === 0x5c || c < 0x21)
      throw new Error(`point-pack2: character ${chars[i]} unusable or taken twice`);
    OP_KIND[c] = kind;
    OP_ARG[c] = i;
  }
}
define(OPS.double, K_DOUBLE);
define(OPS.array, K_ARRAY);
define(OPS.object, K_OBJECT);
define(OPS.combined, K_COMBINED);
define(OPS.back, K_BACK);
define(OPS.string, K_STRING);
define(CONSTANT_OPS, K_CONSTANT);
define(WORD_OPS, K_WORD);
define(TEMPLATE_OPS, K_TEMPLATE);
define(KEY_LIST_OPS, K_KEY_LIST);
// The two ends are read where an item could begin, so they too must be taken only once.
define(OPS.arrayEnd + OPS.objectEnd, 255);
if (
  KEY_LIST_OPS.length !== KEY_LISTS.length ||
  WORD_OPS.length !== WORDS.length ||
  TEMPLATE_OPS.length !== TEMPLATES.length ||
  CONSTANT_OPS.length !== CONSTANTS.length
)
  throw new Error('point-pack2: a table and its characters differ in length');

const code = (c: string): number => c.charCodeAt(0);
const DOUBLE = code(OPS.double);
const ARRAY = code(OPS.array);
const ARRAY_END = code(OPS.arrayEnd);
const OBJECT = code(OPS.object);
const OBJECT_END = code(OPS.objectEnd);
const COMBINED = code(OPS.combined);
const STRING = code(OPS.string);
const BACK = [...OPS.back].map(code);
const SMALL = CONSTANT_OPS.slice(0, SMALL_MAX - SMALL_MIN + 1);
const INFINITY = code(CONSTANT_OPS[11] as string);
const MINUS_INFINITY = code(CONSTANT_OPS[12] as string);
const NAN = code(CONSTANT_OPS[13] as string);
const NULL = code(CONSTANT_OPS[14] as string);
const TRUE = code(CONSTANT_OPS[15] as string);
const FALSE = code(CONSTANT_OPS[16] as string);

const BEFORE = TEMPLATES.map((x) => x[0]);
const AFTER = TEMPLATES.map((x) => x[1]);
const LINE_KEYS = KEY_LISTS[2] as readonly string[];
const LINE_KEYS_OTHER_ORDER = KEY_LISTS[3] as readonly string[];
const wordOp = new Map<string, number>(WORDS.map((w, i) => [w, WORD_OPS.charCodeAt(i)]));
/** Candidate key lists by an object's first key (so an object is compared with one or two). */
const listsByFirstKey = new Map<string, number[]>();
KEY_LISTS.forEach((keys, i) => {
  const first = keys[0] as string;
  listsByFirstKey.set(first, [...(listsByFirstKey.get(first) ?? []), i]);
});

/** Float64Array's byte order is the host's; N is little-endian on every host. */
const HOST_LITTLE_ENDIAN = new Uint8Array(Float64Array.of(1).buffer)[7] === 0x3f;

class Unpackable extends Error {}

// Scratch space, reused: packing and unpacking run synchronously, one point at a time.
let numbers = new Float64Array(64);
let numberBytes = Buffer.from(numbers.buffer);
let numberCount = 0;
let ops = Buffer.from(new ArrayBuffer(256));
let opCount = 0;
let strings: string[] = [];
let combinedHz = NaN;

function emit(c: number): void {
  if (opCount === ops.length) {
    const grown = Buffer.from(new ArrayBuffer(ops.length * 2));
    ops.copy(grown);
    ops = grown;
  }
  ops[opCount++] = c;
}

function packNumber(v: number): void {
  if (v === (v | 0)) {
    // -0 lands here as 0, as JSON writes it.
    if (v >= SMALL_MIN && v <= SMALL_MAX) return emit(SMALL.charCodeAt(v - SMALL_MIN));
  } else if (v !== v) return emit(NAN);
  else if (v === Infinity) return emit(INFINITY);
  else if (v === -Infinity) return emit(MINUS_INFINITY);
  if (v === combinedHz) return emit(COMBINED);
  const window = numberCount < BACK.length ? numberCount : BACK.length;
  for (let k = 1; k <= window; k++) {
    if (numbers[numberCount - k] === v) return emit(BACK[k - 1] as number);
  }
  if (numberCount === numbers.length) {
    const grown = new Float64Array(numbers.length * 2);
    grown.set(numbers);
    numbers = grown;
    numberBytes = Buffer.from(numbers.buffer);
  }
  numbers[numberCount++] = v;
  emit(DOUBLE);
}

function packString(s: string): void {
  const w = wordOp.get(s);
  if (w !== undefined) return emit(w);
  // As decodeJson reads these strings.
  if (s === 'Infinity') return emit(INFINITY);
  if (s === '-Infinity') return emit(MINUS_INFINITY);
  if (s === 'NaN') return emit(NAN);
  const first = s.charCodeAt(0);
  for (let i = 0; i < TEMPLATES.length; i++) {
    const before = BEFORE[i] as string;
    const after = AFTER[i] as string;
    if (
      first === before.charCodeAt(0) &&
      s.length >= before.length + after.length &&
      s.startsWith(before) &&
      s.endsWith(after)
    ) {
      strings.push(s.slice(before.length, s.length - after.length));
      return emit(TEMPLATE_OPS.charCodeAt(i));
    }
  }
  strings.push(s);
  emit(STRING);
}

function isPlainObject(v: object): boolean {
  const proto = Object.getPrototypeOf(v) as unknown;
  return proto === Object.prototype || proto === null;
}

function packValue(v: unknown): void {
  switch (typeof v) {
    case 'number':
      return packNumber(v);
    case 'string':
      return packString(v);
    case 'boolean':
      return emit(v ? TRUE : FALSE);
    case 'object':
      if (v === null) return emit(NULL);
      if (Array.isArray(v)) {
        emit(ARRAY);
        for (let i = 0; i < v.length; i++) packValue(v[i]);
        return emit(ARRAY_END);
      }
      return packObject(v);
    default:
      // undefined, functions, symbols (JSON leaves them out), bigint (JSON refuses it).
      throw new Unpackable();
  }
}

function packObject(o: object): void {
  if (!isPlainObject(o)) throw new Unpackable();
  let first: string | undefined;
  for (const k in o) {
    first = k;
    break;
  }
  const candidates = first === undefined ? undefined : listsByFirstKey.get(first);
  if (candidates) {
    for (const i of candidates) {
      if (keysAre(o, KEY_LISTS[i] as readonly string[])) return packKeyList(i, o as KnownObject);
    }
  }
  emit(OBJECT);
  const rec = o as Record<string, unknown>;
  for (const k of Object.keys(o)) {
    // JSON.parse makes "__proto__" an own key, an assignment would not: leave such values to JSON.
    if (k === '__proto__') throw new Unpackable();
    strings.push(k);
    packValue(rec[k]);
  }
  emit(OBJECT_END);
}

type KnownObject = Record<string, unknown>;

function isPlainRecord(v: unknown): v is KnownObject {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && isPlainObject(v);
}

/** A value where the engine puts an object of KEY_LISTS[i]: that list is tried first. */
function packAs(v: unknown, i: number): void {
  if (isPlainRecord(v) && keysAre(v, KEY_LISTS[i] as readonly string[])) return packKeyList(i, v);
  packValue(v);
}

/** budget.contributions: lines in either of the engine's key orders, tried first. */
function packLines(v: unknown): void {
  if (!Array.isArray(v)) return packValue(v);
  emit(ARRAY);
  for (let k = 0; k < v.length; k++) {
    const line: unknown = v[k];
    if (isPlainRecord(line) && keysAre(line, LINE_KEYS)) packKeyList(2, line);
    else if (isPlainRecord(line) && keysAre(line, LINE_KEYS_OTHER_ORDER)) packKeyList(3, line);
    else packValue(line);
  }
  emit(ARRAY_END);
}

/** The values of an object of KEY_LISTS[i], read by name: a load by a varying key (o[k]) costs
 * V8 a lookup in its megamorphic cache each time, which made that most of packing a point. */
function packKeyList(i: number, o: KnownObject): void {
  emit(KEY_LIST_OPS.charCodeAt(i));
  const v = packValue;
  switch (i) {
    case 0:
      v(o.meanDial);
      v(o.indicatedHz);
      v(o.upMeanHz);
      v(o.downMeanHz);
      v(o.thermalCorrectionPpm);
      v(o.airCorrectionPpm);
      v(o.correctedHz);
      v(o.errorHz);
      v(o.errorPpm);
      packAs(o.budget, 1);
      v(o.expandedPpm);
      packAs(o.decision, 4);
      return v(o.notes);
    case 1:
      packLines(o.contributions);
      v(o.combinedHz);
      v(o.effectiveDof);
      v(o.coverageFactor);
      v(o.coverageProbability);
      return v(o.expandedHz);
    case 2:
      v(o.key);
      v(o.label);
      v(o.type);
      v(o.distribution);
      v(o.unit);
      v(o.standardUncertainty);
      v(o.sensitivity);
      v(o.dof);
      return v(o.contributionHz);
    case 3:
      v(o.key);
      v(o.label);
      v(o.unit);
      v(o.sensitivity);
      v(o.type);
      v(o.distribution);
      v(o.standardUncertainty);
      v(o.dof);
      return v(o.contributionHz);
    case 4:
      packAs(o.rule, 6);
      v(o.verdict);
      v(o.acceptanceLimitHz);
      v(o.toleranceHz);
      v(o.guardBandHz);
      v(o.probabilityOfConformity);
      return v(o.tur);
    case 5:
      return v(o.kind);
    case 6:
      v(o.kind);
      return v(o.multipleOfU);
    case 7:
      v(o.kind);
      return v(o.guardBandPpm);
  }
  throw new Error(`point-pack2: no writer for key list ${i}`);
}

/** The format-2 text of a point result, or undefined when the form cannot hold it exactly (the
 * caller then stores the result as JSON with encodeJson). */
export function packPointResult2(value: unknown): string | undefined {
  if (value === null || typeof value !== 'object' || Array.isArray(value) || !isPlainObject(value))
    return undefined;
  const budget = (value as { budget?: unknown }).budget;
  let header = '';
  combinedHz = NaN;
  if (
    budget !== null &&
    typeof budget === 'object' &&
    !Array.isArray(budget) &&
    Object.prototype.hasOwnProperty.call(value, 'budget') &&
    Object.prototype.hasOwnProperty.call(budget, 'combinedHz')
  ) {
    const c = (budget as { combinedHz?: unknown }).combinedHz;
    if (typeof c !== 'number') return undefined;
    // JSON.stringify's text of a number is String's (-0 included); encodeJson's of a non-finite one.
    header = `"budget":{"combinedHz":${Number.isFinite(c) ? String(c) : `"${String(c)}"`}},`;
    combinedHz = c;
  }
  numberCount = 0;
  opCount = 0;
  strings = [];
  try {
    packAs(value, 0);
  } catch (e) {
    if (e instanceof Unpackable) return undefined;
    throw e;
  }
  const n = HOST_LITTLE_ENDIAN
    ? numberBytes.toString('base64', 0, numberCount * 8)
    : Buffer.from(numberBytes.subarray(0, numberCount * 8))
        .swap64()
        .toString('base64');
  return `${PACK_MARK_2}${header}"n":"${n}","s":"${ops.toString('latin1', 0, opCount)}","t":${JSON.stringify(strings)}}`;
}

// Reading.
let readBytes = Buffer.from(new ArrayBuffer(512));
let readNumbers = new Float64Array(readBytes.buffer, 0, readBytes.length / 8);
let s = '';
let pos = 0;
let t: unknown[] = [];
let ti = 0;
let ni = 0;
let nCount = 0;
let header: unknown = undefined;

class Corrupt extends Error {
  constructor(what: string) {
    super(`packed result (format 2): ${what}`);
  }
}

function nextString(): string {
  const v = t[ti++];
  if (typeof v !== 'string') throw new Corrupt('missing string');
  return v;
}

function readValue(): unknown {
  const c = s.charCodeAt(pos++);
  const arg = OP_ARG[c] as number;
  switch (OP_KIND[c]) {
    case K_DOUBLE:
      if (ni >= nCount) throw new Corrupt('missing number');
      return readNumbers[ni++];
    case K_ARRAY: {
      const out: unknown[] = [];
      while (s.charCodeAt(pos) !== ARRAY_END) out.push(readValue());
      pos++;
      return out;
    }
    case K_OBJECT: {
      const out: Record<string, unknown> = {};
      while (s.charCodeAt(pos) !== OBJECT_END) {
        const k = nextString();
        if (k === '__proto__') throw new Corrupt('key __proto__');
        out[k] = readValue();
      }
      pos++;
      return out;
    }
    case K_COMBINED:
      if (typeof header !== 'number') throw new Corrupt('no combinedHz');
      return header;
    case K_BACK: {
      if (ni - 1 - arg < 0) throw new Corrupt('number before the first');
      return readNumbers[ni - 1 - arg];
    }
    case K_STRING:
      return nextString();
    case K_CONSTANT:
      return CONSTANTS[arg];
    case K_WORD:
      return WORDS[arg];
    case K_TEMPLATE: {
      return (BEFORE[arg] as string) + nextString() + (AFTER[arg] as string);
    }
    case K_KEY_LIST:
      return readKeyList(arg);
  }
  throw new Corrupt(pos > s.length ? 'structure ends early' : `unknown code ${s.charAt(pos - 1)}`);
}

// The known objects as literals: V8 builds each with its final layout, as JSON.parse would.
// (Evaluation order is the order written, so values are read in key order.)
function readKeyList(i: number): unknown {
  const v = readValue;
  switch (i) {
    case 0:
      return {
        meanDial: v(),
        indicatedHz: v(),
        upMeanHz: v(),
        downMeanHz: v(),
        thermalCorrectionPpm: v(),
        airCorrectionPpm: v(),
        correctedHz: v(),
        errorHz: v(),
        errorPpm: v(),
        budget: v(),
        expandedPpm: v(),
        decision: v(),
        notes: v(),
      };
    case 1:
      return {
        contributions: v(),
        combinedHz: v(),
        effectiveDof: v(),
        coverageFactor: v(),
        coverageProbability: v(),
        expandedHz: v(),
      };
    case 2:
      return {
        key: v(),
        label: v(),
        type: v(),
        distribution: v(),
        unit: v(),
        standardUncertainty: v(),
        sensitivity: v(),
        dof: v(),
        contributionHz: v(),
      };
    case 3:
      return {
        key: v(),
        label: v(),
        unit: v(),
        sensitivity: v(),
        type: v(),
        distribution: v(),
        standardUncertainty: v(),
        dof: v(),
        contributionHz: v(),
      };
    case 4:
      return {
        rule: v(),
        verdict: v(),
        acceptanceLimitHz: v(),
        toleranceHz: v(),
        guardBandHz: v(),
        probabilityOfConformity: v(),
        tur: v(),
      };
    case 5:
      return { kind: v() };
    case 6:
      return { kind: v(), multipleOfU: v() };
    case 7:
      return { kind: v(), guardBandPpm: v() };
  }
  throw new Corrupt(`unknown key list ${i}`);
}

/** The key lists, for tests (each must read back in its order: test/api/point-pack2.test.ts). */
export const KEY_LISTS_2 = KEY_LISTS;

/** The result a format-2 text holds; undefined when the text is not that form after all (then
 * it is plain JSON that happens to begin like it). Throws on a text of the form that is damaged. */
export function unpackPointResult2(text: string): unknown {
  const parsed = JSON.parse(text) as Record<string, unknown>;
  const n = parsed.n;
  const structure = parsed.s;
  const list = parsed.t;
  if (parsed['~'] !== 2 || typeof n !== 'string' || typeof structure !== 'string' || !Array.isArray(list))
    return undefined;
  const budget = parsed.budget as { combinedHz?: unknown } | undefined;
  header = budget?.combinedHz;
  if (header === 'Infinity') header = Infinity;
  else if (header === '-Infinity') header = -Infinity;
  else if (header === 'NaN') header = NaN;
  const need = (n.length * 3) >> 2;
  if (need > readBytes.length) {
    readBytes = Buffer.from(new ArrayBuffer(Math.max(need, readBytes.length) * 2));
    readNumbers = new Float64Array(readBytes.buffer, 0, readBytes.length >> 3);
  }
  const bytes = readBytes.write(n, 0, 'base64');
  if (bytes % 8 !== 0) throw new Corrupt('numbers not whole');
  if (!HOST_LITTLE_ENDIAN) readBytes.subarray(0, bytes).swap64();
  nCount = bytes / 8;
  s = structure;
  t = list;
  pos = 0;
  ti = 0;
  ni = 0;
  const value = readValue();
  if (pos !== s.length || ti !== t.length || ni !== nCount) throw new Corrupt('left over');
  t = [];
  return value;
}
