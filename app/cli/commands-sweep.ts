// `dipledger fit FILE` (every dip of a sweep with its figures), `dipledger chart REF` (a divisions
// meter's dial chart) and `dipledger sweeps REF` (a meter's swept points over time). Thin over the
// LabApi; the record command uses resolveSweepFiles to read trace files a document names.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { LabError } from '../api/errors';
import { fitTraceOf } from '../api/ops/sweep';
import type { DipFit } from '../engine/resonance';
import { formatFrequency } from '../engine';
import type { CommandGroup } from './command';
import { UsageError, fmt, numberOption, table } from './format';
import { decimal, significant, plain } from '../model/quantity-format';

const LEVELS = ['db', 'linear', 'volts', 'ri'] as const;
const UNITS = ['Hz', 'kHz', 'MHz', 'GHz'] as const;
const MODELS = ['auto', 'complex', 'magnitude'] as const;

function readText(file: string, cwd: string, field: string): string {
  try {
    return readFileSync(path.resolve(cwd, file), 'utf8');
  } catch {
    throw LabError.field(field, file, 'a readable trace file', `${field}: cannot read ${file}`);
  }
}

/**
 * Replaces each `sweep.file` of a check document by the file's text (paths relative to the
 * document's folder), so the service, which reads no files, gets the trace itself.
 */
export function resolveSweepFiles(doc: unknown, documentDir: string): unknown {
  if (!doc || typeof doc !== 'object' || !Array.isArray((doc as { points?: unknown }).points)) return doc;
  const points = (doc as { points: unknown[] }).points.map((p, i) => {
    const sweep = (p as { sweep?: unknown } | null)?.sweep;
    if (!sweep || typeof sweep !== 'object') return p;
    const file = (sweep as { file?: unknown }).file;
    if (typeof file !== 'string' || (sweep as { text?: unknown }).text !== undefined) return p;
    const text = readText(file, documentDir, `points[${i}].sweep.file`);
    return {
      ...(p as object),
      sweep: { ...sweep, text, name: (sweep as { name?: unknown }).name ?? path.basename(file) },
    };
  });
  return { ...doc, points };
}

/** The same for a budget document's one swept point (`sweep.file` at the top level). */
export function resolveBudgetSweepFile(doc: unknown, documentDir: string): unknown {
  const sweep = (doc as { sweep?: unknown } | null)?.sweep;
  if (!sweep || typeof sweep !== 'object') return doc;
  const file = (sweep as { file?: unknown }).file;
  if (typeof file !== 'string' || (sweep as { text?: unknown }).text !== undefined) return doc;
  const text = readText(file, documentDir, 'sweep.file');
  return {
    ...(doc as object),
    sweep: { ...sweep, text, name: (sweep as { name?: unknown }).name ?? path.basename(file) },
  };
}

function dipRows(fits: { role: string; fit: DipFit }[]): string {
  return table(
    ['dip', 'f0', 'u(f0)', 'QL', 'u(QL)', 'depth', 'FWHD', 'two tones', 'Q0', 'Qe'],
    fits.map(({ role, fit: d }) => [
      role,
      formatFrequency(d.f0Hz, 10),
      formatFrequency(d.f0UncertaintyHz, 3),
      decimal(d.loadedQ, 0),
      significant(d.loadedQUncertainty, 2),
      `${decimal(d.depthDb, 2)} dB`,
      formatFrequency(d.halfDepthBandwidthHz, 4),
      formatFrequency(d.twoToneResolutionHz, 4),
      d.unloadedQ === null ? '-' : significant(d.unloadedQ, 4),
      d.externalQ === null ? '-' : significant(d.externalQ, 4),
    ]),
    [3, 4, 5],
  );
}

export const sweepCommands: CommandGroup = {
  usage: `  fit FILE [--level db|linear|volts|ri] [--unit GHz] [--detector-sign -1] [--detector-offset V]
      [--model auto|complex|magnitude] [--scalar]
                                     resonance fit of a sweep (.s2p, .s1p or delimited): every dip;
                                     the model is chosen from the data unless asked (--scalar is
                                     --model magnitude)
  chart REF [--step DIV]             a divisions meter's dial chart, fitted from its newest check
  sweeps REF                         a meter's swept points: resonance, Q, depth, spurious dips
`,
  options: {
    level: { type: 'string' },
    unit: { type: 'string' },
    'detector-sign': { type: 'string' },
    'detector-offset': { type: 'string' },
    scalar: { type: 'boolean', default: false },
    model: { type: 'string' },
    step: { type: 'string' },
  },
  commands: {
    async fit(ctx) {
      const file = ctx.arg('FILE');
      const text = readText(file, ctx.io.cwd, 'FILE');
      const level = ctx.values.level as string | undefined;
      if (level !== undefined && !(LEVELS as readonly string[]).includes(level))
        throw new UsageError(`--level must be one of ${LEVELS.join(', ')}`);
      const unit = ctx.values.unit as string | undefined;
      if (unit !== undefined && !(UNITS as readonly string[]).includes(unit))
        throw new UsageError(`--unit must be one of ${UNITS.join(', ')}`);
      const model = ctx.values.model as string | undefined;
      if (model !== undefined && !(MODELS as readonly string[]).includes(model))
        throw new UsageError(`--model must be one of ${MODELS.join(', ')}`);
      const sign = numberOption('detector-sign', ctx.values['detector-sign'] as string | undefined, false);
      const offset = numberOption(
        'detector-offset',
        ctx.values['detector-offset'] as string | undefined,
        false,
      );
      // A fit needs no lab file: it is computed on its own, nothing is stored.
      const r = fitTraceOf({
        text,
        name: path.basename(file),
        level: level as (typeof LEVELS)[number] | undefined,
        frequencyUnit: unit as (typeof UNITS)[number] | undefined,
        detectorSign: sign as 1 | -1 | undefined,
        detectorOffsetV: offset,
        method: ctx.values.scalar ? 'scalar' : 'auto',
        model: model as (typeof MODELS)[number] | undefined,
      });
      // The plot is for drawing; the command line prints the fit and the thinned trace stays out.
      const printed: Omit<typeof r, 'plot'> & { plot?: unknown } = { ...r };
      delete printed.plot;
      ctx.print(printed, () => {
        const m = r.report.main;
        const lines = [
          `${path.basename(file)}: ${r.description}; ${m.method === 'complex-circle' ? 'complex fit (NPL MAT 58)' : 'scalar Lorentzian fit'}`,
          '',
          dipRows([
            { role: 'main', fit: m },
            ...r.report.spurious.map((s, i) => ({ role: `spurious ${i + 1}`, fit: s })),
          ]),
          '',
          `baseline ${fmt(m.baselineAtF0)} at f0, residual RMS ${fmt(m.residualRms)}; ${m.pointsPerLinewidth} points across the half-depth width, ${m.pointsUsed} fitted`,
          'FWHD: full width at half depth (f0 / QL); two tones: smallest spacing seen as two dips.',
        ];
        const choice = r.report.model;
        if (choice) lines.push(`model: ${choice.used} (${choice.reason})`);
        const judged = r.report.judgement;
        if (judged)
          lines.push(
            `residuals against the baseline noise: reduced chi-square ${judged.reducedChiSquare.toPrecision(3)}`,
          );
        if (m.electricalDelayS !== undefined)
          lines.push(
            `electrical delay ${fmt(m.electricalDelayS * 1e9)} ns (u ${fmt((m.electricalDelayUncertaintyS ?? 0) * 1e9)} ns)`,
          );
        for (const w of r.warnings) lines.push(`WARNING: ${w}`);
        for (const n of r.report.notes) lines.push(`note: ${n}`);
        return lines.join('\n');
      });
      return 0;
    },

    async chart(ctx) {
      const ref = ctx.arg('REF');
      const step = numberOption('step', ctx.values.step as string | undefined, false);
      const r = await ctx.open().api.getDialChart({ assetId: ref, stepDivisions: step });
      ctx.print(r, () => {
        const f = r.fit;
        const words = {
          'cylindrical-te011': 'cylindrical TE011 cavity, f^2 = A + C / (d - d0)^2',
          'coaxial-loaded': 'capacitively loaded coaxial cavity, Z0 tan(2 pi f l(d) / c) = 1 / (2 pi f C)',
          'monotone-interpolant': 'monotone interpolant (Fritsch-Carlson) through the points',
        };
        const from =
          r.source.kind === 'check'
            ? `check ${r.source.checkId} of ${r.source.date}`
            : 'the chart stored with the meter';
        const lines = [
          `dial chart of ${r.assetId}: ${words[f.model.kind]}`,
          `from ${r.pointCount} points of ${from}; residuals RMS ${decimal(f.rmsResidualPpm, 1)} ppm, largest ${decimal(f.maxResidualPpm, 1)} ppm (limit ${decimal(r.acceptPpm, 0)} ppm)`,
          '',
          table(
            ['model', 'accepted', 'RMS / ppm', 'max / ppm', 'why'],
            f.candidates.map((c) => [
              c.model,
              c.accepted ? 'yes' : 'no',
              c.rmsResidualPpm === null ? '-' : decimal(c.rmsResidualPpm, 1),
              c.maxResidualPpm === null ? '-' : decimal(c.maxResidualPpm, 1),
              c.reason,
            ]),
            [2, 3],
          ),
          '',
          table(
            ['divisions', 'frequency'],
            r.table.map((row) => [plain(row.divisions), formatFrequency(row.frequencyHz, 7)]),
            [0, 1],
          ),
          '',
          table(
            ['point div', 'measured', 'chart', 'residual'],
            f.residuals.map((x) => [
              plain(x.divisions),
              formatFrequency(x.frequencyHz, 8),
              formatFrequency(x.fittedHz, 8),
              `${decimal(x.residualPpm, 1)} ppm`,
            ]),
            [0, 3],
          ),
          "frequencies at the meter's reference conditions.",
        ];
        for (const n of r.notes) lines.push(`note: ${n}`);
        return lines.join('\n');
      });
      return 0;
    },

    async sweeps(ctx) {
      const ref = ctx.arg('REF');
      const rows = await ctx.open().api.listSweeps(ref);
      ctx.print(rows, () =>
        rows.length === 0
          ? `no swept points for ${ref}`
          : table(
              ['check', 'date', '#', 'phase', 'dial', 'f0', 'QL', 'depth', 'spurious'],
              rows.map((s) => [
                String(s.checkId),
                s.date,
                String(s.seq),
                s.phase,
                String(s.dialSetting),
                formatFrequency(s.f0Hz, 9),
                decimal(s.loadedQ, 0),
                `${decimal(s.depthDb, 2)} dB`,
                s.spuriousHz.length ? s.spuriousHz.map((h) => formatFrequency(h, 6)).join(', ') : '-',
              ]),
              [0, 2, 6, 7],
            ),
      );
      return 0;
    },
  },
};
