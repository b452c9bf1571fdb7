// RFC 8785 canonicalisation (app/signing/canonical-json.ts) against the RFC's own examples
// (test/data/rfc8785/, source in its README) and, byte for byte, against the canonical texts
// the earlier implementation (the npm package canonicalize 5.1.0) made of the demo lab's records
// (test/fixtures/canonical-json/, provenance in its README).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CanonicalJsonError, canonicalJson, canonicalJsonBytes } from '../../app/signing/canonical-json';

const RFC = new URL('../data/rfc8785/', import.meta.url);
const rfcText = (name: string): string => readFileSync(new URL(name, RFC), 'utf8');

/** The double whose IEEE 754 bits are `hex` (big-endian). */
function doubleOf(hex: string): number {
  const view = new DataView(new ArrayBuffer(8));
  view.setBigUint64(0, BigInt(`0x${hex}`));
  return view.getFloat64(0);
}

describe('RFC 8785 Appendix B: number serialization samples', () => {
  const rows = rfcText('numbers.txt')
    .split('\n')
    .filter((l) => l.trim() && !l.startsWith('#'))
    .map((l) => {
      const [bits, ...rest] = l.trim().split(/\s+/);
      return { bits: bits as string, expected: rest.join(' ') };
    });

  it('holds the 26 rows of the appendix', () => {
    expect(rows).toHaveLength(26);
  });

  for (const { bits, expected } of rows) {
    if (expected.startsWith('(refused')) {
      it(`refuses 0x${bits} ${expected.slice(10, -1)}`, () => {
        expect(() => canonicalJson(doubleOf(bits))).toThrow(CanonicalJsonError);
        expect(() => canonicalJson({ value: doubleOf(bits) })).toThrow(/at value/);
      });
    } else {
      it(`writes 0x${bits} as ${expected}`, () => {
        expect(canonicalJson(doubleOf(bits))).toBe(expected);
        expect(canonicalJson([doubleOf(bits)])).toBe(`[${expected}]`);
      });
    }
  }
});

describe('RFC 8785 sections 3.2.2 to 3.2.4: the sample object', () => {
  const input: unknown = JSON.parse(rfcText('sample-input.json'));
  const expectedBytes = Buffer.from(rfcText('sample-output-utf8.hex').replace(/\s+/g, ''), 'hex');

  it('gives the UTF-8 bytes listed in section 3.2.4', () => {
    expect(expectedBytes.length).toBe(118);
    expect(Buffer.from(canonicalJsonBytes(input)).equals(expectedBytes)).toBe(true);
  });

  it('gives the text shown in section 3.2.2 (sorted members, shortest numbers, minimal escapes)', () => {
    expect(canonicalJson(input)).toBe(
      '{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],' +
        '"string":"\u20ac$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}',
    );
  });

  it('is a fixed point: canonicalising the canonical text again changes nothing', () => {
    const once = canonicalJson(input);
    expect(canonicalJson(JSON.parse(once))).toBe(once);
  });
});

describe('RFC 8785 section 3.2.3: sorting of property names by UTF-16 code units', () => {
  it('puts the names in the order the RFC gives', () => {
    const input = JSON.parse(rfcText('sorting-input.json')) as Record<string, string>;
    const order = rfcText('sorting-order.txt')
      .split('\n')
      .filter((l) => l.trim() && !l.startsWith('#'));
    // Read the order off the text: a parsed object would put the integer-like name "1" first.
    const values = [...canonicalJson(input).matchAll(/:"([^"]*)"/g)].map((m) => m[1]);
    expect(values).toEqual(order);
    // A surrogate pair (U+1F600) sorts by its high surrogate 0xD83D, before U+FB33.
    expect(canonicalJson({ '\ufb33': 1, '\u{1f600}': 2 })).toBe('{"\u{1f600}":2,"\ufb33":1}');
  });

  it('sorts nested objects and keeps array order', () => {
    expect(canonicalJson({ b: [3, { d: 1, c: 2 }, 1], a: { z: null, y: true } })).toBe(
      '{"a":{"y":true,"z":null},"b":[3,{"c":2,"d":1},1]}',
    );
  });
});

describe('values outside the JSON data model are refused, naming where (RFC 8785 section 3.1)', () => {
  const cases: [string, unknown, RegExp][] = [
    ['NaN', { a: [1, Number.NaN] }, /NaN at a\[1\]/],
    ['an infinity', { a: { b: -Infinity } }, /-Infinity at a\.b/],
    ['a lone high surrogate', { s: 'x\ud800' }, /lone surrogate at s/],
    ['a lone low surrogate', ['\udc00y'], /lone surrogate at \[0\]/],
    ['a lone surrogate in a name', { '\ud800': 1 }, /lone surrogate/],
    ['undefined', { u: undefined }, /type undefined \(not a JSON value\) at u/],
    ['a function', [() => 1], /type function/],
    ['a bigint', 1n, /type bigint \(not a JSON value\) at the top level/],
    ['a Date', { at: new Date(0) }, /not plain JSON .* at at/],
  ];
  for (const [what, value, message] of cases) {
    it(`refuses ${what}`, () => {
      expect(() => canonicalJson(value)).toThrow(message);
    });
  }

  it('refuses a cycle, and accepts the same object met twice side by side', () => {
    const shared = { x: 1 };
    expect(canonicalJson({ a: shared, b: shared })).toBe('{"a":{"x":1},"b":{"x":1}}');
    const loop: Record<string, unknown> = {};
    loop.self = loop;
    expect(() => canonicalJson(loop)).toThrow(/circular reference at self/);
  });

  it('writes -0 as 0 and keeps a key named __proto__ as a plain member', () => {
    expect(canonicalJson([-0, 0])).toBe('[0,0]');
    expect(canonicalJson(JSON.parse('{"__proto__":{"a":1},"b":2}'))).toBe('{"__proto__":{"a":1},"b":2}');
  });
});

describe('the same bytes as the earlier implementation on the demo lab', () => {
  // Canonical texts made by canonicalize 5.1.0 of one check revision per meter, every person,
  // meter and standard of sample-lab/bundle.json, and the lab settings.
  const lines = readFileSync(new URL('../fixtures/canonical-json/demo-lab.jsonl', import.meta.url), 'utf8')
    .split('\n')
    .filter((l) => l);

  /** The same value with every object's members in reverse order, so sorting is exercised. */
  function reversed(v: unknown): unknown {
    if (Array.isArray(v)) return v.map(reversed);
    if (v === null || typeof v !== 'object') return v;
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(v).reverse()) out[k] = reversed((v as Record<string, unknown>)[k]);
    return out;
  }

  it('holds 30 records, 11 of them check revisions with their points', () => {
    expect(lines).toHaveLength(30);
    expect(lines.filter((l) => l.includes('"effectiveRevision"'))).toHaveLength(11);
  });

  it('rebuilds every one byte for byte from its members in another order', () => {
    for (const line of lines) {
      const value = reversed(JSON.parse(line));
      expect(JSON.stringify(value)).not.toBe(line);
      expect(canonicalJson(value)).toBe(line);
    }
  });
});
