// One check point from readings to verdict: dial readings -> frequency, direction means, correction
// to reference conditions, error against the reference source, GUM budget, decision.
// Sources: JCGM 100:2008 (GUM) for the budget (see budget.ts), ILAC-G8:09/2019 and JCGM 106:2012
// for the decision (see conformity.ts), ITU-R P.453-14 for the air (see refractivity.ts).
//
// Measurement model: E = f_ind / g(T, P, RH, alpha) - f_ref, with f_ind the mean of the direction
// means of the indication (plus zero-mean terms for repeatability, resolution, hysteresis and
// setting) and g the correction factor of correction.ts.

import type {
  Conditions,
  Contribution,
  DecisionRule,
  Direction,
  MeterSpec,
  PointInput,
  PointResult,
} from './model';
import { createChart, frequencyAtDivisions, slopeHzPerDivision, type MonotoneChart } from './chart';
import { correctToReference, correctionSensitivities, type CorrectionInputs } from './correction';
import { combine, makeContribution, normalFromCertificate, rectangular } from './budget';
import { decide, toleranceHz } from './conformity';

function requireFinite(value: unknown, what: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new Error(`${what} must be a finite number (got ${String(value)})`);
  }
}

function requirePositive(value: unknown, what: string): void {
  requireFinite(value, what);
  if ((value as number) <= 0) throw new Error(`${what} must be positive (got ${String(value)})`);
}

function requireNonNegative(value: unknown, what: string): void {
  requireFinite(value, what);
  if ((value as number) < 0) throw new Error(`${what} must not be negative (got ${String(value)})`);
}

function validate(spec: MeterSpec, conditions: Conditions, point: PointInput): void {
  requirePositive(spec.minHz, 'spec.minHz');
  requirePositive(spec.maxHz, 'spec.maxHz');
  requireNonNegative(spec.accuracyRelPpm, 'spec.accuracyRelPpm');
  requireNonNegative(spec.accuracyAbsHz, 'spec.accuracyAbsHz');
  requireNonNegative(spec.resolution, 'spec.resolution');
  requireFinite(spec.alphaPerK, 'spec.alphaPerK');
  requireNonNegative(spec.alphaUncertaintyPerK, 'spec.alphaUncertaintyPerK');
  requireFinite(spec.reference.temperatureC, 'spec.reference.temperatureC');
  requirePositive(spec.reference.pressureHpa, 'spec.reference.pressureHpa');
  requireNonNegative(spec.reference.humidityPct, 'spec.reference.humidityPct');
  requirePositive(spec.loadedQ, 'spec.loadedQ');
  requireNonNegative(spec.settingFraction, 'spec.settingFraction');
  if (spec.dialKind !== 'direct' && spec.dialKind !== 'divisions') {
    throw new Error(`spec.dialKind must be 'direct' or 'divisions' (got ${String(spec.dialKind)})`);
  }
  requireFinite(conditions.temperatureC, 'conditions.temperatureC');
  requireNonNegative(conditions.temperatureUncertaintyC, 'conditions.temperatureUncertaintyC');
  requirePositive(conditions.pressureHpa, 'conditions.pressureHpa');
  requireNonNegative(conditions.pressureUncertaintyHpa, 'conditions.pressureUncertaintyHpa');
  requireNonNegative(conditions.humidityPct, 'conditions.humidityPct');
  requireNonNegative(conditions.humidityUncertaintyPct, 'conditions.humidityUncertaintyPct');
  if (conditions.humidityPct > 100)
    throw new Error(`conditions.humidityPct must not exceed 100 (got ${conditions.humidityPct})`);
  requirePositive(point.reference.frequencyHz, 'point.reference.frequencyHz');
  requireNonNegative(point.reference.expandedUncertaintyPpm, 'point.reference.expandedUncertaintyPpm');
  requirePositive(point.reference.coverageFactor, 'point.reference.coverageFactor');
  if (!Array.isArray(point.readings) || point.readings.length === 0)
    throw new Error('point.readings: at least one reading is needed');
  point.readings.forEach((r, i) => {
    // The field named only when there is something to say about it.
    // Stryker disable next-line ConditionalExpression: speed-only guard; requireFinite tests the same again
    if (typeof r.value !== 'number' || !Number.isFinite(r.value))
      requireFinite(r.value, `point.readings[${i}].value`);
    if (r.direction !== 'up' && r.direction !== 'down') {
      throw new Error(`point.readings[${i}].direction must be 'up' or 'down' (got ${String(r.direction)})`);
    }
  });
}

function mean(values: readonly number[]): number {
  return values.reduce((s, v) => s + v, 0) / values.length;
}

/** Evaluates one check point. Throws Error on invalid input (the API validates earlier). */
export function evaluatePoint(
  spec: MeterSpec,
  conditions: Conditions,
  point: PointInput,
  rule: DecisionRule,
): PointResult {
  validate(spec, conditions, point);
  const notes: string[] = [];
  const divisionsMeter = spec.dialKind === 'divisions';
  let chart: MonotoneChart | null = null;
  if (divisionsMeter) {
    if (!spec.chart) throw new Error('spec.chart: a divisions meter needs a chart');
    chart = createChart(spec.chart, 'spec.chart');
  }
  const toHz = (dial: number, field: string): number =>
    chart ? frequencyAtDivisions(chart, dial, field) : dial;
  // Every reading must lie on the chart, not only the means: say which one does not.
  if (chart) point.readings.forEach((r, i) => toHz(r.value, `point.readings[${i}]`));

  // Direction means, in dial units, then through the chart.
  const byDirection = new Map<Direction, number[]>();
  for (const r of point.readings) {
    const list = byDirection.get(r.direction) ?? [];
    list.push(r.value);
    byDirection.set(r.direction, list);
  }
  const groups = [...byDirection.values()];
  const up = byDirection.get('up');
  const down = byDirection.get('down');
  const upMeanDial = up ? mean(up) : null;
  const downMeanDial = down ? mean(down) : null;
  const meanDial = mean(groups.map(mean));
  const indicatedHz = toHz(meanDial, 'mean reading');
  const upMeanHz = upMeanDial === null ? null : toHz(upMeanDial, 'mean of up readings');
  const downMeanHz = downMeanDial === null ? null : toHz(downMeanDial, 'mean of down readings');
  const bothDirections = upMeanHz !== null && downMeanHz !== null;
  if (!bothDirections) notes.push('one direction only: hysteresis not evaluated');

  // Correction to reference conditions and the error.
  const inputs: CorrectionInputs = {
    temperatureC: conditions.temperatureC,
    pressureHpa: conditions.pressureHpa,
    humidityPct: conditions.humidityPct,
    alphaPerK: spec.alphaPerK,
  };
  const correction = correctToReference(indicatedHz, inputs, spec.reference);
  const sens = correctionSensitivities(indicatedHz, inputs, spec.reference);
  const referenceHz = point.reference.frequencyHz;
  const errorHz = correction.correctedHz - referenceHz;

  // Lines on the indication are in dial units (Hz for a direct meter, div for a divisions meter)
  // with sensitivity d E/d dial = (dHz/ddiv) / g, so the conversion through the chart is visible.
  const dialUnit = divisionsMeter ? 'div' : 'Hz';
  const hzPerDial = chart ? slopeHzPerDivision(chart, meanDial, 'mean reading') : 1;
  const dialSensitivity = hzPerDial * sens.dReading;

  const lines: Contribution[] = [];
  lines.push(
    normalFromCertificate(
      { key: 'reference', label: 'Reference source (certificate)', unit: 'Hz', sensitivity: -1 },
      (point.reference.expandedUncertaintyPpm * referenceHz) / 1e6,
      point.reference.coverageFactor,
    ),
  );

  // Repeatability: pooled within-direction standard deviation s_p with n - D degrees of freedom.
  // The indication is the mean of D direction means, so u = (s_p / D) sqrt(sum 1/n_d), which is
  // s_p / sqrt(n) when the directions have equal counts.
  const n = point.readings.length;
  const directionCount = groups.length;
  const pooledDof = n - directionCount;
  if (pooledDof > 0) {
    const sumSquares = groups.reduce((s, g) => {
      const m = mean(g);
      return s + g.reduce((a, v) => a + (v - m) * (v - m), 0);
    }, 0);
    const pooledSd = Math.sqrt(sumSquares / pooledDof);
    const u = (pooledSd / directionCount) * Math.sqrt(groups.reduce((s, g) => s + 1 / g.length, 0));
    lines.push(
      makeContribution({
        key: 'repeatability',
        label: `Repeatability (pooled s = ${pooledSd.toPrecision(3)} ${dialUnit}, ${n} readings)`,
        type: 'A',
        distribution: 't',
        unit: dialUnit,
        standardUncertainty: u,
        sensitivity: dialSensitivity,
        dof: pooledDof,
      }),
    );
  } else {
    const values = point.readings.map((r) => r.value);
    const range = Math.max(...values) - Math.min(...values);
    notes.push(
      'one reading per direction: repeatability taken as rectangular with the range of the readings as half-width (no Type A evaluation possible)',
    );
    lines.push(
      rectangular(
        {
          key: 'repeatability',
          label: 'Repeatability (range of readings, rectangular)',
          unit: dialUnit,
          sensitivity: dialSensitivity,
        },
        range,
      ),
    );
  }

  lines.push(
    rectangular(
      {
        key: 'resolution',
        label: `Dial resolution (${spec.resolution} ${dialUnit}, half-width = resolution / 2)`,
        unit: dialUnit,
        sensitivity: dialSensitivity,
      },
      spec.resolution / 2,
    ),
  );

  if (bothDirections) {
    lines.push(
      rectangular(
        {
          key: 'hysteresis',
          label: 'Hysteresis between directions (half the difference of the means)',
          unit: 'Hz',
          sensitivity: sens.dReading,
        },
        Math.abs(upMeanHz - downMeanHz) / 2,
      ),
    );
  }

  lines.push(
    rectangular(
      {
        key: 'setting',
        label: `Setting on the dip (${spec.settingFraction} of f/QL, QL = ${spec.loadedQ})`,
        unit: 'Hz',
        sensitivity: sens.dReading,
      },
      (spec.settingFraction * indicatedHz) / spec.loadedQ,
    ),
  );

  lines.push(
    makeContribution({
      key: 'temperature',
      label: 'Bench temperature (cavity expansion and air index)',
      type: 'B',
      distribution: 'normal',
      unit: 'degC',
      standardUncertainty: conditions.temperatureUncertaintyC,
      sensitivity: sens.dTemperatureHzPerK,
      dof: Infinity,
    }),
    makeContribution({
      key: 'expansion',
      label: 'Expansion coefficient of the cavity',
      type: 'B',
      distribution: 'normal',
      unit: '1/K',
      standardUncertainty: spec.alphaUncertaintyPerK,
      sensitivity: sens.dAlphaHzPerPerK,
      dof: Infinity,
    }),
    makeContribution({
      key: 'pressure',
      label: 'Air pressure (air index)',
      type: 'B',
      distribution: 'normal',
      unit: 'hPa',
      standardUncertainty: conditions.pressureUncertaintyHpa,
      sensitivity: sens.dPressureHzPerHpa,
      dof: Infinity,
    }),
    makeContribution({
      key: 'humidity',
      label: 'Relative humidity (air index)',
      type: 'B',
      distribution: 'normal',
      unit: '%RH',
      standardUncertainty: conditions.humidityUncertaintyPct,
      sensitivity: sens.dHumidityHzPerPct,
      dof: Infinity,
    }),
  );

  const budget = combine(lines);
  const tolerance = toleranceHz(spec, correction.correctedHz);
  const decision = decide(rule, {
    errorHz,
    toleranceHz: tolerance,
    combinedHz: budget.combinedHz,
    expandedHz: budget.expandedHz,
    readingHz: correction.correctedHz,
  });
  if (referenceHz < spec.minHz || referenceHz > spec.maxHz) {
    notes.push("reference frequency lies outside the meter's stated band");
  }
  if (decision.tur < 4) {
    notes.push(`test uncertainty ratio ${decision.tur.toFixed(2)} is below 4`);
  }

  return {
    meanDial,
    indicatedHz,
    upMeanHz,
    downMeanHz,
    thermalCorrectionPpm: correction.thermalCorrectionPpm,
    airCorrectionPpm: correction.airCorrectionPpm,
    correctedHz: correction.correctedHz,
    errorHz,
    errorPpm: (errorHz / referenceHz) * 1e6,
    budget,
    expandedPpm: (budget.expandedHz / referenceHz) * 1e6,
    decision,
    notes,
  };
}
