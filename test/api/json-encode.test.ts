// encodeJson (app/api/json.ts) replaces non-finite numbers in a copy and calls JSON.stringify
// without a replacer, for speed on bulk imports. It must give exactly the text the replacer form
// gave (non-finite numbers as "Infinity", "-Infinity", "NaN"), so stored results stay byte for byte
// what earlier versions wrote: checked here against that replacer form on generated values.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decodeStoredJson as decodeJson, encodeJson } from '../../db/codec/stored-json';

/** The earlier encoder, kept as the reference. */
function replacerForm(value: unknown, space?: number): string {
  return JSON.stringify(
    value,
    (_key, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v),
    space,
  );
}

const leaf = fc.oneof(
  fc.double(),
  fc.constantFrom(Infinity, -Infinity, NaN, -0, 0, 1e-300),
  fc.integer(),
  fc.string(),
  fc.boolean(),
  fc.constant(null),
  fc.constant(undefined),
  fc.date({ noInvalidDate: true }),
);
const key = fc.oneof(fc.string(), fc.constantFrom('__proto__', 'toJSON', 'constructor', '0', ''));
const value = fc.letrec((tie) => ({
  node: fc.oneof({ depthSize: 'small' }, leaf, tie('array'), tie('object')),
  array: fc.array(tie('node'), { maxLength: 5 }),
  object: fc.dictionary(key, tie('node'), { maxKeys: 5 }),
})).node;

describe('encodeJson', () => {
  it('gives the text the replacer form gives, for any JSON-like value', () => {
    fc.assert(
      fc.property(value, fc.constantFrom(undefined, 2), (v, space) => {
        expect(encodeJson(v, space)).toBe(replacerForm(v, space));
      }),
    );
  });

  it('keeps infinite degrees of freedom through a round trip', () => {
    const budget = { dof: Infinity, lines: [{ u: 1.5, dof: -Infinity }, { u: NaN }], k: 2 };
    const text = encodeJson(budget);
    expect(text).toBe('{"dof":"Infinity","lines":[{"u":1.5,"dof":"-Infinity"},{"u":"NaN"}],"k":2}');
    expect(decodeJson(text)).toEqual(budget);
  });

  it('treats an own "__proto__" key, toJSON, holes and boxed numbers as JSON.stringify does', () => {
    const own = JSON.parse('{"__proto__":{"x":1},"y":2}') as unknown;
    // eslint-disable-next-line no-sparse-arrays
    const odd = [own, new Date(0), [1, , 3], Object(Infinity) as unknown, { toJSON: () => Infinity }];
    expect(encodeJson(odd)).toBe(replacerForm(odd));
    expect(encodeJson(odd)).toBe(
      '[{"__proto__":{"x":1},"y":2},"1970-01-01T00:00:00.000Z",[1,null,3],null,"Infinity"]',
    );
  });
});
