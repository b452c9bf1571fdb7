// Input shapes of the sweep method and the resonance fit, validated with zod. A sweep is
// the text of a trace file (read by the client: the command line resolves `file`), or readings typed
// at the bench, plus how to read the level.
import { z } from 'zod';

const finite = (what: string) =>
  z.number(`expected ${what} as a number`).refine(Number.isFinite, `expected ${what} as a finite number`);

export const TraceOptionsSchema = z.object({
  /** What the level is: dB, linear power, detector volts, or real and imaginary S21. */
  level: z.enum(['db', 'linear', 'volts', 'ri'], 'expected "db", "linear", "volts" or "ri"').optional(),
  frequencyUnit: z.enum(['Hz', 'kHz', 'MHz', 'GHz'], 'expected Hz, kHz, MHz or GHz').optional(),
  /** Detector volts: +1 rising with power, -1 negative-going. */
  detectorSign: z.union([z.literal(1), z.literal(-1)], 'expected 1 or -1').optional(),
  detectorOffsetV: finite('detector offset in V').optional(),
  /** The resonance model: chosen from the data (default), the complex Q-circle, or the magnitude dip. */
  model: z.enum(['auto', 'complex', 'magnitude'], 'expected "auto", "complex" or "magnitude"').optional(),
});

export const SweepInputSchema = TraceOptionsSchema.extend({
  /** A trace file named in a document; the command line reads it into `text` and `name`. */
  file: z.string().optional(),
  /** The text of a trace file (Touchstone .s1p/.s2p or delimited) and its name. */
  text: z.string().optional(),
  name: z.string().optional(),
  /** Readings typed at the bench: frequency with unit, detector level. */
  points: z
    .array(
      z.object({
        frequency: z.union([z.string(), z.number()], 'expected a frequency such as "9.3 GHz"'),
        level: finite('detector level'),
      }),
    )
    .optional(),
});
export type SweepInput = z.output<typeof SweepInputSchema>;

/** `dipledger fit`: one trace file, or typed points, fitted on its own; nothing stored. */
export const FitTraceSchema = SweepInputSchema.extend({
  /** 'scalar' fits |S21|^2 of a complex trace with the scalar model (the same as model "magnitude"). */
  method: z.enum(['auto', 'scalar'], 'expected "auto" or "scalar"').default('auto'),
});
export type FitTraceInput = z.input<typeof FitTraceSchema>;

export const ChartQuerySchema = z.object({
  assetId: z.string('expected the meter asset id').trim().min(1, 'expected the meter asset id'),
  /** Step of the printable table, in divisions (default: a tenth of the chart's range, rounded). */
  stepDivisions: finite('table step in divisions').pipe(z.number().gt(0)).optional(),
});
export type ChartQueryInput = z.input<typeof ChartQuerySchema>;
