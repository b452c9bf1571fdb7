// How register values read on screen: units always written, states and verdicts as a word
// plus a symbol, so nothing depends on colour alone.
import type { MeterState, Verdict } from '../../../app/engine/model';

const UNITS: [number, string][] = [
  [1e9, 'GHz'],
  [1e6, 'MHz'],
  [1e3, 'kHz'],
  [1, 'Hz'],
];

/** Up to three decimals, no trailing zeros: 8.2, 12.4, 110. */
function trim(n: number): string {
  return String(Number(n.toFixed(3)));
}

/** A band in one unit chosen by its upper edge: "8.2–12.4 GHz". */
export function formatBand(minHz: number, maxHz: number): string {
  const [scale, unit] = UNITS.find(([s]) => maxHz >= s) ?? [1, 'Hz'];
  return `${trim(minHz / scale)}–${trim(maxHz / scale)} ${unit}`;
}

export const STATE_LABEL: Record<MeterState, { symbol: string; word: string }> = {
  'in-service': { symbol: '●', word: 'In service' },
  quarantined: { symbol: '◆', word: 'Quarantined' },
  withdrawn: { symbol: '○', word: 'Withdrawn' },
};

export const VERDICT_LABEL: Record<Verdict, { symbol: string; word: string }> = {
  pass: { symbol: '✓', word: 'Pass' },
  'conditional-pass': { symbol: '(✓)', word: 'Conditional pass' },
  'conditional-fail': { symbol: '(✗)', word: 'Conditional fail' },
  fail: { symbol: '✗', word: 'Fail' },
};

/** Days within which a due date counts as soon. */
export const SOON_DAYS = 30;

export type DueStatus = 'none' | 'overdue' | 'today' | 'soon' | 'later';

export function dueStatus(daysToDue: number | null): DueStatus {
  if (daysToDue === null) return 'none';
  if (daysToDue < 0) return 'overdue';
  if (daysToDue === 0) return 'today';
  return daysToDue <= SOON_DAYS ? 'soon' : 'later';
}

/** "45 d", "12 d, soon", "0 d, due today", "12 d overdue"; the unit is always there. */
export function formatDays(daysToDue: number | null): string {
  const status = dueStatus(daysToDue);
  if (status === 'none' || daysToDue === null) return '—';
  if (status === 'overdue') return `${-daysToDue} d overdue`;
  if (status === 'today') return '0 d, due today';
  // Soon is said in words too, not only by its colour.
  return status === 'soon' ? `${daysToDue} d, soon` : `${daysToDue} d`;
}

/** A frequency in the unit that suits it, with a fixed number of significant decimals. */
export function formatHz(hz: number, decimals = 3): string {
  const [scale, unit] = UNITS.find(([s]) => Math.abs(hz) >= s) ?? [1, 'Hz'];
  return `${(hz / scale).toFixed(decimals)} ${unit}`;
}

/** Signed ppm with a fixed number of decimals, a true minus sign so columns line up. */
export function formatPpm(ppm: number, decimals = 1): string {
  const text = Math.abs(ppm).toFixed(decimals);
  const sign = ppm < 0 && Number(text) !== 0 ? '−' : ppm > 0 && Number(text) !== 0 ? '+' : '';
  return `${sign}${text} ppm`;
}

/** Power in W and dBm, as written on a meter's label. */
export function formatPower(watts: number): string {
  const dbm = 10 * Math.log10(watts * 1000);
  const w = watts >= 1 ? `${trim(watts)} W` : `${trim(watts * 1000)} mW`;
  return `${w} (${dbm.toFixed(1)} dBm)`;
}

/** Stated accuracy as written: "±(1000 ppm of reading + 0 Hz)" or "±1000 ppm of reading". */
export function formatAccuracy(relPpm: number, absHz: number): string {
  const pct = `${trim(relPpm / 1e4)} %`;
  return absHz > 0
    ? `±(${trim(relPpm)} ppm (${pct}) of reading + ${formatHz(absHz, 0)})`
    : `±${trim(relPpm)} ppm (${pct}) of reading`;
}

/** The tolerance half-width at a frequency, in ppm of that frequency. */
export function tolerancePpm(relPpm: number, absHz: number, hz: number): number {
  return relPpm + (absHz / hz) * 1e6;
}

/** A frequency without trailing zeros: "200 kHz", "1.5 MHz", "9.3 GHz". */
export function formatHzShort(hz: number): string {
  const [scale, unit] = UNITS.find(([s]) => Math.abs(hz) >= s) ?? [1, 'Hz'];
  return `${String(Number((hz / scale).toFixed(6)))} ${unit}`;
}
