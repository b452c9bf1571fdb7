// How quantities are written for people, the one module the window, the documents and the
// command line share: numbers with an SI prefix and a unit, uncertainties to two significant
// digits with the value rounded to the same decimal place, per-mille-free ppm, probabilities of
// conformity in one wording. Pure: no Node, no DOM, no project imports, so the renderer uses it.
//
// Sources:
// - JCGM 100:2008 (GUM) 7.2.6: quote u_c(y) and U to at most two significant digits (more may be
//   kept to avoid round-off in later calculations); round the estimate to be consistent with its
//   uncertainty (y = 10.057 62 ohm with u_c = 27 milliohm is written 10.058 ohm); "common sense
//   should prevail": 28.05 kHz is rounded down to 28 kHz, so rounding here is to the nearest.
// - SI Brochure, 9th edition (BIPM 2019), 5.4.3 (a space between number and unit, also before
//   %, none before the plane-angle degree; "°C" takes the space), 3 and Table 7 (the prefixes,
//   with ronna, quetta, ronto, quecto from CGPM 2022 Resolution 3), 5.4.4 (a prefix and its unit
//   form one symbol: a power applies to both, so "µK⁻¹" would mean (10⁻⁶ K)⁻¹ = 10⁶ K⁻¹). Thermal
//   coefficients are therefore written "1.50 ppm/K", in the ppm every error in this product is
//   stated in, never with a prefix on the kelvin.
// - Never e-notation (a certificate is read by people), never float noise (965.9499999999999):
//   every number is printed from its decimal rounding (Number.prototype.toExponential rounds the
//   exact binary value, ECMA-262 21.1.3.2), never by printing a product of floats.
//
// Conventions (common practice): intermediate values of an uncertainty budget (u(x_i), c_i,
// u_i(y), u_c) keep three significant digits, as GUM 7.2.6 allows, so the rows visibly add up;
// the reported expanded uncertainty U keeps two. Decimal marker '.', no digit grouping, so what is
// printed can be typed back (the frequency parser refuses grouped digits).

/** SI prefixes, SI Brochure 9th ed. Table 7 (with the 2022 additions). */
export const SI_PREFIXES: ReadonlyArray<{ exponent: number; symbol: string }> = [
  { exponent: 30, symbol: 'Q' },
  { exponent: 27, symbol: 'R' },
  { exponent: 24, symbol: 'Y' },
  { exponent: 21, symbol: 'Z' },
  { exponent: 18, symbol: 'E' },
  { exponent: 15, symbol: 'P' },
  { exponent: 12, symbol: 'T' },
  { exponent: 9, symbol: 'G' },
  { exponent: 6, symbol: 'M' },
  { exponent: 3, symbol: 'k' },
  { exponent: 0, symbol: '' },
  { exponent: -3, symbol: 'm' },
  { exponent: -6, symbol: 'µ' },
  { exponent: -9, symbol: 'n' },
  { exponent: -12, symbol: 'p' },
  { exponent: -15, symbol: 'f' },
  { exponent: -18, symbol: 'a' },
  { exponent: -21, symbol: 'z' },
  { exponent: -24, symbol: 'y' },
  { exponent: -27, symbol: 'r' },
  { exponent: -30, symbol: 'q' },
];

const SUPERSCRIPT: Readonly<Record<string, string>> = {
  '-': '⁻',
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
};

/** Minus as written: ASCII for the command line and documents, U+2212 for the window. */
export type MinusSign = '-' | '−';

export interface NumberStyle {
  /** '+' in front of positive values (errors, corrections). */
  signed?: boolean;
  minus?: MinusSign;
}

/** Decimal exponent of |x| as printed: 965.95 -> 2. */
function exponentOf(x: number): number {
  const text = Math.abs(x).toExponential();
  return Number(text.slice(text.indexOf('e') + 1));
}

/**
 * |x| rounded to `decimals` places (negative: to tens, hundreds...), as plain decimal digits
 * without a sign. Exact decimal rounding of the binary value; no exponent in the result.
 */
function unsignedDecimal(x: number, decimals: number): string {
  const a = Math.abs(x);
  const places = Math.max(0, decimals);
  const zero = places > 0 ? `0.${'0'.repeat(places)}` : '0';
  if (a === 0) return zero;
  const e = exponentOf(a);
  const significant = e + decimals + 1;
  let digits: string;
  let exponent: number;
  if (significant <= 0) {
    // Below half a unit of the last place it rounds to zero; from half a unit, to one unit.
    const half = significant === 0 && Number(`5e${-decimals - 1}`) <= a;
    if (!half) return zero;
    digits = '1';
    exponent = -decimals;
  } else {
    // Asked for more digits than the shortest text that reads back as the same double: that
    // text, padded with zeros (the binary expansion beyond it is not part of the value).
    const shortest = a.toExponential();
    const shortDigits = shortest.indexOf('e') - (shortest.includes('.') ? 1 : 0);
    const kept = Math.min(significant, shortDigits);
    const text = shortDigits <= significant ? shortest : a.toExponential(significant - 1);
    const cut = text.indexOf('e');
    digits = text.slice(0, cut).replace('.', '') + '0'.repeat(significant - kept);
    exponent = Number(text.slice(cut + 1));
    // A rounding that carried into a new digit (9.96 -> 10.0) gives one digit more than asked.
    if (exponent > e) digits = digits.slice(0, digits.length - 1) || '1';
  }
  // digits d0 d1 d2 ... stand for d0.d1d2... x 10^exponent, last one at place 10^-decimals.
  const integerLength = exponent + 1;
  let integer: string;
  let fraction: string;
  if (integerLength <= 0) {
    integer = '0';
    fraction = '0'.repeat(-integerLength) + digits;
  } else if (integerLength >= digits.length) {
    integer = digits + '0'.repeat(integerLength - digits.length);
    fraction = '';
  } else {
    integer = digits.slice(0, integerLength);
    fraction = digits.slice(integerLength);
  }
  fraction = fraction.padEnd(places, '0').slice(0, places);
  return places > 0 ? `${integer}.${fraction}` : integer;
}

function withSign(body: string, negative: boolean, style: NumberStyle = {}): string {
  const isZero = !/[1-9]/.test(body);
  if (negative && !isZero) return `${style.minus ?? '-'}${body}`;
  return style.signed && !isZero ? `+${body}` : body;
}

/** Words for values that are not numbers; never a crash. */
function nonFinite(x: number, style: NumberStyle): string {
  if (Number.isNaN(x)) return 'not a number';
  return x > 0 ? (style.signed ? '+∞' : '∞') : `${style.minus ?? '-'}∞`;
}

/** x rounded to `decimals` decimal places, plain digits: decimal(965.9499999999999, 2) = "965.95". */
export function decimal(x: number, decimals: number, style: NumberStyle = {}): string {
  if (!Number.isFinite(x)) return nonFinite(x, style);
  const places = Math.max(-330, Math.min(330, Math.round(decimals)));
  return withSign(unsignedDecimal(x, places), x < 0, style);
}

/** Decimal places that give `digits` significant digits to x (0 for x = 0 keeps one digit). */
export function decimalsForSignificant(x: number, digits: number): number {
  if (!Number.isFinite(x) || x === 0) return Math.max(0, digits - 1);
  const e = exponentOf(x);
  // Rounding may carry into a new digit (9.96 at 2 digits is 10): keep `digits` digits after it.
  const rounded = Number(Math.abs(x).toExponential(Math.max(0, digits - 1)));
  return digits - 1 - Math.max(e, exponentOf(rounded));
}

/** x to `digits` significant digits, trailing zeros kept: significant(0.0012345, 3) = "0.00123". */
export function significant(x: number, digits: number, style: NumberStyle = {}): string {
  if (!Number.isFinite(x)) return nonFinite(x, style);
  return decimal(x, decimalsForSignificant(x, Math.max(1, Math.round(digits))), style);
}

/** x to at most `digits` significant digits, trailing zeros dropped: plain(0.1 + 0.2) = "0.3". */
export function plain(x: number, digits = 12, style: NumberStyle = {}): string {
  const text = significant(x, digits, style);
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}

/**
 * A machine value without float noise: 15 significant digits, the most that every decimal
 * number keeps through a double (DBL_DIG of IEEE 754 binary64, ISO C 5.2.4.2.2), so nothing
 * measured is lost and 0.1 + 0.2 is 0.3 again. What `--json` prints (docs/exchange.md).
 */
export function machineNumber(x: number, digits = 15): number {
  if (!Number.isFinite(x) || x === 0) return x;
  return Number(x.toPrecision(digits));
}

/** Every number in a JSON-like value rounded by machineNumber; the shape is kept. */
export function machineValues<T>(value: T, digits = 15): T {
  if (typeof value === 'number') return machineNumber(value, digits) as T;
  if (Array.isArray(value)) return value.map((v: unknown) => machineValues(v, digits)) as T;
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) out[k] = machineValues(v, digits);
    return out as T;
  }
  return value;
}

/** "10⁻³⁰⁰": a power of ten as the SI Brochure writes it, for values beyond every prefix. */
export function powerOfTen(exponent: number): string {
  return `10${[...String(exponent)].map((c) => SUPERSCRIPT[c] ?? c).join('')}`;
}

export interface QuantityOptions extends NumberStyle {
  /** Significant digits (default 3). Ignored when `decimalsAt` is given. */
  digits?: number;
  /** Round at this power of ten of the unit (e.g. 3 rounds hertz to the kHz): GUM 7.2.6. */
  placeExponent?: number;
  /** Drop trailing zeros after the decimal marker (for stated values such as limits). */
  trim?: boolean;
  /** Smallest and largest prefix exponents to use (default: every SI prefix). */
  minPrefix?: number;
  maxPrefix?: number;
  /** Use this prefix exponent instead of choosing one (a column in one unit). */
  prefix?: number;
}

/** The prefix exponent that puts |x| in [1, 1000), within the allowed range. */
export function prefixFor(x: number, minPrefix = -30, maxPrefix = 30): number {
  if (!Number.isFinite(x) || x === 0) return 0;
  const e = exponentOf(x);
  return Math.max(minPrefix, Math.min(maxPrefix, Math.floor(e / 3) * 3));
}

function prefixSymbol(exponent: number): string {
  return SI_PREFIXES.find((p) => p.exponent === exponent)?.symbol ?? '';
}

/** x rounded at the power of ten `place` (3: to thousands), as a number. */
function roundAt(x: number, place: number): number {
  return Number(decimal(x, -place));
}

/**
 * A quantity with an SI prefix: formatQuantity(1.03e5, 'Hz') = "103 kHz",
 * formatQuantity(4e6, 'Hz') = "4.00 MHz". Space between number and unit (SI Brochure 5.4.3).
 * Beyond the prefixes the value is written with a power of ten, never in e-notation.
 */
export function formatQuantity(x: number, unit: string, options: QuantityOptions = {}): string {
  const sep = unit === '' ? '' : ' ';
  if (!Number.isFinite(x)) return `${nonFinite(x, options)}${sep}${unit}`;
  const digits = Math.max(1, Math.round(options.digits ?? 3));
  const minPrefix = options.minPrefix ?? -30;
  const maxPrefix = options.maxPrefix ?? 30;
  // Round first, then choose the prefix, so 999.96 kHz at 4 digits is "1.000 MHz".
  let place = options.placeExponent ?? (x === 0 ? 1 - digits : exponentOf(x) - (digits - 1));
  let rounded = roundAt(x, place);
  if (options.placeExponent === undefined && rounded !== 0 && exponentOf(rounded) - (digits - 1) !== place) {
    place = exponentOf(rounded) - (digits - 1);
    rounded = roundAt(x, place);
  }
  const e = exponentOf(rounded === 0 ? x : rounded);
  if (x !== 0 && (e < minPrefix - 3 || e >= maxPrefix + 6)) {
    // Beyond every allowed prefix: d.dd × 10ⁿ, the mantissa from the decimal rounding of x.
    const shown = Math.max(1, Math.min(100, e - place + 1));
    const text = Math.abs(x).toExponential(shown - 1);
    const cut = text.indexOf('e');
    const mantissa = withSign(text.slice(0, cut), x < 0, options);
    return `${mantissa} × ${powerOfTen(Number(text.slice(cut + 1)))}${sep}${unit}`;
  }
  const prefix = options.prefix ?? prefixFor(rounded === 0 ? x : rounded, minPrefix, maxPrefix);
  // rounded / 10^prefix may carry float noise below the last kept place; decimal() drops it.
  let text = decimal(rounded / 10 ** prefix, Math.max(0, prefix - place), options);
  if (options.trim && text.includes('.')) text = text.replace(/\.?0+$/, '');
  return `${text}${sep}${prefixSymbol(prefix)}${unit}`;
}

/** A frequency: formatHz(9.3e9, { digits: 4 }) = "9.300 GHz". The prefix is kept from µHz up. */
export function formatHz(hz: number, options: QuantityOptions = {}): string {
  return formatQuantity(hz, 'Hz', { minPrefix: -6, maxPrefix: 12, ...options });
}

/** The expanded (or standard) uncertainty rounded to two significant digits (GUM 7.2.6). */
export function uncertaintyPlace(u: number, digits = 2): number {
  if (!Number.isFinite(u) || u <= 0) return 0;
  return -decimalsForSignificant(u, digits);
}

export interface Measured {
  /** The estimate, rounded to the decimal place of the uncertainty. */
  value: string;
  /** The uncertainty, two significant digits. */
  uncertainty: string;
  /** "(9.300 012 ± 0.000 040) GHz" style, written "9.300012 GHz ± 40 kHz". */
  text: string;
}

/**
 * A value with its uncertainty: the uncertainty to two significant digits, the value rounded to
 * the same decimal place (GUM 7.2.6), each with its own prefix: "9.300012 GHz ± 40 kHz".
 */
export function formatMeasured(
  value: number,
  uncertainty: number,
  unit: string,
  options: Omit<QuantityOptions, 'digits' | 'placeExponent'> = {},
): Measured {
  const place = uncertaintyPlace(uncertainty);
  const valueText = formatQuantity(value, unit, { ...options, placeExponent: place });
  const uText = formatQuantity(uncertainty, unit, { ...options, signed: false, digits: 2 });
  return { value: valueText, uncertainty: uText, text: `${valueText} ± ${uText}` };
}

/** Decimal places of a column in unit 10^prefixExponent that show an uncertainty's place. */
export function decimalsForUncertainty(uncertainty: number, prefixExponent = 0, atLeast = 0): number {
  return Math.max(atLeast, prefixExponent - uncertaintyPlace(uncertainty));
}

/** Relative quantity in ppm: formatPpm(12.345, 1, { signed: true }) = "+12.3 ppm". */
export function formatPpm(ppm: number, decimals = 1, style: NumberStyle = {}): string {
  return `${decimal(ppm, decimals, style)} ppm`;
}

/** A thermal coefficient given per kelvin, written in ppm/K: 1.5e-6 -> "1.50 ppm/K". */
export function formatPerKelvin(perK: number, digits = 3, style: NumberStyle = {}): string {
  const ppm = perK * 1e6;
  if (!Number.isFinite(ppm)) return `${nonFinite(ppm, style)} ppm/K`;
  return `${ppm === 0 ? '0' : significant(ppm, digits, style)} ppm/K`;
}

/** A percentage with the SI space: formatPercent(0.9545, 2) = "95.45 %". */
export function formatPercent(fraction: number, decimals = 1, style: NumberStyle = {}): string {
  return `${decimal(fraction * 100, decimals, style)} %`;
}

/**
 * The probability of conformity (JCGM 106:2012) in one wording everywhere: "> 99.9 %" above
 * 0.999, "< 0.1 %" below 0.001, else one decimal. A normal model cannot claim certainty, so
 * "100.0 %" and "0.0 %" are never written.
 */
export function formatProbability(p: number): string {
  if (!Number.isFinite(p)) return 'not known';
  if (p > 0.999) return '> 99.9 %';
  if (p < 0.001) return '< 0.1 %';
  // 0.9994 would round to "99.9 %" and 0.0006 to "0.1 %": both are inside the open ends above.
  return formatPercent(p, 1);
}

/** A plain count or factor with `digits` significant digits, trailing zeros dropped: TUR, Q. */
export function formatFactor(x: number, digits = 3): string {
  return plain(x, digits);
}

/** Unit symbols as printed: the engine's plain-text 'degC' as °C, '1/K' as ppm/K (see header). */
export function unitSymbol(unit: string): string {
  if (unit === 'degC') return '°C';
  if (unit === '1/K') return 'ppm/K';
  return unit;
}

/**
 * A value in one of the engine's input units: hertz with a prefix, '1/K' as ppm/K, the others
 * (°C, hPa, %RH, div) with `digits` significant digits: formatInUnit(0.2, 'degC') = "0.200 °C".
 */
export function formatInUnit(x: number, unit: string, digits = 3, style: NumberStyle = {}): string {
  if (unit === 'Hz') return formatHz(x, { ...style, digits });
  if (unit === '1/K') return formatPerKelvin(x, digits, style);
  const text = x === 0 ? '0' : significant(x, digits, style);
  return `${text} ${unitSymbol(unit)}`;
}

/**
 * A sensitivity coefficient c_i = ∂y/∂x_i with y in hertz: dimensionless for an input in Hz
 * ("-1.00"), Hz·K for an input per kelvin ("-2.40 GHz·K"), else Hz per unit ("-9.30 kHz/°C").
 */
export function formatSensitivity(c: number, inputUnit: string, digits = 3, style: NumberStyle = {}): string {
  if (inputUnit === 'Hz') return c === 0 ? '0' : significant(c, digits, style);
  if (inputUnit === '1/K') return formatQuantity(c, 'Hz·K', { ...style, digits });
  return formatQuantity(c, `Hz/${unitSymbol(inputUnit)}`, { ...style, digits });
}

// "1.00e+5 Hz", "200000 Hz": a number in e-notation, or a whole number of 1000 or more, before a
// unit of hertz (engine labels and notes are fixed text made when the point was computed).
const HZ_IN_TEXT = /(?<![\w.])(\d+(?:\.\d+)?e[+-]?\d+|\d{4,}(?:\.\d+)?) ?Hz\b/g;

/**
 * Text with its frequencies rewritten with SI prefixes: "pooled s = 1.00e+5 Hz" becomes
 * "pooled s = 100 kHz", "200000 Hz" becomes "200 kHz". The digits written are kept (a value
 * given to three figures stays at three), trailing zeros of whole numbers are not counted.
 */
export function withPrefixedHz(text: string): string {
  return text.replace(HZ_IN_TEXT, (_all, number: string) => {
    const x = Number(number);
    if (!Number.isFinite(x)) return _all;
    const [mantissa = ''] = number.toLowerCase().split('e');
    const written = number.includes('e') || mantissa.includes('.') ? mantissa : mantissa.replace(/0+$/, '');
    const digits = Math.max(1, written.replace(/^[0.]+/, '').replace('.', '').length);
    return formatHz(x, { digits });
  });
}

/**
 * Axis ticks at round values, 1, 2 or 5 × 10ⁿ apart (common practice for chart scales), about
 * `count` intervals over [lo, hi]; every tick is the decimal value itself, not a sum of floats.
 */
export function roundTicks(lo: number, hi: number, count = 6): number[] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  const span = hi - lo || Math.abs(hi) || 1;
  const raw = span / Math.max(1, count);
  const power = Math.floor(Math.log10(raw));
  const unit = Number(`1e${power}`);
  const factor = [1, 2, 5, 10].find((m) => m * unit >= raw * (1 - 1e-12)) ?? 10;
  const step = factor * unit;
  const place = factor === 10 ? power + 1 : power;
  const first = Math.ceil(lo / step - 1e-9);
  const last = Math.floor(hi / step + 1e-9);
  const out: number[] = [];
  for (let i = first; i <= last && out.length < 1000; i++) out.push(Number(decimal(i * step, -place)) || 0);
  return out;
}

/** Labels for ticks from roundTicks: all with the decimals of the step ("0.5", "1.0", "1.5"). */
export function tickLabels(ticks: readonly number[], style: NumberStyle = {}): string[] {
  const step = ticks.length > 1 ? Math.abs((ticks[1] as number) - (ticks[0] as number)) : 1;
  const decimals = Math.max(0, -exponentOf(step));
  return ticks.map((t) => decimal(t, decimals, style));
}
