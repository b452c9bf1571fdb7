// Parsing and formatting of frequencies and dial readings (app/engine/quantity.ts).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { checkInBand, formatFrequency, parseDivisions, parseFrequencyHz } from '../../app/engine/quantity';

function hz(input: string | number): number {
  const r = parseFrequencyHz(input, 'f');
  if (!r.ok) throw new Error(r.message);
  return r.hz;
}

function message(input: string | number, field = 'points[0].reference'): string {
  const r = parseFrequencyHz(input, field);
  if (r.ok) throw new Error(`expected an error for ${String(input)}`);
  return r.message;
}

describe('parseFrequencyHz: accepted forms', () => {
  it.each([
    ['9.3 GHz', 9.3e9],
    ['9.3GHz', 9.3e9],
    ['9300 MHz', 9.3e9],
    ['9.3e9 Hz', 9.3e9],
    ['9.3E9 hz', 9.3e9],
    ['12.5 kHz', 12.5e3],
    ['0.11 THz', 0.11e12],
    ['  110 GHz  ', 110e9],
    ['.5 GHz', 0.5e9],
    ['9.3e9', 9.3e9],
    ['100000000', 1e8],
  ])('%s -> %d Hz', (input, expected) => {
    expect(hz(input)).toBeCloseTo(expected, 3);
  });

  it('reads unit letters case-insensitively; "mhz" is megahertz in this domain', () => {
    // Common practice: no one means millihertz on a 1 GHz to 110 GHz cavity meter.
    expect(hz('9300 mhz')).toBe(9.3e9);
    expect(hz('9300 MHZ')).toBe(9.3e9);
    expect(hz('9.3 ghz')).toBe(9.3e9);
  });

  it('accepts a JSON number as Hz when it is at least 1e8', () => {
    expect(hz(9.3e9)).toBe(9.3e9);
    expect(hz(1e8)).toBe(1e8);
  });
});

describe('parseFrequencyHz: refusals name the field, the value and what was expected', () => {
  it('a bare small number is ambiguous', () => {
    const m = message('9.3');
    expect(m).toContain('points[0].reference');
    expect(m).toContain('"9.3" has no unit: write 9.3 GHz or 9.3e9 Hz');
    expect(message(9.3)).toContain('has no unit: write 9.3 GHz or 9.3e9 Hz');
    expect(message(99999999)).toContain('has no unit');
  });

  it('a decimal comma is named', () => {
    expect(message('9,3 GHz')).toBe(
      'points[0].reference: "9,3 GHz" uses a decimal comma; expected a frequency such as "9.3 GHz"',
    );
  });

  it('thousands separators are refused', () => {
    expect(message('9,300 MHz')).toContain('thousands separator');
    expect(message('9,300,000,000')).toContain('thousands separator');
    expect(message('9 300 MHz')).toContain('separator');
    expect(message('9_300 MHz')).toContain('separator');
  });

  it.each(['NaN', 'Infinity', '-Infinity', 'inf GHz'])('%s is not finite', (input) => {
    expect(message(input)).toContain('is not a finite number');
  });

  it('non-finite JSON numbers are refused', () => {
    expect(message(Number.NaN)).toContain('NaN is not a finite number');
    expect(message(Number.POSITIVE_INFINITY)).toContain('not a finite number');
  });

  it('negative and zero are refused', () => {
    expect(message('-9.3 GHz')).toContain('"-9.3 GHz" is negative');
    expect(message(-9.3e9)).toContain('is negative');
    expect(message('0 Hz')).toContain('is zero');
  });

  it('empty and unknown units are refused', () => {
    expect(message('')).toBe('points[0].reference: "" is empty; expected a frequency such as "9.3 GHz"');
    expect(message('   ')).toContain('is empty');
    expect(message('9.3 GH')).toContain('unknown unit "gh"');
    expect(message('9.3 G')).toContain('unknown unit');
    expect(message('GHz')).toContain('is not a number with a unit');
    expect(message('9.3 GHz extra')).toContain('is not a number with a unit');
  });

  it('every refusal carries the field name (property)', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 12 }), (s) => {
        const r = parseFrequencyHz(s, 'field.x');
        return r.ok ? Number.isFinite(r.hz) && r.hz > 0 : r.message.startsWith('field.x: ');
      }),
    );
  });

  it('round-trips any positive frequency written with a unit (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e9, max: 1.1e11, noNaN: true }), (f) => {
        const r = parseFrequencyHz(`${f / 1e9} GHz`, 'f');
        return r.ok && Math.abs(r.hz - f) <= f * 1e-15;
      }),
    );
  });
});

describe('parseDivisions', () => {
  it('accepts numbers and "div"/"divisions"', () => {
    expect(parseDivisions(12.5, 'r')).toEqual({ ok: true, divisions: 12.5 });
    expect(parseDivisions('12.5', 'r')).toEqual({ ok: true, divisions: 12.5 });
    expect(parseDivisions('12.5 div', 'r')).toEqual({ ok: true, divisions: 12.5 });
    expect(parseDivisions('12.5 divisions', 'r')).toEqual({ ok: true, divisions: 12.5 });
  });

  it('refuses decimal commas, units, NaN and empty input with the field named', () => {
    const bad = (input: string | number) => {
      const r = parseDivisions(input, 'readings[2].value');
      if (r.ok) throw new Error('expected an error');
      return r.message;
    };
    expect(bad('12,5')).toContain('readings[2].value: "12,5" uses a decimal comma');
    expect(bad('12.5 GHz')).toContain('unknown unit "ghz"');
    expect(bad(Number.NaN)).toContain('not a finite number');
    expect(bad('')).toContain('is empty');
  });
});

describe('checkInBand and formatFrequency', () => {
  it('band ends are inside; outside names the band', () => {
    expect(checkInBand(8.2e9, 8.2e9, 12.4e9, 'f')).toBeNull();
    expect(checkInBand(12.4e9, 8.2e9, 12.4e9, 'f')).toBeNull();
    expect(checkInBand(13e9, 8.2e9, 12.4e9, 'points[1].reference')).toBe(
      "points[1].reference: 13.0000 GHz is outside the meter's band 8.20000 GHz to 12.4000 GHz",
    );
  });

  it('picks the unit and keeps the significant digits', () => {
    expect(formatFrequency(9.3e9, 4)).toBe('9.300 GHz');
    expect(formatFrequency(9.3e9)).toBe('9.300 GHz');
    expect(formatFrequency(110e9, 4)).toBe('110.0 GHz');
    expect(formatFrequency(999.96e6, 4)).toBe('1.000 GHz');
    expect(formatFrequency(12.5e3, 3)).toBe('12.5 kHz');
    expect(formatFrequency(1.2e12, 2)).toBe('1.2 THz');
    expect(formatFrequency(-2.5e6, 2)).toBe('-2.5 MHz');
    expect(formatFrequency(0, 3)).toBe('0.00 Hz');
  });

  it('a tiny positive frequency is written with a power of ten, never a crash (toFixed stops at 100 decimals)', () => {
    expect(formatFrequency(1e-300, 3)).toBe('1.00 × 10⁻³⁰⁰ Hz');
    expect(formatFrequency(Number.MIN_VALUE, 2)).toBe('4.9 × 10⁻³²⁴ Hz');
    expect(formatFrequency(0.002, 2)).toBe('0.0020 Hz');
  });

  it('its output parses back to the rounded value (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1, max: 1e12, noNaN: true }), (f) => {
        const r = parseFrequencyHz(formatFrequency(f, 6), 'f');
        if (!r.ok) return false;
        return Math.abs(r.hz - f) <= f * 1e-5;
      }),
    );
  });
});

describe('decimal prefixes are applied to the text, not by float multiplication', () => {
  it('gives the double nearest the written value', () => {
    // 8.2 * 1e9 === 8199999999.999999 in binary floating point; the parser must not do that.
    expect(parseFrequencyHz('8.2 GHz', 'f')).toEqual({ ok: true, hz: 8.2e9 });
    expect(parseFrequencyHz('12.4 GHz', 'f')).toEqual({ ok: true, hz: 12.4e9 });
    expect(parseFrequencyHz('9300.1 MHz', 'f')).toEqual({ ok: true, hz: 9300.1e6 });
    expect(parseFrequencyHz('9.3e-3 THz', 'f')).toEqual({ ok: true, hz: 9.3e9 });
    expect(parseFrequencyHz('0.0082e3 GHz', 'f')).toEqual({ ok: true, hz: 8.2e9 });
  });
});
