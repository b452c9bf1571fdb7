// Format 2 of the packed point result (app/api/point-pack2.ts) on its own: a fixed result packs
// to the same text it packed to when the format shipped (the tables are frozen); every key list
// reads back in its order; generated values (non-finite numbers and their strings, -0, small
// integers, repeated numbers, strings that look like the form's own codes, lone surrogates, odd
// shapes, null prototypes) read back as the JSON text of the same value reads, and SQLite reads
// budget.combinedHz out of both as the same text; what the form cannot hold is left to JSON; a
// damaged text is refused rather than misread. The demo lab and old lab files are in
// test/api/point-pack.test.ts.
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeStoredJson as decodeJson, encodeJson } from '../../db/codec/stored-json';
import { TEXT_FIELDS } from '../../app/model/json';
import { LOOK_ALIKES, textFieldsPlain } from '../fixtures/text-fields';
import { PACK_MARK, packPointResult } from '../../db/codec/point-pack';
import { KEY_LISTS_2, PACK_MARK_2, unpackPointResult2 } from '../../db/codec/point-pack2';
import { canonicalBytes } from '../../app/signing/keys';
import { openLabDb } from '../../db/store';

/** What the store writes for a value. */
const stored = (v: unknown): string => packPointResult(v) ?? encodeJson(v);

/** Same value, same key order, same types (NaN and Infinity included). */
function sameValue(a: unknown, b: unknown): void {
  expect(a).toStrictEqual(b);
  expect(encodeJson(a)).toBe(encodeJson(b));
}

const db = openLabDb(':memory:');
afterAll(() => db.close());
const combinedOf = db.prepare("SELECT ? -> '$.budget.combinedHz'").pluck();

// A point of the invented bench fleet (test/bench/fleet-data.ts), as the engine returned it.
const SAMPLE = decodeJson(
  '{"meanDial":14.7775,"indicatedHz":2817799999.9999995,"upMeanHz":2817600000,"downMeanHz":2818000000,"thermalCorrectionPpm":-15.765765029596146,"airCorrectionPpm":2.3258605985621017,"correctedHz":2817762128.933968,"errorHz":-237871.06603193283,"errorPpm":-84.41130803120399,"budget":{"contributions":[{"key":"reference","label":"Reference source (certificate)","unit":"Hz","sensitivity":-1,"type":"B","distribution":"normal","standardUncertainty":14.09,"dof":"Infinity","contributionHz":14.09},{"key":"repeatability","label":"Repeatability (pooled s = 0.00500 div, 4 readings)","type":"A","distribution":"t","unit":"div","standardUncertainty":0.0024999999999999467,"sensitivity":-79998924.80471203,"dof":2,"contributionHz":199997.3120117758},{"key":"resolution","label":"Dial resolution (0.01 div, half-width = resolution / 2)","unit":"div","sensitivity":-79998924.80471203,"type":"B","distribution":"rectangular","standardUncertainty":0.002886751345948129,"dof":"Infinity","contributionHz":230937.0038544056},{"key":"hysteresis","label":"Hysteresis between directions (half the difference of the means)","unit":"Hz","sensitivity":0.9999865600589,"type":"B","distribution":"rectangular","standardUncertainty":115470.05383792517,"dof":"Infinity","contributionHz":115468.50192720277},{"key":"setting","label":"Setting on the dip (0.05 of f/QL, QL = 2581)","unit":"Hz","sensitivity":0.9999865600589,"type":"B","distribution":"rectangular","standardUncertainty":31516.032323179526,"dof":"Infinity","contributionHz":31515.608749561397},{"key":"temperature","label":"Bench temperature (cavity expansion and air index)","type":"B","distribution":"normal","unit":"degC","standardUncertainty":0.3,"sensitivity":-60876.99662908154,"dof":"Infinity","contributionHz":18263.09898872446},{"key":"expansion","label":"Expansion coefficient of the cavity","type":"B","distribution":"normal","unit":"1/K","standardUncertainty":0.000001,"sensitivity":-2254174163.806669,"dof":"Infinity","contributionHz":2254.174163806669},{"key":"pressure","label":"Air pressure (air index)","type":"B","distribution":"normal","unit":"hPa","standardUncertainty":1,"sensitivity":-744.12263927451,"dof":"Infinity","contributionHz":744.12263927451},{"key":"humidity","label":"Relative humidity (air index)","type":"B","distribution":"normal","unit":"%RH","standardUncertainty":5,"sensitivity":-3002.762406627793,"dof":"Infinity","contributionHz":15013.812033138965}],"combinedHz":328970.55133853963,"effectiveDof":14.640686845266385,"coverageFactor":2.1952912869767047,"coverageProbability":0.9545,"expandedHz":722186.1850254188},"expandedPpm":256.276147986309,"decision":{"rule":{"kind":"guarded","multipleOfU":1},"verdict":"pass","acceptanceLimitHz":2095575.9439085498,"toleranceHz":2817762.1289339685,"guardBandHz":722186.1850254188,"probabilityOfConformity":0.9999999999999978,"tur":3.901711480170161},"notes":["test uncertainty ratio 3.90 is below 4"]}',
) as Record<string, unknown>;

// SAMPLE's format-2 text when format 2 shipped. If this changes, the tables or the writer
// changed: that is format 3 (a new mark, this reader kept), never an edit of format 2.
const SAMPLE_TEXT =
  '{"~":2,"budget":{"combinedHz":328970.55133853963},"n":"rkfhehSOLUD////nhv7kQQAAAEAl/uRBAAAAkOj+5EFkEp1aEogvwKAIL81cmwJAEeMdanT+5EEAwDuHeAkNwZym695SGlXArkfhehQuLEAAFK5H4XpkP24GODO/EpPBqAcAf+ppCEGLxuvT9KVnP5DR5AfIMAxBfI980OP/7z/+J4Xc4DD8QI7R5AfIMPxAvj2VEQLH3kBquMD15sbeQDMzMzMzM9M/76ti5J+57cCPzdRVxtXRQI3ttaD3xrA+PNB5+n7L4MGVm/8rWZyhQM7JTCr7QIfAzslMKvtAh0BAWSlahnWnwJCvs/DnUs1AB8suGwhILUDQEdbg9I8BQCUGgZVDi+4/1aa7XhQKJkHboCYaawRwQKD9o/HX+T9BheiAEHF/RUHs///////vP5oRLoK0Ng9A","s":":.........;[>AdP#LM.^!<BvKOQ..2.>CwQ%LN.^.>DfP.LN.^.>ExP&LN.^.<FgLMR..^.<GhLMS..^.<HiLMT1.^.<IjLMU5.^.]=.....@|a1V..\'..[z]","t":["0.00500 div, 4","0.01 div","0.05 of f/QL, QL = 2581","3.90"]}';

describe('format 2, fixed', () => {
  it('packs a result to the text it packed to when the format shipped, and reads it back', () => {
    expect(PACK_MARK).toBe(PACK_MARK_2);
    expect(packPointResult(SAMPLE)).toBe(SAMPLE_TEXT);
    const json = encodeJson(SAMPLE);
    sameValue(decodeJson(SAMPLE_TEXT), decodeJson(json));
    expect(canonicalBytes(decodeJson(SAMPLE_TEXT)).equals(canonicalBytes(decodeJson(json)))).toBe(true);
    expect(combinedOf.get(SAMPLE_TEXT)).toBe('328970.55133853963');
    // The size that was the point of it (format 1: 1,552 characters, JSON: 2,829).
    expect(SAMPLE_TEXT.length).toBeLessThan(0.45 * json.length);
  });

  it('reads every key list back in its order, without spelling its keys', () => {
    KEY_LISTS_2.forEach((keys, i) => {
      const o = Object.fromEntries(keys.map((k, j) => [k, i * 100 + j + 0.5]));
      const text = stored(o);
      expect(text.startsWith(PACK_MARK_2)).toBe(true);
      expect((JSON.parse(text) as { t: unknown }).t).toEqual([]);
      const back = decodeJson(text) as Record<string, unknown>;
      expect(Object.keys(back)).toEqual(keys);
      sameValue(back, o);
    });
  });

  it('reads -0 as 0, non-finite numbers and their strings in number fields as numbers, as the JSON text does', () => {
    const budget = SAMPLE.budget as Record<string, unknown>;
    for (const combinedHz of [-0, NaN, Infinity, -Infinity, 0, 7, 0.1, 1e21, 5e-324]) {
      const v = {
        ...SAMPLE,
        meanDial: -0,
        upMeanHz: 'Infinity',
        downMeanHz: '-Infinity',
        // Text near the look-alikes stays text; the exact look-alikes in a text field are below.
        notes: ['NaN ', 'Infinity ', 'nan', '-infinity'],
        budget: { ...budget, combinedHz },
      };
      const text = stored(v);
      expect(text.startsWith(PACK_MARK_2)).toBe(true);
      const back = decodeJson(text) as typeof v;
      sameValue(back, decodeJson(encodeJson(v)));
      expect(Object.is(back.meanDial, 0)).toBe(true);
      expect(back.upMeanHz).toBe(Infinity);
      expect(back.downMeanHz).toBe(-Infinity);
      expect(back.budget.combinedHz).toBe(Object.is(combinedHz, -0) ? 0 : combinedHz);
      expect(back.notes).toStrictEqual(['NaN ', 'Infinity ', 'nan', '-infinity']);
      expect(combinedOf.get(text)).toBe(combinedOf.get(encodeJson(v)));
    }
  });

  it('on the JSON path, a text field keeps a look-alike string as text; a number field reads it as the number', () => {
    for (const field of TEXT_FIELDS) {
      for (const s of LOOK_ALIKES) {
        const v = { [field]: s, listed: { [field]: [s, 'x'] }, errorHz: s, nested: [{ combinedHz: s }] };
        const back = decodeJson(encodeJson(v)) as Record<string, unknown>;
        const n = s === 'Infinity' ? Infinity : s === '-Infinity' ? -Infinity : NaN;
        sameValue(back, {
          [field]: s,
          listed: { [field]: [s, 'x'] },
          errorHz: n,
          nested: [{ combinedHz: n }],
        });
      }
    }
  });
});

describe('format 2 on any value', () => {
  const codeLike = fc.constantFrom(
    ...['$', '.', '=', '[', ']', '{', '}', '^', '`', '?', '_', '+', '-', '#', '!', "'", ':', '<', '|', '~'],
    ...[
      'A',
      'B',
      'Hz',
      'v',
      'z',
      'o',
      'Infinity',
      '-Infinity',
      'NaN',
      'infinity',
      ' NaN',
      '{"~":2,',
      '{"~":1,',
    ],
    ...['~0', '~~x', '~1|a', '"', '\\', '\u0000', '\ud800', 'a\udfffb', '\u2028', 'é', '__proto__', 'toJSON'],
    'Reference source (certificate)',
    'Setting on the dip (',
    'Setting on the dip ()',
    'Dial resolution (, half-width = resolution / 2)',
    'Repeatability (pooled s = 1 Hz, 4 readings)',
    'test uncertainty ratio  is below 4',
    'test uncertainty ratio Infinity is below 4',
  );
  // Numbers met in results (so values repeat, as a budget's do) and the edges of the short codes.
  const POOL = [328970.55133853963, 0.9999865600589, 14.09, -79998924.80471203, 0.9545, 2.5];
  const number = fc.oneof(
    fc.double(),
    fc.constantFrom(-0, 0, -1, 9, 10, -2, 2 ** 31 - 1, -(2 ** 31), 2 ** 31, 1e21, 5e-324, Number.MAX_VALUE),
    fc.constantFrom(Infinity, -Infinity, NaN),
    fc.integer(),
    fc.constantFrom(...POOL),
  );
  const string = fc.oneof(
    fc.string(),
    fc.string({ unit: 'binary' }),
    fc.string({ unit: 'binary-ascii' }),
    codeLike,
  );
  const leaf = fc.oneof(number, number, string, fc.boolean(), fc.constant(null));
  const key = fc.oneof(
    fc.string(),
    codeLike.filter((k) => k !== '__proto__'),
    fc.constantFrom(
      'kind',
      'multipleOfU',
      'key',
      'label',
      'contributions',
      'combinedHz',
      'budget',
      '1',
      '10',
      '',
    ),
  );
  const { value } = fc.letrec((tie) => ({
    value: fc.oneof(
      { depthSize: 'small', withCrossShrink: true },
      leaf,
      fc.array(tie('value'), { maxLength: 4 }),
      fc.dictionary(key, tie('value'), { maxKeys: 4 }),
      fc
        .constantFrom(...KEY_LISTS_2)
        .chain((keys) =>
          fc
            .tuple(...keys.map(() => tie('value')))
            .map((vs) => Object.fromEntries(keys.map((k, i) => [k, vs[i]]))),
        ),
    ),
  }));
  const line = fc.oneof(
    fc
      .constantFrom(...KEY_LISTS_2.slice(2, 4))
      .chain((keys) =>
        fc.tuple(...keys.map(() => leaf)).map((vs) => Object.fromEntries(keys.map((k, i) => [k, vs[i]]))),
      ),
    value,
  );
  const rule = fc.oneof(
    fc.record({ kind: fc.constantFrom('simple', 'non-binary', 'other') }),
    fc.record({ kind: fc.constantFrom('guarded', 'x'), multipleOfU: number }),
    fc.record({ kind: leaf, guardBandPpm: number }),
    value,
  );
  const base = SAMPLE;
  const result = fc
    .record({
      lines: fc.array(line, { maxLength: 10 }),
      top: leaf,
      combinedHz: fc.oneof(number, number, number, leaf),
      rule,
      notes: fc.array(leaf, { maxLength: 3 }),
      odd: fc.constantFrom(
        'none',
        'none',
        'none',
        'extra key',
        'budget dropped',
        'budget as array',
        'whole value',
      ),
      whole: value,
    })
    .map(({ lines, top, combinedHz, rule, notes, odd, whole }) => {
      const budget = { ...(base.budget as object), contributions: lines, combinedHz };
      const decision = { ...(base.decision as object), rule };
      const r: Record<string, unknown> = { ...base, meanDial: top, budget, decision, notes };
      if (odd === 'extra key') r.extra = whole;
      if (odd === 'budget dropped') delete r.budget;
      if (odd === 'budget as array') r.budget = [budget];
      if (odd === 'whole value') return { budget: whole, ...(whole as object) };
      return r;
    });

  it('reads back as the JSON text of the same value reads; SQLite reads the same combinedHz', () => {
    let packed = 0;
    fc.assert(
      fc.property(
        result.map((r) => textFieldsPlain(r)),
        (v) => {
          const text = stored(v);
          const json = encodeJson(v);
          if (text.startsWith(PACK_MARK_2)) packed++;
          sameValue(decodeJson(text), decodeJson(json));
          expect(combinedOf.get(text)).toBe(combinedOf.get(json));
        },
      ),
      { numRuns: 3000 },
    );
    expect(packed).toBeGreaterThan(2000);
  }, 120_000);

  it('reads back any plain value at all as JSON would (one value after another)', () => {
    fc.assert(
      fc.property(
        fc.array(
          fc.dictionary(key, value, { maxKeys: 6 }).map((d) => textFieldsPlain(d)),
          { minLength: 1, maxLength: 3 },
        ),
        (vs) => {
          const texts = vs.map(stored);
          texts.forEach((text, i) => sameValue(decodeJson(text), decodeJson(encodeJson(vs[i]))));
        },
      ),
      { numRuns: 1000 },
    );
  });
});

describe('format 2, refusals', () => {
  const budget = SAMPLE.budget as Record<string, unknown>;
  class Custom {
    kind = 'simple';
  }

  it('leaves to JSON what it cannot hold exactly', () => {
    const unpackable: unknown[] = [
      { ...SAMPLE, meanDial: undefined },
      { ...SAMPLE, notes: [undefined] },
      { ...SAMPLE, notes: [1, , 2] }, // eslint-disable-line no-sparse-arrays
      { ...SAMPLE, notes: [() => 1] },
      { ...SAMPLE, notes: [Symbol('s')] },
      { ...SAMPLE, notes: [new Date(0)] },
      { ...SAMPLE, notes: [new Number(1)] },
      { ...SAMPLE, notes: [new Map()] },
      { ...SAMPLE, notes: [new Float64Array(2)] },
      { ...SAMPLE, decision: { ...(SAMPLE.decision as object), rule: new Custom() } },
      { ...SAMPLE, notes: [JSON.parse('{"__proto__": 1}')] },
      { ...SAMPLE, budget: { ...budget, combinedHz: '1' } },
      { ...SAMPLE, budget: { ...budget, combinedHz: null } },
      new Custom(),
      [SAMPLE],
      null,
      3,
    ];
    for (const v of unpackable) expect(packPointResult(v)).toBeUndefined();
    // Still stored (as JSON), and read as before.
    sameValue(decodeJson(stored(unpackable[0])), decodeJson(encodeJson(unpackable[0])));
  });

  it('refuses a damaged text rather than misread it, and reads plain JSON that only looks like it', () => {
    const parts = JSON.parse(SAMPLE_TEXT) as { n: string; s: string; t: string[] };
    const withParts = (p: Partial<typeof parts>) =>
      `${PACK_MARK_2}${JSON.stringify({ ...parts, ...p }).slice(1)}`;
    expect(decodeJson(withParts({}))).toStrictEqual(decodeJson(SAMPLE_TEXT));
    expect(() => decodeJson(withParts({ s: parts.s.replace('A', 'o') }))).toThrow(/unknown code o/);
    expect(() => decodeJson(withParts({ s: parts.s.slice(0, -1) }))).toThrow(/ends early/);
    expect(() => decodeJson(withParts({ s: `${parts.s}_` }))).toThrow(/left over/);
    expect(() => decodeJson(withParts({ n: parts.n.slice(0, -12) }))).toThrow(
      /numbers not whole|missing number/,
    );
    expect(() => decodeJson(withParts({ t: parts.t.slice(1) }))).toThrow(/left over|missing string/);
    expect(() => decodeJson(withParts({ t: [...parts.t, 'x'] }))).toThrow(/left over/);
    expect(() => decodeJson(withParts({ s: `{${parts.s}` }))).toThrow(/format 2/);
    expect(() => decodeJson(`${PACK_MARK_2}"n":"","s":"=","t":[]}`)).toThrow(/no combinedHz/);
    expect(() => decodeJson(`${PACK_MARK_2}"n":"","s":"!","t":[]}`)).toThrow(/before the first/);
    expect(() => decodeJson(`${PACK_MARK_2}"n":"","s":"{}","t":[]}`)).not.toThrow();
    expect(() => decodeJson(`${PACK_MARK_2}"n":"","s":"{.}","t":["__proto__"]}`)).toThrow(/__proto__/);
    // Plain JSON that begins like the form but is not it reads as plain JSON.
    sameValue(decodeJson('{"~":2,"a":"Infinity"}'), { '~': 2, a: Infinity });
    expect(unpackPointResult2('{"~":2,"n":1,"s":"","t":[]}')).toBeUndefined();
  });
});
