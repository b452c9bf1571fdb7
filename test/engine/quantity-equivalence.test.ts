// The frequency and divisions parsers (app/engine/quantity.ts), made faster for the bulk import
// (issue 8: the well-formed case tried first, messages put together only when there is one, plain
// hertz read without re-applying a prefix), against the parsers as they were before
// (test/fixtures/quantity-previous.ts): the same number, bit for bit, and the same refusal,
// word for word, on generated text of every kind people and files give.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseDivisions, parseFrequencyHz } from '../../app/engine/quantity';
import * as previous from '../fixtures/quantity-previous';

const blank = fc.constantFrom('', ' ', '  ', '\t', '\u00a0', '\u2009', '\u202f', '\ufeff');
const digits = fc.stringMatching(/^[0-9]{1,14}$/);
const separator = fc.constantFrom(',', ' ', '_', "'", '\u00a0', '\u2009', '.');
const mantissa = fc.oneof(
  { weight: 6, arbitrary: digits },
  { weight: 4, arbitrary: fc.tuple(digits, digits).map(([a, b]) => `${a}.${b}`) },
  { weight: 1, arbitrary: digits.map((d) => `.${d}`) },
  { weight: 1, arbitrary: digits.map((d) => `${d}.`) },
  // Digit groups and decimal commas: "9,300", "9 300", "9,3".
  { weight: 2, arbitrary: fc.tuple(digits, separator, digits).map(([a, s, b]) => `${a}${s}${b}`) },
  { weight: 1, arbitrary: fc.constantFrom('NaN', 'nan', 'Infinity', 'inf', '-Infinity', '0', '-0', '00') },
);
const exponent = fc.oneof(
  { weight: 6, arbitrary: fc.constant('') },
  {
    weight: 3,
    arbitrary: fc
      .tuple(fc.constantFrom('e', 'E'), fc.constantFrom('', '+', '-'), digits)
      .map(([e, s, d]) => `${e}${s}${d}`),
  },
  // An exponent too long for a double, on zero and on other mantissas.
  { weight: 1, arbitrary: fc.constantFrom('e400', 'e-400', `e${'9'.repeat(30)}`, `e${'1'.repeat(400)}`) },
);
const unit = fc.constantFrom(
  '',
  'Hz',
  'hz',
  'HZ',
  'kHz',
  'MHz',
  'mhz',
  'GHz',
  'ghz',
  'THz',
  'div',
  'divs',
  'division',
  'divisions',
  'x',
  'GHz2',
  'constructor',
  'toString',
  '__proto__',
);
const frequencyText = fc.oneof(
  {
    weight: 12,
    arbitrary: fc
      .tuple(
        blank,
        fc.constantFrom('', '+', '-'),
        mantissa,
        exponent,
        fc.constantFrom('', ' ', '  '),
        unit,
        blank,
      )
      .map((parts) => parts.join('')),
  },
  { weight: 2, arbitrary: fc.string({ maxLength: 16 }) },
  { weight: 1, arbitrary: fc.constantFrom('', ' ', 'Hz', '9.3 GHz', '39383500000 Hz', '1e8', '99999999') },
);
const frequencyInput = fc.oneof(
  { weight: 6, arbitrary: frequencyText },
  { weight: 1, arbitrary: fc.double() },
  { weight: 1, arbitrary: fc.constantFrom(0, -0, 1e8, 99999999, 9.3e9, Number.NaN, Infinity) },
);

describe('parseFrequencyHz and parseDivisions answer as before', () => {
  it('the same hertz (bit for bit) or the same refusal for any frequency text or number', () => {
    fc.assert(
      fc.property(frequencyInput, (input) => {
        const ours = parseFrequencyHz(input, 'points[2].readings[1].value');
        const theirs = previous.parseFrequencyHz(input, 'points[2].readings[1].value');
        expect(ours).toEqual(theirs);
        if (ours.ok && theirs.ok) expect(Object.is(ours.hz, theirs.hz)).toBe(true);
      }),
      { numRuns: 20000 },
    );
  });

  it('the same divisions or the same refusal for any dial text or number', () => {
    fc.assert(
      fc.property(frequencyInput, (input) => {
        const ours = parseDivisions(input, 'points[0].readings[3].value');
        const theirs = previous.parseDivisions(input, 'points[0].readings[3].value');
        expect(ours).toEqual(theirs);
        if (ours.ok && theirs.ok) expect(Object.is(ours.divisions, theirs.divisions)).toBe(true);
      }),
      { numRuns: 10000 },
    );
  });

  it('covers accepted values and each kind of refusal (the comparison means something)', () => {
    const kinds = new Set<string>();
    fc.assert(
      fc.property(frequencyInput, (input) => {
        const r = parseFrequencyHz(input, 'f');
        kinds.add(
          r.ok
            ? 'ok'
            : (/(is empty|not a finite|thousands separator|decimal comma|digit-group|not a number with a unit|is negative|is zero|no unit|unknown unit)/.exec(
                r.message,
              )?.[1] ?? 'other'),
        );
      }),
      { numRuns: 20000 },
    );
    expect([...kinds].sort()).toEqual(
      [
        'decimal comma',
        'digit-group',
        'is empty',
        'is negative',
        'is zero',
        'no unit',
        'not a finite',
        'not a number with a unit',
        'ok',
        'thousands separator',
        'unknown unit',
      ].sort(),
    );
  });

  it('reads the hertz an export writes as the same double as before, and refuses the same edges', () => {
    for (const text of [
      '39383500000 Hz',
      '8200000000 Hz',
      '1e10 Hz',
      '0e400 Hz',
      `0e${'1'.repeat(400)} Hz`,
    ]) {
      expect(parseFrequencyHz(text, 'f')).toEqual(previous.parseFrequencyHz(text, 'f'));
    }
    expect(parseFrequencyHz(`0e${'1'.repeat(400)} Hz`, 'f')).toEqual({
      ok: false,
      message: `f: "0e${'1'.repeat(400)} Hz" is not a finite number; expected a frequency such as "9.3 GHz"`,
    });
  });
});
