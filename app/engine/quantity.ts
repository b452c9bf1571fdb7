// Frequency and dial-reading input: parse what people type ("9.3 GHz", "9300 MHz", "9.3e9"),
// refuse what is ambiguous, and format frequencies back for people.
// Source: The International System of Units (SI Brochure), 9th edition, BIPM 2019, chapter 5 (unit
// symbols and prefixes; decimal marker and digit grouping, 5.4.4; clause numbers from memory).
// The SI allows '.' or ',' as decimal marker; this product takes only '.', because "9,300" could be
// 9.3 or 9300 and a wrong guess is a wrong frequency. The bare-number rule is this product's
// (DESIGN.md section 5).

export type FrequencyParse = { ok: true; hz: number } | { ok: false; message: string };
export type DivisionsParse = { ok: true; divisions: number } | { ok: false; message: string };

// Keys are lower-case because units are matched case-insensitively. In this domain "mhz" always
// means megahertz: a millihertz is meaningless for a cavity meter between 1 GHz and 110 GHz, and
// people type "9300 mhz" or "9300 MHZ" meaning MHz. The same holds for "ghz", "khz", "thz".
// Values are powers of ten: the prefix is applied to the decimal text, not by multiplying a
// binary float, so "8.2 GHz" is exactly the double nearest 8.2e9 (8.2 * 1e9 is not).
const FREQUENCY_UNITS: Readonly<Record<string, number>> = {
  hz: 0,
  khz: 3,
  mhz: 6,
  ghz: 9,
  thz: 12,
};

/** A bare number (no unit) is taken as hertz only from here up: below it "9.3" could be GHz. */
export const BARE_NUMBER_MIN_HZ = 1e8;

const EXPECTED = 'expected a frequency such as "9.3 GHz"';

// One decimal number with '.' as the decimal marker and an optional exponent, then a unit word.
const NUMBER_AND_UNIT = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:e[+-]?\d+)?)\s*([a-z]*)$/i;
// "1,234" or "12,345,678.9": groups of three after a comma read as thousands separators.
const THOUSANDS_GROUPED = /^[+-]?\d{1,3}(?:,\d{3})+(?:\.\d*)?\s*[a-z]*$/i;
// "9,3 GHz": a comma used as the decimal marker.
const DECIMAL_COMMA = /^[+-]?\d*,\d+\s*[a-z]*$/i;

function quote(value: unknown): string {
  return typeof value === 'string' ? JSON.stringify(value) : String(value);
}

/** Shared checks of a string holding one number; returns a message or the number and unit word.
 * The well-formed case is tried first and needs none of the refusal patterns: none of them can
 * match a text NUMBER_AND_UNIT matches (they need a comma, a letter first, or a digit after a
 * blank), so the order of the refusals below is still the order they are reported in. A bulk
 * import parses some 50 frequencies per check (issue 8). */
function splitNumber(
  raw: string,
  field: string,
  expected: string,
): { ok: true; value: number; text: string; unit: string } | { ok: false; message: string } {
  const text = raw.trim();
  const match = NUMBER_AND_UNIT.exec(text);
  if (match) {
    const value = Number(match[1]);
    if (!Number.isFinite(value)) {
      return { ok: false, message: `${field}: ${quote(raw)} is not a finite number; ${expected}` };
    }
    return { ok: true, value, text: match[1] ?? '', unit: (match[2] ?? '').toLowerCase() };
  }
  const shown = quote(raw);
  if (text === '') return { ok: false, message: `${field}: ${shown} is empty; ${expected}` };
  if (/^[+-]?(nan|inf(inity)?)\b/i.test(text)) {
    return { ok: false, message: `${field}: ${shown} is not a finite number; ${expected}` };
  }
  if (THOUSANDS_GROUPED.test(text)) {
    return {
      ok: false,
      message: `${field}: ${shown} uses a comma as a thousands separator (or a decimal comma); write the digits without separators and '.' for decimals; ${expected}`,
    };
  }
  if (DECIMAL_COMMA.test(text)) {
    return { ok: false, message: `${field}: ${shown} uses a decimal comma; ${expected}` };
  }
  if (/\d[\s_'\u00a0\u2009\u202f]\d/.test(text)) {
    return {
      ok: false,
      message: `${field}: ${shown} has a digit-group separator (space, underscore or apostrophe); write the digits without separators; ${expected}`,
    };
  }
  return { ok: false, message: `${field}: ${shown} is not a number with a unit; ${expected}` };
}

// The input is quoted for a message only when there is one: on every accepted value it was
// half the time of a parse.
function checkPositiveHz(hz: number, input: unknown, field: string): FrequencyParse {
  if (!Number.isFinite(hz))
    return { ok: false, message: `${field}: ${quote(input)} is not a finite number; ${EXPECTED}` };
  if (hz < 0) return { ok: false, message: `${field}: ${quote(input)} is negative; ${EXPECTED}` };
  if (hz === 0) return { ok: false, message: `${field}: ${quote(input)} is zero; ${EXPECTED}` };
  return { ok: true, hz };
}

function bareNumber(value: number, input: unknown, field: string): FrequencyParse {
  const checked = checkPositiveHz(value, input, field);
  if (!checked.ok) return checked;
  if (value < BARE_NUMBER_MIN_HZ) {
    const example = String(value);
    return {
      ok: false,
      message: `${field}: ${quote(input)} has no unit: write ${example} GHz or ${example}e9 Hz (a number without a unit is read as Hz only from 1e8 up)`,
    };
  }
  return checked;
}

/**
 * Parses a frequency. Accepts a unit of Hz, kHz, MHz, GHz or THz (any letter case), with or
 * without a space; a bare number is taken as Hz only when it is at least 1e8 (clearly hertz at
 * these frequencies). Refuses decimal commas, digit grouping, NaN, infinities, zero and negatives.
 */
export function parseFrequencyHz(input: string | number, field: string): FrequencyParse {
  if (typeof input === 'number') return bareNumber(input, input, field);
  if (typeof input !== 'string') {
    return { ok: false, message: `${field}: ${quote(input)} is not a number or a string; ${EXPECTED}` };
  }
  const split = splitNumber(input, field, EXPECTED);
  if (!split.ok) return split;
  if (split.unit === '') return bareNumber(split.value, input, field);
  const power = FREQUENCY_UNITS[split.unit];
  if (power === undefined) {
    return {
      ok: false,
      message: `${field}: ${quote(input)} has an unknown unit "${split.unit}"; use Hz, kHz, MHz, GHz or THz; ${EXPECTED}`,
    };
  }
  // Plain decimal hertz (what an export writes): the prefix adds nothing to apply.
  if (power === 0 && !/e/i.test(split.text)) return checkPositiveHz(split.value, input, field);
  const [mantissa = '', exponent = '0'] = split.text.toLowerCase().split('e');
  return checkPositiveHz(Number(`${mantissa}e${Number(exponent) + power}`), input, field);
}

const DIVISION_UNITS = new Set(['', 'div', 'divs', 'division', 'divisions']);
const EXPECTED_DIVISIONS = 'expected a dial reading in divisions such as "12.5" or "12.5 div"';

/** Parses a divisions reading: a finite number, optionally followed by "div" or "divisions". */
export function parseDivisions(input: string | number, field: string): DivisionsParse {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) {
      return {
        ok: false,
        message: `${field}: ${quote(input)} is not a finite number; ${EXPECTED_DIVISIONS}`,
      };
    }
    return { ok: true, divisions: input };
  }
  if (typeof input !== 'string') {
    return {
      ok: false,
      message: `${field}: ${quote(input)} is not a number or a string; ${EXPECTED_DIVISIONS}`,
    };
  }
  const split = splitNumber(input, field, EXPECTED_DIVISIONS);
  if (!split.ok) return split;
  if (!DIVISION_UNITS.has(split.unit)) {
    return {
      ok: false,
      message: `${field}: ${quote(input)} has an unknown unit "${split.unit}"; ${EXPECTED_DIVISIONS}`,
    };
  }
  return { ok: true, divisions: split.value };
}

/** A message when the frequency lies outside the band [minHz, maxHz] (ends included), else null. */
export function checkInBand(hz: number, minHz: number, maxHz: number, field: string): string | null {
  if (!Number.isFinite(hz)) return `${field}: ${quote(hz)} is not a finite frequency`;
  if (hz < minHz || hz > maxHz) {
    return `${field}: ${formatFrequency(hz, 6)} is outside the meter's band ${formatFrequency(minHz, 6)} to ${formatFrequency(maxHz, 6)}`;
  }
  return null;
}

const FORMAT_UNITS: ReadonlyArray<[number, string]> = [
  [1e12, 'THz'],
  [1e9, 'GHz'],
  [1e6, 'MHz'],
  [1e3, 'kHz'],
  [1, 'Hz'],
];

/**
 * Formats a frequency with `significantDigits` significant digits in the largest unit that keeps
 * the number at or above 1, e.g. 9.3e9 with 4 digits -> "9.300 GHz" (trailing zeros kept: they
 * state the resolution).
 */
export function formatFrequency(hz: number, significantDigits = 4): string {
  if (!Number.isFinite(hz)) return `${String(hz)} Hz`;
  const digits = Math.min(Math.max(Math.round(significantDigits), 1), 15);
  if (hz === 0) return `${(0).toFixed(digits - 1)} Hz`;
  const sign = hz < 0 ? '-' : '';
  // Round first in Hz so that 999.96 MHz at 4 digits moves up to "1.000 GHz".
  const rounded = Number(Math.abs(hz).toPrecision(digits));
  if (rounded < 1e-3) {
    // Far below anything a meter resolves: a power of ten, not more than 100 decimals (toFixed's
    // limit) and not e-notation. The shared formatting of quantities is app/model/quantity-format.
    const [mantissa = '', exponent = '0'] = rounded.toExponential(digits - 1).split('e');
    const superscript = [...String(Number(exponent))]
      .map((c) => '⁻⁰¹²³⁴⁵⁶⁷⁸⁹'['-0123456789'.indexOf(c)] ?? c)
      .join('');
    return `${sign}${mantissa} × 10${superscript} Hz`;
  }
  const [scale, symbol] = FORMAT_UNITS.find(([s]) => rounded >= s) ?? [1, 'Hz'];
  const scaled = Number((rounded / scale).toPrecision(digits));
  const integerDigits = Math.floor(Math.log10(scaled)) + 1;
  const decimals = Math.max(0, digits - integerDigits);
  return `${sign}${scaled.toFixed(decimals)} ${symbol}`;
}
