// A check document's readings and conditions as the engine's inputs, and one point judged.
import { checkInBand, evaluatePoint, formatFrequency, parseDivisions } from '../../engine';
import type { Conditions, DecisionRule, PointResult, Reading } from '../../engine/model';
import type { StandardRecord } from '../../../db/queries/standards';
import type { LabSettings, Meter } from '../contract';
import { describe } from '../errors';
import { frequencyOrIssue, type Issues } from '../issues';
import type { CheckDocument } from '../schemas';
import { specOf } from './spec';

/** Parses one reading in dial units: Hz for direct-reading meters, divisions otherwise. */
export function readingValue(
  issues: Issues,
  meter: Meter,
  value: string | number,
  field: string,
): number | undefined {
  if (meter.dialKind === 'direct') {
    const hz = frequencyOrIssue(issues, value, field);
    if (hz === undefined) return undefined;
    // A meter read at its band edge may show its own error: allow twice the stated accuracy.
    const slack = 2 * (meter.accuracyRelPpm * 1e-6);
    if (checkInBand(hz, meter.minHz * (1 - slack), meter.maxHz * (1 + slack), field)) {
      const bandText = `${formatFrequency(meter.minHz, 4)} to ${formatFrequency(meter.maxHz, 4)}`;
      issues.fromParse(
        field,
        value,
        `${field}: ${describe(value)} is outside the band of ${meter.assetId} (${bandText})`,
        `a reading inside the band of ${meter.assetId}`,
      );
      return undefined;
    }
    return hz;
  }
  const d = parseDivisions(value, field);
  if (!d.ok) {
    issues.fromParse(field, value, d.message, 'a dial reading in divisions, such as 12.345');
    return undefined;
  }
  const first = meter.chart[0];
  const last = meter.chart[meter.chart.length - 1];
  if (first && last) {
    const lo = Math.min(first.divisions, last.divisions);
    const hi = Math.max(first.divisions, last.divisions);
    if (d.divisions < lo || d.divisions > hi) {
      issues.fromParse(
        field,
        value,
        `${field}: ${describe(value)} divisions is outside the chart of ${meter.assetId} (${lo} to ${hi} div)`,
        `a reading from ${lo} to ${hi} divisions`,
      );
      return undefined;
    }
  }
  return d.divisions;
}

/** The check's conditions, with the lab's default uncertainties where the document gives none. */
export function conditionsOf(
  doc: { conditions: CheckDocument['conditions'] },
  settings: LabSettings,
): Conditions {
  const c = doc.conditions;
  return {
    temperatureC: c.temperatureC,
    temperatureUncertaintyC: c.temperatureUncertaintyC ?? settings.defaultTemperatureUncertaintyC,
    pressureHpa: c.pressureHpa,
    pressureUncertaintyHpa: c.pressureUncertaintyHpa ?? settings.defaultPressureUncertaintyHpa,
    humidityPct: c.humidityPct,
    humidityUncertaintyPct: c.humidityUncertaintyPct ?? settings.defaultHumidityUncertaintyPct,
  };
}

/** Judges one point with the engine; a point it cannot judge becomes an issue, not a throw. */
export function evaluateOrIssue(
  issues: Issues,
  field: string,
  meter: Meter,
  conditions: Conditions,
  referenceHz: number,
  certificate: StandardRecord['certificates'][number],
  readings: Reading[],
  rule: DecisionRule,
): PointResult | undefined {
  try {
    return evaluatePoint(
      specOf(meter),
      conditions,
      {
        reference: {
          frequencyHz: referenceHz,
          expandedUncertaintyPpm: certificate.expandedUncertaintyPpm,
          coverageFactor: certificate.coverageFactor,
        },
        readings,
      },
      rule,
    );
  } catch (e) {
    issues.fromParse(
      field,
      undefined,
      `${field}: ${e instanceof Error ? e.message : String(e)}`,
      'readings that can be judged',
    );
    return undefined;
  }
}
