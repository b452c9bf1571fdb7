// How register values read on screen: units always written, states and verdicts as a word
// plus a symbol, so nothing depends on colour alone.
import type { MeterState, Verdict } from '../../app/engine/model';

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
