// The one formatting module for quantities, checked against the rules it cites: JCGM 100:2008
// (GUM) 7.2.6 for rounding an uncertainty and its estimate, the SI Brochure 9th edition (BIPM
// 2019) for prefixes and the space between number and unit, and this product's own rules (no
// e-notation, no float noise, never a crash).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  SI_PREFIXES,
  decimal,
  formatHz,
  formatMeasured,
  formatPercent,
  formatPerKelvin,
  formatPpm,
  formatProbability,
  formatQuantity,
  machineNumber,
  machineValues,
  plain,
  significant,
} from '../../app/model/quantity-format';

const E_NOTATION = /\d[eE][+-]?\d/;
// Float noise: after the decimal marker, a run of six or more 9s then a last digit, or six or more
// 0s then a last non-zero digit, as 965.9499999999999 or 0.30000000000000004 print.
const FLOAT_NOISE = /\.\d*(?:9{6,}\d|[1-9]0{6,}[1-9])(?!\d)/;

describe('GUM 7.2.6: uncertainty to two significant digits, estimate to the same place', () => {
  it('y = 10.057 62 ohm with u_c = 27 milliohm is written 10.058 ohm (GUM 7.2.6 example)', () => {
    const m = formatMeasured(10.05762, 0.027, 'Ω');
    expect(m.value).toBe('10.058 Ω');
    expect(m.uncertainty).toBe('27 mΩ');
  });

  it('u = 28.05 kHz is rounded down to 28 kHz (GUM 7.2.6: common sense, nearest digit)', () => {
    expect(formatMeasured(9.3e9, 28.05e3, 'Hz').uncertainty).toBe('28 kHz');
  });

  it('10.47 milliohm is written with two digits (GUM 7.2.6 quotes it; rounded to nearest here: 10 mΩ)', () => {
    // GUM 7.2.6 says it "might be rounded up to 11 mΩ"; this product rounds to the nearest,
    // the choice GUM leaves to common sense (stated in the module's header).
    expect(formatMeasured(1, 0.01047, 'Ω').uncertainty).toBe('10 mΩ');
  });

  it('a frequency is rounded to the decimal place of its uncertainty, each with its own prefix', () => {
    expect(formatMeasured(9.300012345e9, 40123, 'Hz').text).toBe('9.300012 GHz ± 40 kHz');
    expect(formatMeasured(9.300012345e9, 4012, 'Hz').text).toBe('9.3000123 GHz ± 4.0 kHz');
  });
});

describe('SI Brochure 9th ed.: prefixes and spacing', () => {
  it('uses the prefixes of Table 7, with the 2022 additions (CGPM 2022 Resolution 3)', () => {
    const symbols = SI_PREFIXES.map((p) => p.symbol).join(' ');
    expect(symbols).toBe('Q R Y Z E P T G M k  m µ n p f a z y r q');
  });

  it('writes a space between number and unit (5.4.3), with the prefix joined to the unit', () => {
    expect(formatQuantity(1.03e5, 'Hz')).toBe('103 kHz');
    expect(formatQuantity(4e6, 'Hz')).toBe('4.00 MHz');
    expect(formatHz(9.3e9, { digits: 4 })).toBe('9.300 GHz');
    expect(formatPercent(0.9545, 2)).toBe('95.45 %');
  });

  it('a compound unit takes the prefix on its first symbol: -2.40 GHz·K', () => {
    expect(formatQuantity(-2.4e9, 'Hz·K')).toBe('-2.40 GHz·K');
  });

  it('never puts a prefix on a kelvin raised to a power (5.4.4): α in ppm/K', () => {
    // "µK⁻¹" would be (10⁻⁶ K)⁻¹ = 10⁶ K⁻¹, a million times too large for 1.5e-6 /K.
    expect(formatPerKelvin(1.5e-6)).toBe('1.50 ppm/K');
    expect(formatPerKelvin(17e-6)).toBe('17.0 ppm/K');
  });

  it('rounds before choosing the prefix: 999.96 kHz at 4 digits is 1.000 MHz', () => {
    expect(formatHz(999.96e3, { digits: 4 })).toBe('1.000 MHz');
    expect(formatHz(9.9996, { digits: 4 })).toBe('10.00 Hz');
  });
});

describe('no e-notation, no float noise, no crash (this product)', () => {
  it('prints 965.9499999999999 as 965.95 and 0.1 + 0.2 as 0.3', () => {
    expect(plain(965.9499999999999)).toBe('965.95');
    expect(plain(0.1 + 0.2)).toBe('0.3');
    expect(decimal(965.9499999999999, 3)).toBe('965.950');
  });

  it('a tiny positive frequency (1e-300 Hz) is written with a power of ten, not e-notation', () => {
    expect(formatHz(1e-300)).toBe('1.00 × 10⁻³⁰⁰ Hz');
    expect(formatHz(5e-324)).toBe('4.94 × 10⁻³²⁴ Hz');
    expect(formatHz(1e20)).toBe('1.00 × 10²⁰ Hz');
  });

  it('rounds the exact binary value to a decimal place, carrying where needed', () => {
    expect(decimal(0.05, 1)).toBe('0.1');
    expect(decimal(0.04, 1)).toBe('0.0');
    expect(decimal(12345, -2)).toBe('12300');
    expect(decimal(1e25, 0)).toBe('10000000000000000000000000');
    expect(decimal(-0.0001, 2)).toBe('0.00');
    expect(significant(9.96, 2)).toBe('10');
    expect(significant(0.0012345, 3)).toBe('0.00123');
  });

  it('signs: a plus on request, never a signed zero', () => {
    expect(formatPpm(12.345, 1, { signed: true })).toBe('+12.3 ppm');
    expect(formatPpm(-0.04, 1, { signed: true })).toBe('0.0 ppm');
    expect(formatPpm(-3, 1, { minus: '−' })).toBe('−3.0 ppm');
  });

  it('non-finite values are words, not a crash', () => {
    expect(formatHz(Number.NaN)).toBe('not a number Hz');
    expect(formatHz(Infinity)).toBe('∞ Hz');
  });

  it('for every finite double: no e-notation, no noise, and the text reads back near the value', () => {
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true }),
        fc.integer({ min: 1, max: 8 }),
        (x, digits) => {
          const q = formatHz(x, { digits });
          expect(q).not.toMatch(E_NOTATION);
          expect(q).not.toMatch(FLOAT_NOISE);
          const p = plain(x, digits);
          expect(p).not.toMatch(E_NOTATION);
          if (Math.abs(x) > 1e-300 && Math.abs(x) < 1e307) {
            expect(Math.abs(Number(p) - x)).toBeLessThanOrEqual(Math.abs(x) * 10 ** (1 - digits));
          }
        },
      ),
      { numRuns: 2000 },
    );
  });
});

describe('one wording for the probability of conformity (JCGM 106:2012 p_c)', () => {
  it('says "> 99.9 %" above 0.999 and "< 0.1 %" below 0.001, one decimal between', () => {
    expect(formatProbability(1)).toBe('> 99.9 %');
    expect(formatProbability(0.99995)).toBe('> 99.9 %');
    expect(formatProbability(0.999)).toBe('99.9 %');
    expect(formatProbability(0.9772)).toBe('97.7 %');
    expect(formatProbability(0.5)).toBe('50.0 %');
    expect(formatProbability(0.001)).toBe('0.1 %');
    expect(formatProbability(0)).toBe('< 0.1 %');
  });
});

describe('machine values for --json: SI units, 15 significant digits (DBL_DIG; docs/exchange.md)', () => {
  it('drops float noise and keeps the shape', () => {
    expect(machineNumber(0.1 + 0.2)).toBe(0.3);
    expect(machineNumber(1 / 3)).toBe(0.333333333333333);
    expect(machineNumber(1.0002672814523)).toBe(1.0002672814523);
    expect(machineNumber(9.300012345e9)).toBe(9300012345);
    expect(machineValues({ a: [0.30000000000000004, 'x'], b: null, c: { d: 965.9499999999999 } })).toEqual({
      a: [0.3, 'x'],
      b: null,
      c: { d: 965.95 },
    });
  });
});
