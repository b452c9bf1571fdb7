// Tables and one helper shared by the stored-result formats 1 and 2 (point-pack.ts,
// point-pack2.ts). Each format reads these lists by position, so they are frozen: never edit,
// reorder or extend an entry; a new word or template belongs to a new format with its own list.

/** Whole strings of a result that a packed text writes as one code. */
export const RESULT_WORDS: readonly string[] = [
  'reference',
  'repeatability',
  'resolution',
  'hysteresis',
  'setting',
  'temperature',
  'expansion',
  'pressure',
  'humidity',
  'fit',
  'A',
  'B',
  'normal',
  'rectangular',
  't',
  'Hz',
  'div',
  'degC',
  '1/K',
  'hPa',
  '%RH',
  'pass',
  'conditional-pass',
  'conditional-fail',
  'fail',
  'simple',
  'guarded',
  'guarded-fixed',
  'non-binary',
  'Reference source (certificate)',
  'Repeatability (range of readings, rectangular)',
  'Hysteresis between directions (half the difference of the means)',
  'Bench temperature (cavity expansion and air index)',
  'Expansion coefficient of the cavity',
  'Air pressure (air index)',
  'Relative humidity (air index)',
  'one direction only: hysteresis not evaluated',
  'one reading per direction: repeatability taken as rectangular with the range of the readings as half-width (no Type A evaluation possible)',
  "reference frequency lies outside the meter's stated band",
  'sweep method: dial set to a graduation, resonance fitted to the swept trace',
];

/** [before, after] of strings whose middle part differs from point to point. */
export const RESULT_TEMPLATES: readonly (readonly [string, string])[] = [
  ['Repeatability (pooled s = ', ' readings)'],
  ['Dial resolution (', ', half-width = resolution / 2)'],
  ['Setting on the dip (', ')'],
  ["Resonance fit of the sweep (u(f0) from the fit's covariance, ", ' dof)'],
  ['test uncertainty ratio ', ' is below 4'],
];

/** Whether the own keys of `o`, in order, are `keys` (without making the list of them: this
 * runs for every budget line of every point written). */
export function keysAre(o: object, keys: readonly string[]): boolean {
  let i = 0;
  for (const k in o) {
    if (!Object.prototype.hasOwnProperty.call(o, k) || k !== keys[i]) return false;
    i++;
  }
  return i === keys.length;
}
