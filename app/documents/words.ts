// The words and number formats documents print: verdicts, decision rules with the clause they
// come from, frequencies with units, signed ppm. Kept apart from layout so tests and the CLI
// can use the same wording.
import { formatFrequency } from '../engine';
import { decimal, decimalsForUncertainty, formatHz, formatPerKelvin, plain } from '../model/quantity-format';
import type { DecisionRule, Verdict } from '../engine/model';
import type { Meter } from '../model/records';
import type { SignatureMeaning } from './model';

export const VERDICT_TEXT: Record<Verdict, string> = {
  pass: 'PASS',
  'conditional-pass': 'CONDITIONAL PASS',
  'conditional-fail': 'CONDITIONAL FAIL',
  fail: 'FAIL',
};

export const MEANING_TEXT: Record<SignatureMeaning, string> = {
  performed: 'performed the check',
  reviewed: 'reviewed the record',
  approved: 'approved for issue',
};

export function verdictText(v: Verdict | null): string {
  return v ? VERDICT_TEXT[v] : 'not judged';
}

/** The decision rule in words, with its source (ISO/IEC 17025:2017 7.8.6.2 c). */
export function ruleText(rule: DecisionRule): string {
  switch (rule.kind) {
    case 'simple':
      return 'simple acceptance (ILAC-G8:09/2019 clause 4.2.1): a point passes when the measured error lies within the tolerance; the uncertainty is reported but not subtracted.';
    case 'guarded':
      return `binary acceptance with guard band w = ${num(rule.multipleOfU, 3)} U (ILAC-G8:09/2019 clause 4.2.2): a point passes when the measured error lies within the tolerance reduced by w; otherwise it fails.`;
    case 'guarded-fixed':
      return `binary acceptance with a fixed guard band w = ${num(rule.guardBandPpm, 3)} ppm of reading (ILAC-G8:09/2019 clause 4.2.2): a point passes when the measured error lies within the tolerance reduced by w.`;
    case 'non-binary':
      return 'non-binary statement with guard band w = U (ILAC-G8:09/2019 clause 4.2.3): pass inside the tolerance reduced by U, conditional pass or conditional fail within U of the limit, fail beyond the tolerance widened by U.';
  }
}

/** The risk the rule carries, in words (ISO/IEC 17025:2017 7.8.6.1; JCGM 106:2012). */
export function ruleRiskText(rule: DecisionRule): string {
  switch (rule.kind) {
    case 'simple':
      return 'Under simple acceptance the probability of false acceptance at a point can reach 50 % when the error lies at the tolerance limit; the probability of conformity of each point (JCGM 106:2012) is given on the check-sheet.';
    case 'guarded':
      return rule.multipleOfU >= 1
        ? 'With w = U the specific probability of false acceptance at each accepted point is at most about 2.3 % (normal distribution, k = 2; JCGM 106:2012).'
        : 'The guard band is smaller than U, so the probability of false acceptance at an accepted point may exceed 2.3 %; the probability of conformity of each point is given on the check-sheet.';
    case 'guarded-fixed':
      return 'The probability of false acceptance depends on the guard band compared with U at each point; the probability of conformity of each point (JCGM 106:2012) is given on the check-sheet.';
    case 'non-binary':
      return 'A plain pass or fail carries a probability of false decision of at most about 2.3 % (w = U, k = 2; JCGM 106:2012); conditional statements say the result lies within U of a limit.';
  }
}

/** At most `digits` significant digits, trailing zeros dropped, never e-notation. */
export function num(x: number, digits: number): string {
  return plain(x, digits);
}

/** Rounded to `decimals` places; never "-0.0", never e-notation. */
export function fixed(x: number, decimals: number): string {
  return decimal(x, decimals);
}

/** As `fixed`, with "+" before positive values ("+0.0" for a zero, as before). */
export function signed(x: number, decimals: number): string {
  const s = decimal(x, decimals);
  return s.startsWith('-') ? s : `+${s}`;
}

/** Frequency in GHz with enough decimals to show the dial's resolution (numbers for tables). */
export function ghz(hz: number, decimals = 6): string {
  return decimal(hz / 1e9, decimals);
}

/** Decimal places in GHz that show a frequency to `resolutionHz`. */
export function ghzDecimals(resolutionHz: number): number {
  return Math.min(9, Math.max(3, Math.ceil(-Math.log10(resolutionHz / 1e9))));
}

/**
 * Decimal places in GHz for a table of points: the dial's resolution, or finer where an expanded
 * uncertainty at two significant digits reaches further (GUM 7.2.6), so a correction that is
 * significant against U shows between the indication and the corrected value. At most 1 Hz.
 */
export function ghzDecimalsFor(
  meter: Pick<Meter, 'dialKind' | 'resolution'>,
  expandedHz: readonly number[],
): number {
  const dial = ghzDecimals(meter.dialKind === 'direct' ? meter.resolution / 10 : 1e3);
  const finest = expandedHz.filter((u) => u > 0 && Number.isFinite(u));
  if (finest.length === 0) return dial;
  return Math.min(9, decimalsForUncertainty(Math.min(...finest), 9, dial));
}

/** The tolerance at a point in ppm of the reading it was set at (the corrected indication):
 * the stated relative accuracy, not the same limit taken over the reference frequency. */
export function tolerancePpmOfReading(toleranceHz: number, correctedHz: number): number {
  return (toleranceHz / Math.abs(correctedHz)) * 1e6;
}

/** A quantity in Hz with an SI prefix, three significant digits by default ("103 kHz"). */
export function hz(x: number, digits = 3): string {
  return formatHz(x, { digits });
}

/** A thermal coefficient per kelvin as ppm/K ("1.50 ppm/K"). */
export function perKelvin(x: number, digits = 3): string {
  return formatPerKelvin(x, digits);
}

export function freq(hz: number, digits = 6): string {
  return formatFrequency(hz, digits);
}

/** Error in kHz with sign, for tables whose header says the unit. */
export function khzSigned(hz: number, decimals = 1): string {
  return signed(hz / 1e3, decimals);
}

export function band(m: Pick<Meter, 'minHz' | 'maxHz'>): string {
  return `${formatFrequency(m.minHz, 4)} to ${formatFrequency(m.maxHz, 4)}`;
}

/** The meter's stated accuracy as a tolerance: relative term plus absolute term. */
export function accuracyText(m: Pick<Meter, 'accuracyRelPpm' | 'accuracyAbsHz'>): string {
  const rel = `±${num(m.accuracyRelPpm, 4)} ppm of reading (±${num(m.accuracyRelPpm / 1e4, 4)} %)`;
  return m.accuracyAbsHz > 0 ? `${rel} ± ${formatFrequency(m.accuracyAbsHz, 3)}` : rel;
}

export function dialText(m: Pick<Meter, 'dialKind' | 'resolution'>): string {
  return m.dialKind === 'direct'
    ? `direct-reading dial, resolution ${formatFrequency(m.resolution, 3)}`
    : `micrometer read in divisions (resolution ${num(m.resolution, 3)} div) with a calibration chart`;
}

export function methodText(method: 'tune-to-dip' | 'sweep'): string {
  return method === 'tune-to-dip'
    ? 'Tune-to-dip: the traceable source is set to each check frequency and the meter tuned to the absorption dip seen on a detector, approached from below (up) and from above (down), each read several times.'
    : 'Sweep: the meter is set to each dial setting and the source swept through the absorption dip; the resonance is found from the dip.';
}

/** Day part of an ISO time, with the time in UTC when given. */
export function when(iso: string): string {
  const t = new Date(iso);
  if (Number.isNaN(t.getTime())) return iso;
  const s = t.toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, 16)} UTC`;
}

/** A key fingerprint in groups of four, first 32 hex digits (enough to tell keys apart by eye). */
export function fingerprintText(hex: string): string {
  return (hex.slice(0, 32).match(/.{1,4}/g) ?? []).join(' ');
}
