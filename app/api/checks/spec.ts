// A meter record as the engine's specification of it, and the order of verdicts.
import type { MeterSpec, Verdict } from '../../engine/model';
import type { Meter } from '../contract';

const VERDICT_ORDER: Verdict[] = ['pass', 'conditional-pass', 'conditional-fail', 'fail'];

export function worstVerdict(verdicts: Verdict[]): Verdict | null {
  let worst = -1;
  for (const v of verdicts) worst = Math.max(worst, VERDICT_ORDER.indexOf(v));
  return worst < 0 ? null : (VERDICT_ORDER[worst] ?? null);
}

export function specOf(m: Meter): MeterSpec {
  return {
    minHz: m.minHz,
    maxHz: m.maxHz,
    dialKind: m.dialKind,
    accuracyRelPpm: m.accuracyRelPpm,
    accuracyAbsHz: m.accuracyAbsHz,
    resolution: m.resolution,
    chart: m.dialKind === 'divisions' ? m.chart : undefined,
    alphaPerK: m.alphaPerK,
    alphaUncertaintyPerK: m.alphaUncertaintyPerK,
    reference: m.reference,
    loadedQ: m.loadedQ,
    settingFraction: m.settingFraction,
  };
}
