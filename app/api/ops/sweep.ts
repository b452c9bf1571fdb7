// Sweeps and dials: fit a trace on its own, list a meter's swept points, read a check's
// sweeps, and fit a divisions meter's dial chart from its newest check. All reads: nothing here
// writes (swept points are written by recordCheck through prepareCheck/writeCheck).
import { dipPlot } from '../../engine/dipplot';
import { z } from 'zod';
import { chartTable, DialChartError, fitDialChart } from '../../engine/dial-chart';
import { ResonanceError, fitResonances, type Trace } from '../../engine/resonance';
import { standardGuideCutoffHz } from '../../engine/waveguide';
import type { ChartPoint } from '../../engine/model';
import { allCheckIds, getCheck } from '../../../db/queries/checks';
import { getSweepsOfCheck, listSweepSummaries } from '../../../db/queries/sweeps';
import type { OpGroup, ServiceContext } from './context';
import { requireMeter } from './lookups';
import type { DialChartReport, SweepApi, TraceFit } from '../contract-sweep';
import { LabError } from '../errors';
import { ChartQuerySchema, FitTraceSchema } from '../schemas-sweep';
import { Issues, parseWith } from '../issues';
import { sweepTrace } from '../checks/sweep-point';

const CheckIdSchema = z
  .int('expected a check number such as 12')
  .positive('expected a check number such as 12');

/** A readable step for a chart table: about ten rows, on a 1-2-5 ladder of divisions. */
function niceStep(range: number): number {
  const raw = range / 10;
  const p = 10 ** Math.floor(Math.log10(raw));
  for (const m of [1, 2, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

export function fitTrace(_ctx: ServiceContext, input: Parameters<SweepApi['fitTrace']>[0]): TraceFit {
  return fitTraceOf(input);
}

/** The fit of one sweep on its own: needs no lab (nothing is read or stored), so the command
 * line's `fit` calls it without opening one. Refuses bad input as the operation does. */
export function fitTraceOf(input: unknown): TraceFit {
  const doc = parseWith(FitTraceSchema, input);
  const issues = new Issues();
  const read = sweepTrace(issues, doc, 'sweep');
  issues.throwIfAny();
  if (!read) throw new LabError('internal', 'trace missing after reading it');
  let trace: Trace = read.file.trace;
  if (doc.method === 'scalar' && trace.kind === 'complex') {
    const { re, im } = trace;
    trace = {
      kind: 'scalar',
      frequencyHz: trace.frequencyHz,
      power: Array.from(re, (r, i) => r * r + (im[i] as number) ** 2),
    };
  }
  // The scalar method is the magnitude model on |S21|^2.
  const model = doc.method === 'scalar' ? 'magnitude' : (doc.model ?? 'auto');
  try {
    const report = fitResonances(trace, { model });
    const out: TraceFit = {
      description: read.file.description,
      pointCount: trace.frequencyHz.length,
      report,
      // A fit that fails its own judgement is shown with the reasons (record and budget refuse it).
      warnings: report.judgement?.problems.map((p) => `the fit cannot be trusted: ${p}`) ?? [],
      plot: dipPlot(trace, report.main),
    };
    return out;
  } catch (e) {
    if (e instanceof ResonanceError)
      throw LabError.field(
        'sweep',
        doc.name ?? doc.file ?? 'trace',
        'a sweep across one clear dip',
        `${doc.name ?? 'sweep'}: ${e.message}`,
      );
    throw e;
  }
}

export function listSweeps(ctx: ServiceContext, assetId: Parameters<SweepApi['listSweeps']>[0]) {
  // String() of a hostile object throws a TypeError (found by test/api/records-fuzz.test.ts).
  if (typeof assetId !== 'string')
    throw LabError.field('assetId', assetId, 'the asset id of a meter, as text');
  const rec = requireMeter(ctx, assetId);
  return listSweepSummaries(ctx.db, rec.id);
}

export function getSweeps(ctx: ServiceContext, checkId: Parameters<SweepApi['getSweeps']>[0]) {
  const id = parseWith(CheckIdSchema, checkId, 'checkId');
  if (!getCheck(ctx.db, id)) throw new LabError('not-found', `no check ${id} in this lab`);
  return getSweepsOfCheck(ctx.db, id);
}

export function getDialChart(ctx: ServiceContext, input: Parameters<SweepApi['getDialChart']>[0]) {
  const q = parseWith(ChartQuerySchema, input);
  const rec = requireMeter(ctx, q.assetId);
  const m = rec.meter;
  if (m.dialKind !== 'divisions')
    throw LabError.field(
      'assetId',
      q.assetId,
      'a meter read in divisions',
      `assetId: ${m.assetId} has a direct-reading dial; only a meter read in divisions has a chart`,
    );
  // Points of the newest check of this meter: (dial divisions, frequency the dial would have
  // read at the meter's reference conditions) = (mean dial, reference x g), g = indicated / corrected.
  let points: ChartPoint[] = [];
  let source: DialChartReport['source'] = { kind: 'stored-chart' };
  const ids = allCheckIds(ctx.db)
    .map((id) => getCheck(ctx.db, id))
    .filter((c) => c !== undefined && c.meterAssetId === m.assetId)
    .sort((a, b) => (a && b ? b.date.localeCompare(a.date) || b.checkId - a.checkId : 0));
  for (const c of ids) {
    if (!c) continue;
    const wanted = c.adjusted ? 'as-left' : 'as-found';
    const byDial = new Map<number, ChartPoint>();
    for (const p of c.points) {
      if (p.phase !== wanted) continue;
      const g = p.result.indicatedHz / p.result.correctedHz;
      byDial.set(p.result.meanDial, { divisions: p.result.meanDial, frequencyHz: p.referenceHz * g });
    }
    if (byDial.size >= 2) {
      points = [...byDial.values()];
      source = { kind: 'check', checkId: c.checkId, date: c.date };
      break;
    }
  }
  if (points.length < 2) points = m.chart.map((c) => ({ ...c }));
  const acceptPpm = m.accuracyRelPpm / 4;
  try {
    const fit = fitDialChart(points, acceptPpm);
    const step = q.stepDivisions ?? niceStep(fit.maxDivisions - fit.minDivisions);
    const table = chartTable(fit, step);
    const guide = m.construction === 'waveguide' ? standardGuideCutoffHz(m.port) : null;
    const notes = [...fit.notes];
    if (guide && table.some((r) => r.frequencyHz <= guide.cutoffHz))
      notes.push(
        `part of the chart lies below the TE10 cut-off of ${guide.size} (${(guide.cutoffHz / 1e9).toFixed(3)} GHz)`,
      );
    if (source.kind === 'stored-chart')
      notes.push('no check with two or more points yet: fitted to the chart stored with the meter');
    const report: DialChartReport = {
      assetId: m.assetId,
      fit,
      source,
      pointCount: points.length,
      stepDivisions: step,
      table,
      guide,
      acceptPpm,
      notes,
    };
    return report;
  } catch (e) {
    if (e instanceof DialChartError)
      throw LabError.field(
        'assetId',
        q.assetId,
        'a meter whose check points make a chart',
        `${m.assetId}: ${e.message}`,
      );
    throw e;
  }
}

export const sweepOps = { fitTrace, listSweeps, getSweeps, getDialChart } satisfies OpGroup<keyof SweepApi>;
