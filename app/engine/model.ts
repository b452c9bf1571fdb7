// Domain types shared by the engine and everything above it. Plain data only:
// no classes, no Date objects (dates are ISO 'YYYY-MM-DD' strings), SI units in names.

export type Direction = 'up' | 'down';
export type DialKind = 'direct' | 'divisions';
export type Construction = 'coaxial' | 'waveguide';
export type MeterState = 'in-service' | 'quarantined' | 'withdrawn';
export type Phase = 'as-found' | 'as-left';
export type Verdict = 'pass' | 'conditional-pass' | 'conditional-fail' | 'fail';

/** ILAC-G8:09/2019 decision rules. */
export type DecisionRule =
  | { kind: 'simple' }
  /** Binary with guard band w: either a multiple of U (w = U is multipleOfU 1) or a fixed width. */
  | { kind: 'guarded'; multipleOfU: number }
  | { kind: 'guarded-fixed'; guardBandPpm: number }
  | { kind: 'non-binary' };

/** Reference (graduation) conditions of a meter's dial. */
export interface ReferenceConditions {
  temperatureC: number;
  pressureHpa: number;
  humidityPct: number;
}

/** Conditions at the bench with their standard uncertainties. */
export interface Conditions {
  temperatureC: number;
  temperatureUncertaintyC: number;
  pressureHpa: number;
  pressureUncertaintyHpa: number;
  humidityPct: number;
  humidityUncertaintyPct: number;
}

/** One row of a divisions meter's calibration chart. */
export interface ChartPoint {
  divisions: number;
  frequencyHz: number;
}

/** What the engine needs to know about a meter to judge a point. */
export interface MeterSpec {
  minHz: number;
  maxHz: number;
  dialKind: DialKind;
  /** Stated accuracy: relative term (1000 ppm = 0.1 % of reading) plus an absolute term. */
  accuracyRelPpm: number;
  accuracyAbsHz: number;
  /** Smallest dial increment, in dial units: Hz for direct-reading, divisions for divisions meters. */
  resolution: number;
  /** Chart for divisions meters (monotone in divisions), absent for direct-reading. */
  chart?: ChartPoint[];
  /** Linear expansion coefficient of the cavity, 1/K, and its standard uncertainty. */
  alphaPerK: number;
  alphaUncertaintyPerK: number;
  reference: ReferenceConditions;
  /** Nominal loaded Q, used for the resonance-setting contribution. */
  loadedQ: number;
  /** Half-width of the band inside which an operator sets the dip, as a fraction of the
   * full width at half depth (f0 / QL). Rectangular. */
  settingFraction: number;
}

/** One reading of the dial, in dial units (Hz or divisions). */
export interface Reading {
  value: number;
  direction: Direction;
}

/** The traceable source used for a point: its value and standard uncertainty. */
export interface ReferenceSource {
  frequencyHz: number;
  /** Relative expanded uncertainty of the source from its certificate, and the coverage factor. */
  expandedUncertaintyPpm: number;
  coverageFactor: number;
}

export interface PointInput {
  reference: ReferenceSource;
  readings: Reading[];
}

export type Distribution = 'normal' | 'rectangular' | 't';

/** One line of a GUM budget (JCGM 100:2008 section 5 and Annex H layout). */
export interface Contribution {
  key:
    | 'reference'
    | 'repeatability'
    | 'resolution'
    | 'hysteresis'
    | 'setting'
    | 'temperature'
    | 'expansion'
    | 'pressure'
    | 'humidity'
    | 'fit'
    /** The reference's deviation found later (an as-found deviation of the standard). */
    | 'reference-deviation';
  label: string;
  type: 'A' | 'B';
  distribution: Distribution;
  /** Unit of the input quantity, e.g. 'Hz', 'degC', 'hPa', '%RH', '1/K'. */
  unit: string;
  /** Standard uncertainty of the input quantity, in `unit`. */
  standardUncertainty: number;
  /** Sensitivity coefficient: Hz of error per `unit`. */
  sensitivity: number;
  /** |sensitivity| * standardUncertainty, in Hz. */
  contributionHz: number;
  /** Degrees of freedom; Infinity for Type B taken as exactly known. */
  dof: number;
}

export interface Budget {
  contributions: Contribution[];
  combinedHz: number;
  /** Welch-Satterthwaite effective degrees of freedom (Infinity if all are infinite). */
  effectiveDof: number;
  coverageFactor: number;
  /** Coverage probability used to find k (0.9545). */
  coverageProbability: number;
  expandedHz: number;
}

export interface Decision {
  rule: DecisionRule;
  verdict: Verdict;
  /** Acceptance limit as a magnitude of error, Hz (tolerance minus guard band). */
  acceptanceLimitHz: number;
  toleranceHz: number;
  guardBandHz: number;
  /** JCGM 106:2012 probability that the true error lies inside the tolerance. */
  probabilityOfConformity: number;
  /** Test uncertainty ratio: tolerance half-width over U. */
  tur: number;
}

export interface PointResult {
  /** Mean of the direction means, in dial units, and as frequency (Hz) through the chart. */
  meanDial: number;
  indicatedHz: number;
  upMeanHz: number | null;
  downMeanHz: number | null;
  /** Correction to reference conditions applied to the indication, ppm of reading. */
  thermalCorrectionPpm: number;
  airCorrectionPpm: number;
  correctedHz: number;
  errorHz: number;
  errorPpm: number;
  budget: Budget;
  expandedPpm: number;
  decision: Decision;
  notes: string[];
}
