// The invented demo laboratory as data: who works there, what standards and meters it keeps, and what happens to each meter over twenty years.
// Everything here is fiction: the lab, its address, the people, the calibration bodies and the
// meters are invented; no real organisation, person or instrument model is meant. Values marked
// "common practice" are typical workshop figures, not taken from any one published source.
import type { LabSettingsInput, PersonInput } from '../app/api/schemas';
import type { Construction, MeterState } from '../app/engine/model';

/** The day the story is told from: no record is dated later, due dates are judged against it. */
export const STORY_TODAY = '2026-12-01';

export const LAB: LabSettingsInput = {
  name: 'Kestrel Row Microwave Laboratory',
  address: 'Unit 3, Kestrel Row, Wrenmouth Trading Estate, Wrenmouth',
  accreditation: 'Demonstration data: an invented laboratory with no accreditation.',
  decisionRule: { kind: 'guarded', multipleOfU: 1 },
  reliabilityTarget: 0.95,
  intervalMinMonths: 6,
  intervalMaxMonths: 36,
  defaultTemperatureUncertaintyC: 0.3,
  defaultPressureUncertaintyHpa: 1,
  defaultHumidityUncertaintyPct: 5,
  printSuggestedInterval: false,
};

/** People, with the years they did checks (technicians only) so the performer changes believably. */
export const PEOPLE: (PersonInput & { checksFromYear?: number; checksToYear?: number })[] = [
  { name: 'Alba Quennell', role: 'technician', checksFromYear: 2007, checksToYear: 2019 },
  { name: 'Ravi Ostrander', role: 'technician', checksFromYear: 2013, checksToYear: 2026 },
  { name: 'Maren Holt-Ibsen', role: 'reviewer' },
  { name: 'Dev Castellane', role: 'administrator' },
];

// ---------------------------------------------------------------------------------------------
// Lab standards. Each certificate history is anchored at its newest certificate and built
// backwards, each recalibration a few days before the previous certificate fell due, so every day
// from 2006 on is covered by a valid certificate (the generator checks this).

export interface StoryStandard {
  assetId: string;
  description: string;
  /** Calibration date of the newest certificate; its due date is one year later. */
  newestCalibratedOn: string;
  /** No certificate is generated that starts before this date. */
  historyFrom: string;
  /** Days before the old certificate's due date that the next calibration was done, cycled. */
  earlyDays: number[];
  /** Issuing bodies by the year they took the work over (invented names). */
  issuers: { fromYear: number; name: string; prefix: string }[];
  /** Expanded uncertainty (k = 2) by the year it applied from, ppm. */
  uncertainty: { fromYear: number; expandedPpm: number }[];
  /** Why this standard matters in the story. */
  note: string;
}

export const STANDARDS: StoryStandard[] = [
  {
    assetId: 'STD-01',
    description:
      'Synthesized microwave signal generator, 10 MHz to 40 GHz, phase-locked to the lab 10 MHz reference (GNSS-disciplined oscillator).',
    newestCalibratedOn: '2026-09-14',
    historyFrom: '2006-01-01',
    earlyDays: [9, 14, 6, 11, 17, 8, 12],
    issuers: [
      { fromYear: 2000, name: 'Tessary Calibration Bureau', prefix: 'TCB' },
      { fromYear: 2015, name: 'Ambervale Frequency Metrology', prefix: 'AFM' },
    ],
    uncertainty: [
      { fromYear: 2000, expandedPpm: 0.005 },
      { fromYear: 2014, expandedPpm: 0.002 },
    ],
    note: 'Source for every check from 1 GHz to 40 GHz.',
  },
  {
    assetId: 'STD-02',
    description:
      'Millimetre-wave source, 40 GHz to 110 GHz: synthesized generator with active frequency-multiplier heads, referenced to the lab rubidium standard.',
    newestCalibratedOn: '2026-06-02',
    historyFrom: '2006-01-01',
    earlyDays: [12, 7, 15, 10, 5, 13],
    issuers: [{ fromYear: 2000, name: 'Tessary Calibration Bureau', prefix: 'TCB' }],
    uncertainty: [
      { fromYear: 2000, expandedPpm: 0.05 },
      { fromYear: 2012, expandedPpm: 0.02 },
    ],
    note: 'Source for every check from 40 GHz to 110 GHz.',
  },
  {
    assetId: 'STD-03',
    description:
      'Microwave frequency counter, 10 Hz to 110 GHz with harmonic-mixer heads, rubidium timebase; confirms the source frequency at each point.',
    // Due 2027-01-22: the "due soon" standard as of STORY_TODAY.
    newestCalibratedOn: '2026-01-22',
    historyFrom: '2006-01-01',
    earlyDays: [8, 16, 11, 6, 14, 9, 12],
    issuers: [
      { fromYear: 2000, name: 'Ambervale Frequency Metrology', prefix: 'AFM' },
      { fromYear: 2018, name: 'Tessary Calibration Bureau', prefix: 'TCB' },
    ],
    uncertainty: [
      { fromYear: 2000, expandedPpm: 0.01 },
      { fromYear: 2016, expandedPpm: 0.005 },
    ],
    note: 'Listed on every check; its current certificate falls due on 2027-01-22 (due soon).',
  },
];

// ---------------------------------------------------------------------------------------------
// Meters and what happens to them.

/** Cylindrical TE011-like micrometer cavity: f^2 = A + C / (d - d0)^2, f in GHz, d in divisions. */
export interface Te011Law {
  /** Cut-off term (c x'01 / 2 pi a)^2, GHz^2. */
  aGhz2: number;
  /** Length term (c / 2 per-division length)^2, GHz^2 div^2. */
  cGhz2Div2: number;
  /** Divisions at which the plunger would reach zero cavity length. */
  d0Div: number;
}

export type MeterDial =
  | { kind: 'direct'; resolutionHz: number }
  | {
      kind: 'divisions';
      resolutionDiv: number;
      law: Te011Law;
      /** Chart rows are made at these frequencies (GHz), divisions from the law at 0.01 div; the
       * chart reaches past the band so that a reading at a band edge still falls inside it. */
      chartFrequenciesGhz: number[];
    };

export type StoryRole =
  | 'steady'
  | 'fading-dip'
  | 'overdue'
  | 'stepped'
  | 'drifting'
  | 'chart'
  | 'adjusted'
  | 'quarantined'
  | 'withdrawn';

/** Something that happens to a meter: a shift of its error from a date on, or an adjustment. */
export type StoryEvent =
  /** From `on`, the error shifts by commonPpm plus tiltPpm times (x - 0.5), x = 0 at band bottom, 1 at top. */
  | { kind: 'step'; on: string; commonPpm: number; tiltPpm: number }
  /** At the first check on or after `on`: the dial is re-indexed so the common error becomes residualPpm. */
  | { kind: 'adjust'; on: string; residualPpm: number };

export interface StoryMeter {
  assetId: string;
  role: StoryRole;
  /** One line for the story table. */
  summary: string;
  description: string;
  construction: Construction;
  port: string;
  minGhz: number;
  maxGhz: number;
  dial: MeterDial;
  accuracyRelPpm: number;
  /** Expansion coefficient of the cavity, 1/K, with the material it stands for (common-practice values). */
  alphaPerK: number;
  alphaUncertaintyPerK: number;
  material: string;
  referenceTemperatureC: number;
  loadedQ: number;
  minDipDb: number;
  maxInputPowerW: number;
  location: string;
  state: MeterState;
  intervalMonths: number;
  planGhz: number[];
  schedule: {
    /** Nominal date of the first check; later checks every `everyMonths`, a few days either side. */
    first: string;
    everyMonths: number;
    /** Last nominal check date allowed. */
    until: string;
    /** Unscheduled checks (after a mishap). */
    extra: string[];
  };
  truth: {
    /** Common error at the first check, ppm (indication above the true frequency is positive). */
    initialErrorPpm: number;
    /** Scale change common to the band, ppm per year. */
    driftPpmPerYear: number;
    /** Change of the band tilt per year: error at top minus bottom, ppm per year. */
    tiltPpmPerYearPerBand: number;
    /** Spread of the fixed per-frequency offsets (graduation errors), standard deviation, ppm. */
    pointSpreadPpm: number;
    /** Difference down minus up approach, ppm. */
    hysteresisPpm: number;
    /** Setting noise, standard deviation as a fraction of f / QL / 20. */
    settingNoiseFraction: number;
    /** Dip depth at the first and at the last check, dB (linear in between). */
    dipDb: { first: number; last: number };
  };
  events: StoryEvent[];
  /** Remarks by date: attached to the first check on or after `on`. */
  remarks: { on: string; text: string }[];
}

// Expansion coefficients, common-practice handbook values for the cavity material.
const BRASS = { alphaPerK: 19e-6, alphaUncertaintyPerK: 1e-6, material: 'brass (common practice 19e-6/K)' };
const COPPER = {
  alphaPerK: 17e-6,
  alphaUncertaintyPerK: 1e-6,
  material: 'silver-plated copper (common practice 17e-6/K)',
};
const INVAR = {
  alphaPerK: 1.5e-6,
  alphaUncertaintyPerK: 0.5e-6,
  material: 'invar-lined (common practice 1.5e-6/K)',
};

const BENCH = 'Microwave room, bench 2';
const MMW_BENCH = 'Millimetre-wave bench, cabinet M';

export const METERS: StoryMeter[] = [
  {
    assetId: 'CW-101',
    role: 'steady',
    summary: 'Steady: small slow drift, always well inside 0.1 %.',
    description: 'Coaxial absorption wavemeter, 1 GHz to 2 GHz, direct-reading dial.',
    construction: 'coaxial',
    port: 'N (f) through-line',
    minGhz: 1,
    maxGhz: 2,
    dial: { kind: 'direct', resolutionHz: 50e3 },
    accuracyRelPpm: 1000,
    ...BRASS,
    referenceTemperatureC: 20,
    loadedQ: 1500,
    minDipDb: 1,
    maxInputPowerW: 2,
    location: BENCH,
    state: 'in-service',
    intervalMonths: 12,
    planGhz: [1.0, 1.2, 1.4, 1.6, 1.8, 2.0],
    schedule: { first: '2008-02-12', everyMonths: 12, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: 60,
      driftPpmPerYear: -4,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 25,
      hysteresisPpm: 12,
      settingNoiseFraction: 0.5,
      dipDb: { first: 4.6, last: 4.3 },
    },
    events: [],
    remarks: [],
  },
  {
    assetId: 'CW-102',
    role: 'fading-dip',
    summary:
      'Dip fades from about 4 dB to 1.2 dB as the silver plating tarnishes; frequency error stays small.',
    description: 'Coaxial absorption wavemeter, 2 GHz to 4 GHz, direct-reading dial, silver-plated cavity.',
    construction: 'coaxial',
    port: 'N (f) through-line',
    minGhz: 2,
    maxGhz: 4,
    dial: { kind: 'direct', resolutionHz: 100e3 },
    accuracyRelPpm: 1000,
    ...COPPER,
    referenceTemperatureC: 20,
    loadedQ: 2000,
    minDipDb: 1,
    maxInputPowerW: 2,
    location: BENCH,
    state: 'in-service',
    intervalMonths: 12,
    planGhz: [2.0, 2.5, 3.0, 3.5, 4.0],
    schedule: { first: '2009-05-06', everyMonths: 12, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: -40,
      driftPpmPerYear: 6,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 20,
      hysteresisPpm: 10,
      settingNoiseFraction: 0.5,
      dipDb: { first: 4.0, last: 1.2 },
    },
    events: [],
    remarks: [
      {
        on: '2018-01-01',
        text: 'Dip visibly shallower than on earlier checks; plating dull near the coupling loop.',
      },
      {
        on: '2022-01-01',
        text: 'Dip under 2 dB at the top of the band; readings take longer to set. Replating to be quoted.',
      },
      {
        on: '2025-01-01',
        text: 'Dip about 1.2 dB, close to the 1 dB minimum. Replating requested; use with a sensitive detector.',
      },
    ],
  },
  {
    assetId: 'CW-103',
    role: 'overdue',
    summary:
      'Invar-lined, very stable, 24-month interval; last checked April 2024, so overdue since April 2026.',
    description: 'Coaxial absorption wavemeter, 4 GHz to 8 GHz, direct-reading dial, invar-lined cavity.',
    construction: 'coaxial',
    port: 'SMA (f) through-line',
    minGhz: 4,
    maxGhz: 8,
    dial: { kind: 'direct', resolutionHz: 200e3 },
    accuracyRelPpm: 1000,
    ...INVAR,
    referenceTemperatureC: 20,
    loadedQ: 2500,
    minDipDb: 1,
    maxInputPowerW: 1,
    location: 'Store room, shelf B (on loan to the field team)',
    state: 'in-service',
    intervalMonths: 24,
    planGhz: [4.0, 4.8, 5.6, 6.4, 7.2, 8.0],
    schedule: { first: '2008-04-15', everyMonths: 24, until: '2024-05-01', extra: [] },
    truth: {
      initialErrorPpm: 30,
      driftPpmPerYear: 3,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 15,
      hysteresisPpm: 6,
      settingNoiseFraction: 0.5,
      dipDb: { first: 3.8, last: 3.6 },
    },
    events: [],
    remarks: [{ on: '2024-01-01', text: 'Checked before going out on loan to the field team.' }],
  },
  {
    assetId: 'WG-201',
    role: 'stepped',
    summary:
      'Dropped on 2019-03-28: unscheduled check finds a +650 ppm step; dial re-indexed (adjusted), then drifts as before.',
    description: 'Waveguide absorption wavemeter, 8.2 GHz to 12.4 GHz, direct-reading dial.',
    construction: 'waveguide',
    port: 'WR-90',
    minGhz: 8.2,
    maxGhz: 12.4,
    dial: { kind: 'direct', resolutionHz: 200e3 },
    accuracyRelPpm: 1000,
    ...BRASS,
    referenceTemperatureC: 20,
    loadedQ: 3000,
    minDipDb: 1,
    maxInputPowerW: 10,
    location: BENCH,
    state: 'in-service',
    intervalMonths: 12,
    planGhz: [8.2, 8.8, 9.3, 10.0, 10.7, 11.5, 12.4],
    schedule: { first: '2008-09-09', everyMonths: 12, until: '2026-11-30', extra: ['2019-04-03'] },
    truth: {
      initialErrorPpm: -20,
      driftPpmPerYear: 5,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 20,
      hysteresisPpm: 10,
      settingNoiseFraction: 0.5,
      dipDb: { first: 5.0, last: 4.7 },
    },
    events: [
      { kind: 'step', on: '2019-03-28', commonPpm: 650, tiltPpm: 80 },
      { kind: 'adjust', on: '2019-04-03', residualPpm: 15 },
    ],
    remarks: [
      {
        on: '2019-04-03',
        text: 'Unscheduled check: meter fell from the bench trolley on 2019-03-28. As-found shift of about +650 ppm; dial re-indexed at 10 GHz and rechecked (as-left).',
      },
    ],
  },
  {
    assetId: 'WG-202',
    role: 'drifting',
    summary:
      'Drifts about +50 ppm a year, never adjusted; the latest check sits at 80-95 % of the 0.1 % tolerance.',
    description: 'Waveguide absorption wavemeter, 12.4 GHz to 18 GHz, direct-reading dial.',
    construction: 'waveguide',
    port: 'WR-62',
    minGhz: 12.4,
    maxGhz: 18,
    dial: { kind: 'direct', resolutionHz: 500e3 },
    accuracyRelPpm: 1000,
    ...BRASS,
    referenceTemperatureC: 20,
    loadedQ: 3500,
    minDipDb: 1,
    maxInputPowerW: 5,
    location: BENCH,
    state: 'in-service',
    intervalMonths: 12,
    planGhz: [12.4, 13.5, 14.5, 15.5, 16.5, 17.3, 18.0],
    schedule: { first: '2010-01-19', everyMonths: 12, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: 40,
      driftPpmPerYear: 50,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 12,
      hysteresisPpm: 8,
      settingNoiseFraction: 0.5,
      dipDb: { first: 4.4, last: 4.1 },
    },
    events: [],
    remarks: [
      { on: '2022-01-01', text: 'Error keeps rising by about 50 ppm a year; watch the trend.' },
      {
        on: '2026-01-01',
        text: 'Largest error now above 80 % of the stated accuracy; adjustment or a shorter interval to be decided.',
      },
    ],
  },
  {
    assetId: 'WG-203',
    role: 'chart',
    summary:
      'Micrometer TE011 cavity read in divisions through a 20-row chart (17.5 GHz to 27 GHz); slow negative drift.',
    description:
      'Waveguide cavity wavemeter, 18 GHz to 26.5 GHz, TE011 mode, micrometer read in divisions (0.002 mm each) with a calibration chart.',
    construction: 'waveguide',
    port: 'WR-42',
    minGhz: 18,
    maxGhz: 26.5,
    dial: {
      kind: 'divisions',
      resolutionDiv: 0.1,
      // Cut-off 15 GHz (radius about 12.2 mm); c / (2 x 0.002 mm) = 74948 GHz div.
      law: { aGhz2: 225, cGhz2Div2: 74948 ** 2, d0Div: 8500 },
      chartFrequenciesGhz: [
        17.5, 18, 18.5, 19, 19.5, 20, 20.5, 21, 21.5, 22, 22.5, 23, 23.5, 24, 24.5, 25, 25.5, 26, 26.5, 27,
      ],
    },
    accuracyRelPpm: 1000,
    ...COPPER,
    referenceTemperatureC: 20,
    loadedQ: 5000,
    minDipDb: 1,
    maxInputPowerW: 2,
    location: BENCH,
    state: 'in-service',
    intervalMonths: 12,
    planGhz: [18, 19, 20, 21, 22, 23, 24, 25, 26, 26.5],
    schedule: { first: '2007-06-18', everyMonths: 12, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: 30,
      driftPpmPerYear: -8,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 15,
      hysteresisPpm: 5,
      settingNoiseFraction: 0.5,
      dipDb: { first: 6.0, last: 5.6 },
    },
    events: [],
    remarks: [],
  },
  {
    assetId: 'WG-204',
    role: 'steady',
    summary: 'Ka-band meter on a 24-month interval; steady drift of about +12 ppm a year against 0.2 %.',
    description: 'Waveguide absorption wavemeter, 26.5 GHz to 40 GHz, direct-reading dial.',
    construction: 'waveguide',
    port: 'WR-28',
    minGhz: 26.5,
    maxGhz: 40,
    dial: { kind: 'direct', resolutionHz: 1e6 },
    accuracyRelPpm: 2000,
    ...BRASS,
    referenceTemperatureC: 20,
    loadedQ: 2500,
    minDipDb: 1,
    maxInputPowerW: 2,
    location: MMW_BENCH,
    state: 'in-service',
    intervalMonths: 24,
    planGhz: [26.5, 28, 30, 32, 34, 36, 38, 40],
    schedule: { first: '2010-03-02', everyMonths: 24, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: -80,
      driftPpmPerYear: 12,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 30,
      hysteresisPpm: 15,
      settingNoiseFraction: 0.5,
      dipDb: { first: 3.5, last: 3.3 },
    },
    events: [],
    remarks: [],
  },
  {
    assetId: 'WG-205',
    role: 'adjusted',
    summary:
      'Fast drift (+90 ppm a year) against 0.3 %; re-indexed in 2018 under the lab policy, drifting again since.',
    description: 'Waveguide absorption wavemeter, 40 GHz to 60 GHz, direct-reading dial.',
    construction: 'waveguide',
    port: 'WR-19',
    minGhz: 40,
    maxGhz: 60,
    dial: { kind: 'direct', resolutionHz: 2e6 },
    accuracyRelPpm: 3000,
    ...COPPER,
    referenceTemperatureC: 20,
    loadedQ: 2000,
    minDipDb: 1,
    maxInputPowerW: 0.5,
    location: MMW_BENCH,
    state: 'in-service',
    intervalMonths: 12,
    planGhz: [40, 43, 46, 50, 54, 57, 60],
    schedule: { first: '2011-02-08', everyMonths: 12, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: 150,
      driftPpmPerYear: 90,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 40,
      hysteresisPpm: 20,
      settingNoiseFraction: 0.5,
      dipDb: { first: 3.2, last: 3.0 },
    },
    events: [{ kind: 'adjust', on: '2018-01-01', residualPpm: 20 }],
    remarks: [
      {
        on: '2018-01-01',
        text: 'As-found error above 25 % of the stated accuracy: dial re-indexed at 50 GHz per lab policy; as-left points recorded.',
      },
    ],
  },
  {
    assetId: 'WG-206',
    role: 'quarantined',
    summary:
      'Dial coupling slips in 2026: errors up to about 4000 ppm at the top of the band against 0.3 %; quarantined.',
    description: 'Waveguide absorption wavemeter, 50 GHz to 75 GHz, direct-reading dial.',
    construction: 'waveguide',
    port: 'WR-15',
    minGhz: 50,
    maxGhz: 75,
    dial: { kind: 'direct', resolutionHz: 2e6 },
    accuracyRelPpm: 3000,
    ...BRASS,
    referenceTemperatureC: 20,
    loadedQ: 1800,
    minDipDb: 1,
    maxInputPowerW: 0.5,
    location: 'Quarantine shelf, store room',
    state: 'quarantined',
    intervalMonths: 12,
    planGhz: [50, 54, 58, 62, 66, 70, 75],
    schedule: { first: '2010-07-13', everyMonths: 12, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: 100,
      driftPpmPerYear: 20,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 40,
      hysteresisPpm: 20,
      settingNoiseFraction: 0.5,
      dipDb: { first: 3.0, last: 2.8 },
    },
    events: [{ kind: 'step', on: '2026-05-01', commonPpm: 2500, tiltPpm: 2400 }],
    remarks: [
      {
        on: '2026-05-01',
        text: 'Dial coupling slips under the knob; as-found errors outside the stated accuracy above about 65 GHz. Meter quarantined pending repair.',
      },
    ],
  },
  {
    assetId: 'WG-207',
    role: 'steady',
    summary: 'W-band, invar-lined, graduated at 23 degC, 24-month interval, 0.5 %; slow negative drift.',
    description:
      'Waveguide absorption wavemeter, 75 GHz to 110 GHz, direct-reading dial, invar-lined cavity.',
    construction: 'waveguide',
    port: 'WR-10',
    minGhz: 75,
    maxGhz: 110,
    dial: { kind: 'direct', resolutionHz: 5e6 },
    accuracyRelPpm: 5000,
    ...INVAR,
    referenceTemperatureC: 23,
    loadedQ: 1200,
    minDipDb: 1,
    maxInputPowerW: 0.2,
    location: MMW_BENCH,
    state: 'in-service',
    intervalMonths: 24,
    planGhz: [75, 80, 85, 90, 95, 100, 105, 110],
    schedule: { first: '2012-10-16', everyMonths: 24, until: '2026-11-30', extra: [] },
    truth: {
      initialErrorPpm: 200,
      driftPpmPerYear: -15,
      tiltPpmPerYearPerBand: 0,
      pointSpreadPpm: 60,
      hysteresisPpm: 30,
      settingNoiseFraction: 0.5,
      dipDb: { first: 2.6, last: 2.4 },
    },
    events: [],
    remarks: [],
  },
  {
    assetId: 'WG-208',
    role: 'withdrawn',
    summary:
      'Older X-band meter: drift and a growing tilt take the top of the band out of tolerance in 2017; withdrawn.',
    description: 'Waveguide absorption wavemeter, 8.2 GHz to 12.4 GHz, direct-reading dial (older unit).',
    construction: 'waveguide',
    port: 'WR-90',
    minGhz: 8.2,
    maxGhz: 12.4,
    dial: { kind: 'direct', resolutionHz: 500e3 },
    accuracyRelPpm: 1000,
    ...BRASS,
    referenceTemperatureC: 20,
    loadedQ: 2200,
    minDipDb: 1,
    maxInputPowerW: 10,
    location: 'Withdrawn: store room, disposal shelf',
    state: 'withdrawn',
    intervalMonths: 12,
    planGhz: [8.2, 9.0, 10.0, 11.0, 12.4],
    schedule: { first: '2007-03-06', everyMonths: 12, until: '2017-04-01', extra: [] },
    truth: {
      initialErrorPpm: 150,
      driftPpmPerYear: 60,
      tiltPpmPerYearPerBand: 55,
      pointSpreadPpm: 15,
      hysteresisPpm: 25,
      settingNoiseFraction: 0.5,
      dipDb: { first: 3.4, last: 2.6 },
    },
    events: [],
    remarks: [
      {
        on: '2017-01-01',
        text: 'As-found out of tolerance at the top of the band (12.4 GHz); plunger contact fingers worn. Not economic to repair: meter withdrawn.',
      },
    ],
  },
];
