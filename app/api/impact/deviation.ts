// Reading a deviation as typed: a signed number with a unit, relative (ppm, ppb) or absolute
// (Hz, kHz, MHz, GHz). Unlike a frequency, a deviation may be zero or negative, and a bare number
// is refused: 0.3 could be ppm or Hz, a factor of thousands apart at these frequencies.
import type { ReferenceDeviation } from '../../engine';
import { LabError } from '../errors';

const PATTERN = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)\s*([a-zA-Z]*)\s*$/;
const SCALE: Record<string, { unit: 'ppm' | 'Hz'; factor: number }> = {
  ppm: { unit: 'ppm', factor: 1 },
  ppb: { unit: 'ppm', factor: 1e-3 },
  hz: { unit: 'Hz', factor: 1 },
  khz: { unit: 'Hz', factor: 1e3 },
  mhz: { unit: 'Hz', factor: 1e6 },
  ghz: { unit: 'Hz', factor: 1e9 },
};
const EXPECTED =
  'a number with its unit: ppm or ppb of the reference, or Hz, kHz, MHz, GHz ("0.3 ppm", "-40 Hz")';

/** Parses "0.3 ppm", "-40 Hz", "2kHz"; refuses a bare number, naming the field. */
export function parseDeviation(field: string, input: unknown): { unit: 'ppm' | 'Hz'; value: number } {
  const text = typeof input === 'number' ? String(input) : input;
  const m = typeof text === 'string' ? PATTERN.exec(text) : null;
  if (!m)
    throw LabError.field(field, input, EXPECTED, `${field}: ${JSON.stringify(input)} is not ${EXPECTED}`);
  const unitText = (m[2] ?? '').toLowerCase();
  if (unitText === '')
    throw LabError.field(
      field,
      input,
      EXPECTED,
      `${field}: ${JSON.stringify(input)} has no unit; write "${m[1]} ppm" for a relative deviation or "${m[1]} Hz" for an absolute one`,
    );
  const scale = SCALE[unitText];
  if (!scale)
    throw LabError.field(
      field,
      input,
      EXPECTED,
      `${field}: ${JSON.stringify(input)} has an unknown unit "${m[2]}"; use ppm, ppb, Hz, kHz, MHz or GHz`,
    );
  const value = Number(m[1]) * scale.factor;
  if (!Number.isFinite(value)) throw LabError.field(field, input, EXPECTED);
  return { unit: scale.unit, value };
}

/** The deviation with its standard uncertainty: an expanded U (k = 2) given in the same kind of
 * unit, or the certificate's relative U over its k. */
export function deviationWithUncertainty(
  error: { unit: 'ppm' | 'Hz'; value: number },
  expanded: { unit: 'ppm' | 'Hz'; value: number } | undefined,
  certificate: { expandedUncertaintyPpm: number; coverageFactor: number } | undefined,
): ReferenceDeviation {
  if (expanded) {
    if (expanded.unit !== error.unit)
      throw LabError.field(
        'uncertainty',
        `${expanded.value} ${expanded.unit}`,
        `an uncertainty in the same kind of unit as the error (${error.unit === 'ppm' ? 'ppm or ppb' : 'Hz'})`,
      );
    if (expanded.value < 0)
      throw LabError.field('uncertainty', expanded.value, 'an uncertainty of zero or more');
    return { ...error, standardUncertainty: expanded.value / 2 };
  }
  if (error.unit !== 'ppm')
    throw LabError.field(
      'uncertainty',
      undefined,
      'the expanded uncertainty (k = 2) of an absolute error, in Hz',
      'uncertainty: an error in Hz needs its expanded uncertainty (k = 2) in Hz too, such as "10 Hz"; the standard\'s certificate gives only a relative one',
    );
  if (!certificate)
    throw LabError.field(
      'uncertainty',
      undefined,
      'an expanded uncertainty (k = 2) with a unit: the standard has no certificate to take it from',
    );
  return { ...error, standardUncertainty: certificate.expandedUncertaintyPpm / certificate.coverageFactor };
}
