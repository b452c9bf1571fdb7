// The engine's public surface: pure computation for Dipledger (quantities, air and thermal
// corrections, charts, GUM budgets, ILAC-G8 decisions, one point's evaluation).
// Source: DESIGN.md sections 2 and 4 (the published methods are cited in each module).

export type * from './model';
export { ENGINE_VERSION } from './version';
export {
  BARE_NUMBER_MIN_HZ,
  checkInBand,
  formatFrequency,
  parseDivisions,
  parseFrequencyHz,
  type DivisionsParse,
  type FrequencyParse,
} from './quantity';
export {
  ZERO_CELSIUS_K,
  enhancementFactor,
  refractiveIndex,
  refractivityN,
  refractivityPartials,
  saturationVapourPressureHpa,
  waterVapourPressureHpa,
  type RefractivityPartials,
} from './refractivity';
export { expansionFactor, resonanceShiftFirstOrderPpm, resonanceShiftPpm } from './thermal';
export {
  correctToReference,
  correctedFrequencyHz,
  correctionFactor,
  correctionSensitivities,
  type CorrectionInputs,
  type CorrectionResult,
  type CorrectionSensitivities,
} from './correction';
export {
  ChartError,
  chartProblem,
  createChart,
  divisionsAtFrequency,
  frequencyAtDivisions,
  slopeHzPerDivision,
  type MonotoneChart,
} from './chart';
export {
  DEFAULT_COVERAGE_PROBABILITY,
  coverageFactor,
  normalCdf,
  normalQuantile,
  tQuantile,
} from './distributions';
export {
  combine,
  makeContribution,
  normalFromCertificate,
  rectangular,
  typeA,
  type ContributionInput,
  type ContributionKey,
} from './budget';
export {
  decide,
  guardBandHz,
  probabilityInInterval,
  probabilityOfConformity,
  toleranceHz,
  type DecisionInputs,
} from './conformity';
export { evaluatePoint } from './evaluate';
export {
  deviationAtHz,
  deviationLine,
  rejudgePoint,
  type ReferenceDeviation,
  type RejudgedPoint,
  type StoredPointResult,
} from './impact';
