// Input shapes of the LabApi, validated with zod. Shapes only: meaning that needs the lab's
// records (units against a meter's band, known meters and standards, dates against the
// clock) is checked in service.ts, and reported in the same LabError form.
import { z } from 'zod';
import { SweepInputSchema } from './schemas-sweep';

const isoDate = z.iso.date('expected a date as YYYY-MM-DD');
const nonEmpty = (what: string) => z.string(`expected ${what}`).trim().min(1, `expected ${what}, not empty`);
const finite = (what: string) =>
  z.number(`expected ${what} as a number`).refine(Number.isFinite, `expected ${what} as a finite number`);

/** A frequency as typed: '9.3 GHz', '9300MHz', '9.3e9 Hz', or a number in Hz. Parsed in the service. */
export const FrequencyText = z.union([z.string(), z.number()], 'expected a frequency such as "9.3 GHz"');

export const DecisionRuleSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('simple') }),
    z.object({
      kind: z.literal('guarded'),
      multipleOfU: finite('multiple of U').pipe(z.number().min(0).max(3)),
    }),
    z.object({
      kind: z.literal('guarded-fixed'),
      guardBandPpm: finite('guard band in ppm').pipe(z.number().min(0)),
    }),
    z.object({ kind: z.literal('non-binary') }),
  ],
  'expected a decision rule: simple, guarded, guarded-fixed or non-binary',
);

export const LabSettingsSchema = z.strictObject({
  name: nonEmpty('the lab name'),
  address: z.string().default(''),
  accreditation: z.string().default(''),
  decisionRule: DecisionRuleSchema.default({ kind: 'guarded', multipleOfU: 1 }),
  reliabilityTarget: finite('reliability target').pipe(z.number().gt(0.5).lt(1)).default(0.95),
  intervalMinMonths: z.int('expected whole months').min(1).max(120).default(6),
  intervalMaxMonths: z.int('expected whole months').min(1).max(240).default(60),
  defaultTemperatureUncertaintyC: finite('temperature uncertainty')
    .pipe(z.number().min(0).max(10))
    .default(0.3),
  defaultPressureUncertaintyHpa: finite('pressure uncertainty').pipe(z.number().min(0).max(50)).default(1),
  defaultHumidityUncertaintyPct: finite('humidity uncertainty').pipe(z.number().min(0).max(50)).default(5),
  printSuggestedInterval: z.boolean().default(false),
  signersMustDiffer: z.boolean('expected true or false').default(true),
  traceabilityPolicy: z.enum(['strict', 'permissive'], 'expected "strict" or "permissive"').default('strict'),
});
export type LabSettingsInput = z.input<typeof LabSettingsSchema>;

const ChartPointSchema = z.object({
  divisions: finite('dial divisions'),
  frequency: FrequencyText,
});

export const MeterSchema = z.strictObject({
  assetId: nonEmpty('an asset id').pipe(z.string().max(40)),
  description: z.string().default(''),
  construction: z.enum(['coaxial', 'waveguide'], 'expected "coaxial" or "waveguide"'),
  port: z.string().default(''),
  min: FrequencyText,
  max: FrequencyText,
  dialKind: z.enum(['direct', 'divisions'], 'expected "direct" or "divisions"'),
  accuracyRelPpm: finite('relative accuracy in ppm').pipe(
    z
      .number()
      .gt(0, 'expected a relative accuracy above 0 ppm')
      .max(1e6, 'expected a relative accuracy of at most 1,000,000 ppm (100 %)'),
  ),
  accuracyAbs: FrequencyText.default('0 Hz'),
  /** Dial resolution: a frequency for direct-reading meters, a number of divisions otherwise. */
  resolution: z.union([z.string(), z.number()]),
  chart: z.array(ChartPointSchema).default([]),
  alphaPerK: finite('expansion coefficient in 1/K').pipe(z.number().min(-1e-4).max(1e-4)),
  alphaUncertaintyPerK: finite('uncertainty of the expansion coefficient')
    .pipe(z.number().min(0))
    .default(1e-6),
  reference: z
    .object({
      temperatureC: finite('reference temperature').pipe(z.number().min(-20).max(60)),
      pressureHpa: finite('reference pressure').pipe(z.number().min(500).max(1100)),
      humidityPct: finite('reference humidity').pipe(z.number().min(0).max(100)),
    })
    .default({ temperatureC: 20, pressureHpa: 1013.25, humidityPct: 50 }),
  loadedQ: finite('loaded Q').pipe(z.number().min(10).max(1e6)).default(1500),
  settingFraction: finite('setting fraction').pipe(z.number().min(0).max(1)).default(0.05),
  minDipDb: finite('minimum dip depth in dB').pipe(z.number().min(0)).default(1),
  maxInputPowerW: finite('maximum input power in W').pipe(z.number().gt(0)).default(1),
  location: z.string().default(''),
  state: z.enum(['in-service', 'quarantined', 'withdrawn']).default('in-service'),
  intervalMonths: z
    .int('expected whole months')
    .min(1, 'expected an interval of at least 1 month')
    .max(240, 'expected an interval of at most 240 months')
    .default(12),
  plan: z.array(FrequencyText).default([]),
});
export type MeterInput = z.input<typeof MeterSchema>;

export const MeterStateSchema = z.object({
  assetId: nonEmpty('the meter asset id'),
  state: z.enum(['in-service', 'quarantined', 'withdrawn'], 'expected in-service, quarantined or withdrawn'),
  reason: nonEmpty('the reason for the change').pipe(z.string().min(3, 'expected a reason of a few words')),
});
export type MeterStateInput = z.input<typeof MeterStateSchema>;

export const StandardCertificateSchema = z.strictObject({
  certificateId: nonEmpty('the certificate number'),
  issuedBy: nonEmpty('the issuing body'),
  calibratedOn: isoDate,
  dueOn: isoDate,
  /** Relative expanded uncertainty of the source's frequency, from its certificate. */
  expandedUncertaintyPpm: finite('expanded uncertainty in ppm').pipe(z.number().gt(0).max(1000)),
  coverageFactor: finite('coverage factor').pipe(z.number().min(1).max(10)).default(2),
  /** The deviation the issuing body found before adjusting, ppm, where the certificate reports one. */
  asFoundPpm: finite('as-found deviation in ppm').pipe(z.number().min(-1e6).max(1e6)).optional(),
});

export const StandardSchema = z.strictObject({
  assetId: nonEmpty('an asset id').pipe(z.string().max(40)),
  description: z.string().default(''),
  kind: z.enum(['source', 'counter', 'other'], 'expected "source", "counter" or "other"').default('source'),
  /** Its frequency range, where given (both or neither). */
  min: FrequencyText.optional(),
  max: FrequencyText.optional(),
  /** Its calibration history, any order; each check uses the one valid on the check date. */
  certificates: z.array(StandardCertificateSchema).min(1, 'expected at least one certificate'),
});
export type StandardInput = z.input<typeof StandardSchema>;

export const PersonSchema = z.strictObject({
  name: nonEmpty('a name').pipe(z.string().max(80)),
  role: z.enum(['technician', 'reviewer', 'administrator'], 'expected technician, reviewer or administrator'),
});
export type PersonInput = z.input<typeof PersonSchema>;

export const ReadingSchema = z.object({
  /** A frequency with unit (direct-reading meters) or divisions (number, or text ending in "div"). */
  value: z.union([z.string(), z.number()], 'expected a reading'),
  direction: z.enum(['up', 'down'], 'expected "up" or "down" (direction of approach)'),
});

export const ConditionsSchema = z.object({
  temperatureC: finite('temperature in degC').pipe(
    z.number().min(0, 'expected 0 to 50 degC').max(50, 'expected 0 to 50 degC'),
  ),
  temperatureUncertaintyC: finite('temperature uncertainty').pipe(z.number().min(0).max(10)).optional(),
  pressureHpa: finite('pressure in hPa').pipe(
    z.number().min(500, 'expected 500 to 1100 hPa').max(1100, 'expected 500 to 1100 hPa'),
  ),
  pressureUncertaintyHpa: finite('pressure uncertainty').pipe(z.number().min(0).max(50)).optional(),
  humidityPct: finite('relative humidity in %').pipe(
    z.number().min(0, 'expected 0 to 100 %').max(100, 'expected 0 to 100 %'),
  ),
  humidityUncertaintyPct: finite('humidity uncertainty').pipe(z.number().min(0).max(50)).optional(),
});

/** A refusal at one key of the object being refined. A function of the module, not a closure made
 * per refinement: under tsx every named closure is also given its name at run time, which cost
 * more than the check (issue 8: 11 points per check). */
function issueAt(ctx: z.RefinementCtx, path: string, message: string): void {
  ctx.addIssue({ code: 'custom', path: [path], message });
}

export const CheckPointSchema = z
  .object({
    phase: z.enum(['as-found', 'as-left'], 'expected "as-found" or "as-left"').default('as-found'),
    /** Required for tune-to-dip points; a swept point takes its reference from the fitted resonance. */
    reference: FrequencyText.optional(),
    /** Asset id of the lab standard that supplied the reference; defaults to the first listed. */
    standard: z.string().optional(),
    readings: z.array(ReadingSchema).default([]),
    /** Depth of the dip seen on the detector at this point, dB (health of the cavity). */
    dipDepthDb: finite('dip depth in dB').pipe(z.number().min(0).max(60)).optional(),
    // Sweep method (schemas-sweep.ts): the graduation the dial was set to, and the swept trace.
    dialSetting: z.union([z.string(), z.number()], 'expected a dial graduation').optional(),
    sweep: SweepInputSchema.optional(),
  })
  .superRefine((p, ctx) => {
    if (p.sweep === undefined) {
      if (p.reference === undefined) issueAt(ctx, 'reference', 'expected a frequency such as "9.3 GHz"');
      if (p.readings.length < 2) issueAt(ctx, 'readings', 'expected at least two readings per point');
      if (p.dialSetting !== undefined)
        issueAt(ctx, 'dialSetting', 'expected a sweep with a dial setting (sweep method)');
      return;
    }
    if (p.dialSetting === undefined)
      issueAt(ctx, 'dialSetting', 'expected the graduation the dial was set to');
    if (p.readings.length > 0)
      issueAt(ctx, 'readings', 'expected no readings on a swept point (the sweep is the reading)');
    if (p.reference !== undefined)
      issueAt(
        ctx,
        'reference',
        'expected no reference on a swept point (the fitted resonance is the reference)',
      );
  });

/** The exchange document: one check of one meter (format "dipledger.check/1"). */
export const CheckDocumentSchema = z.object({
  format: z.literal('dipledger.check/1', 'expected format "dipledger.check/1"'),
  meter: nonEmpty('the meter asset id'),
  date: isoDate,
  performer: nonEmpty("the performer's name"),
  standards: z.array(nonEmpty('a lab standard asset id')).min(1, 'expected at least one lab standard'),
  method: z.enum(['tune-to-dip', 'sweep']).default('tune-to-dip'),
  conditions: ConditionsSchema,
  adjusted: z.boolean().default(false),
  remarks: z.string().default(''),
  points: z.array(CheckPointSchema).min(1, 'expected at least one point'),
});
/** A document as callers type it: tune-to-dip points need their reference and readings. Swept
 * points are accepted at run time too; type a document holding them as SweptCheckDocumentInput. */
export type CheckDocumentInput = Omit<z.input<typeof CheckDocumentSchema>, 'points'> & {
  points: (z.input<typeof CheckPointSchema> & {
    reference: z.input<typeof FrequencyText>;
    readings: z.input<typeof ReadingSchema>[];
  })[];
};
/** A document with points by the sweep method (dialSetting and sweep, no reference or readings). */
export type SweptCheckDocumentInput = Omit<z.input<typeof CheckDocumentSchema>, 'points'> & {
  points: z.input<typeof CheckPointSchema>[];
};
export type CheckDocument = z.output<typeof CheckDocumentSchema>;

/** One point judged on its own: a meter (from the lab, or its spec inline), conditions, and either
 * the reference with readings (tune to the dip) or the dial setting with its swept trace. */
export const BudgetDocumentSchema = z
  .object({
    format: z.literal('dipledger.budget/1', 'expected format "dipledger.budget/1"'),
    meter: nonEmpty('the meter asset id'),
    standard: nonEmpty('a lab standard asset id'),
    conditions: ConditionsSchema,
    reference: FrequencyText.optional(),
    readings: z.array(ReadingSchema).optional(),
    // Sweep method: the graduation the dial was set to, and the trace swept across the dip there.
    dialSetting: z.union([z.string(), z.number()], 'expected a dial graduation').optional(),
    sweep: SweepInputSchema.optional(),
    decisionRule: DecisionRuleSchema.optional(),
  })
  .superRefine((d, ctx) => {
    const issue = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message });
    if (d.sweep === undefined) {
      if (d.reference === undefined) issue('reference', 'expected a frequency such as "9.3 GHz"');
      if ((d.readings ?? []).length < 2) issue('readings', 'expected at least two readings');
      return;
    }
    if (d.dialSetting === undefined) issue('dialSetting', 'expected the graduation the dial was set to');
    if (d.readings !== undefined && d.readings.length > 0)
      issue('readings', 'expected no readings with a sweep (the sweep is the reading)');
    if (d.reference !== undefined)
      issue('reference', 'expected no reference with a sweep (the fitted resonance is the reference)');
  });
export type BudgetDocumentInput = z.input<typeof BudgetDocumentSchema>;

export const AirSchema = z.object({
  temperatureC: finite('temperature in degC').pipe(z.number().min(-40).max(60)),
  humidityPct: finite('relative humidity in %').pipe(z.number().min(0).max(100)),
  pressureHpa: finite('pressure in hPa').pipe(z.number().min(300).max(1100)),
});
export type AirInput = z.input<typeof AirSchema>;
