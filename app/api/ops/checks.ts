// Checks: recording one, reading one back, judging a point without recording it, the air
// correction, and the history CSV in and out.
import { checkInBand, refractivityN, waterVapourPressureHpa } from '../../engine';
import type { PointResult, Reading } from '../../engine/model';
import { allCheckIds, getCheck as readCheck } from '../../../db/queries/checks';
import { getMeterByAsset, type MeterRecord } from '../../../db/queries/meters';
import { getStandardByAsset, type StandardRecord } from '../../../db/queries/standards';
import { prepareCheck, prepareCheckAtLine, type ImportLookups } from '../checks/prepare';
import type { PreparedCheck } from '../checks/prepared';
import { conditionsOf, evaluateOrIssue, readingValue } from '../checks/readings';
import { prepareSweepPoint } from '../checks/sweep-point';
import { checkWriteOf, writeCheck } from '../checks/write';
import type { AirResult, ImportResult } from '../contract';
import { LabError, describe } from '../errors';
import { csvToDocuments } from '../import-csv';
import { writeHistoryCsv, type HistoryCsvCheck } from '../../formats/history-csv';
import { importWriterFor } from '../import-writer';
import { frequencyOrIssue, Issues, parseWith } from '../issues';
import { AirSchema, BudgetDocumentSchema } from '../schemas';
import type { OpGroup, ServiceContext } from './context';
import { certificateOn, requireLab, requireMeter } from './lookups';

/** Below this many checks an import is written in the service's own transaction: starting the
 * writer thread (loading its code) costs more than it saves on a small import. */
export const WRITER_THREAD_MIN_CHECKS = 100;

export function recordCheck(ctx: ServiceContext, input: unknown) {
  const prepared = prepareCheck(ctx, input, '', { createPerformer: false });
  let checkId = 0;
  ctx.db.transaction(() => {
    checkId = writeCheck(ctx, prepared, 'record');
  })();
  const rec = readCheck(ctx.db, checkId);
  if (!rec) throw new LabError('internal', 'check not found after writing it');
  return rec;
}

export function getCheck(ctx: ServiceContext, checkId: unknown) {
  const id = Number(checkId);
  if (!Number.isInteger(id) || id < 1) throw LabError.field('checkId', checkId, 'a check number such as 12');
  const rec = readCheck(ctx.db, id);
  if (!rec) throw new LabError('not-found', `no check ${id} in this lab`);
  return rec;
}

export function evaluateBudget(ctx: ServiceContext, input: unknown) {
  const doc = parseWith(BudgetDocumentSchema, input);
  const settings = requireLab(ctx);
  const issues = new Issues();
  const meter = getMeterByAsset(ctx.db, doc.meter);
  if (!meter)
    issues.add(
      'meter',
      doc.meter,
      'the asset id of a meter in this lab',
      `meter: no meter ${describe(doc.meter)} in this lab`,
    );
  const std = getStandardByAsset(ctx.db, doc.standard);
  if (!std)
    issues.add(
      'standard',
      doc.standard,
      'the asset id of a lab standard',
      `standard: no lab standard ${describe(doc.standard)} in this lab`,
    );
  issues.throwIfAny();
  const m = (meter as MeterRecord).meter;
  const cert =
    certificateOn(std as StandardRecord, ctx.clock.today()) ?? (std as StandardRecord).certificates[0];
  if (!cert) throw LabError.field('standard', doc.standard, 'a standard with a certificate');
  if (doc.sweep !== undefined) {
    // A swept point: the resonance fitted to the trace is the reference, judged as recorded.
    const swept = prepareSweepPoint({
      issues,
      field: 'point',
      point: { phase: 'as-found', dialSetting: doc.dialSetting, sweep: doc.sweep },
      method: 'sweep',
      meter: m,
      conditions: conditionsOf(doc, settings),
      standards: [{ record: std as StandardRecord, certificate: cert }],
      listedStandards: [doc.standard],
      rule: doc.decisionRule ?? settings.decisionRule,
      readingValue,
    });
    issues.throwIfAny();
    if (!swept) throw new LabError('internal', 'a swept point was neither judged nor refused');
    return swept.result;
  }
  const referenceHz = frequencyOrIssue(issues, doc.reference ?? '', 'reference');
  if (referenceHz !== undefined) {
    const out = checkInBand(referenceHz, m.minHz, m.maxHz, 'reference');
    if (out) issues.fromParse('reference', doc.reference, out, `a frequency inside the band of ${m.assetId}`);
  }
  const readings: Reading[] = [];
  (doc.readings ?? []).forEach((r, j) => {
    const v = readingValue(issues, m, r.value, `readings[${j}].value`);
    if (v !== undefined) readings.push({ value: v, direction: r.direction });
  });
  issues.throwIfAny();
  const result = evaluateOrIssue(
    issues,
    'readings',
    m,
    conditionsOf(doc, settings),
    referenceHz as number,
    cert,
    readings,
    doc.decisionRule ?? settings.decisionRule,
  );
  issues.throwIfAny();
  return result as PointResult;
}

export function airRefractivity(_ctx: ServiceContext, input: unknown) {
  const a = parseWith(AirSchema, input);
  const n = refractivityN(a.temperatureC, a.pressureHpa, a.humidityPct);
  // Reference air of a meter's graduation unless a meter says otherwise (common practice).
  const referenceN = refractivityN(20, 1013.25, 50);
  const result: AirResult = {
    refractivityN: n,
    refractiveIndex: 1 + n * 1e-6,
    waterVapourHpa: waterVapourPressureHpa(a.temperatureC, a.pressureHpa, a.humidityPct),
    shiftPpm: ((1 + referenceN * 1e-6) / (1 + n * 1e-6) - 1) * 1e6,
    referenceN,
  };
  return result;
}

export function importCsv(ctx: ServiceContext, csvText: unknown) {
  if (typeof csvText !== 'string') throw LabError.field('csv', csvText, 'the text of a CSV file');
  const docs = csvToDocuments(csvText);
  const result: ImportResult = {
    metersSeen: new Set(docs.map((d) => d.doc.meter)).size,
    checksImported: 0,
    pointsImported: 0,
  };
  const lookups: ImportLookups = { meters: new Map(), standards: new Map() };
  const count = (p: PreparedCheck) => {
    result.checksImported += 1;
    result.pointsImported += p.points.length;
  };
  // Each check is validated and written in turn inside the one transaction, so only one
  // computed check is held at a time; a refusal anywhere rolls the whole import back, and
  // nothing an earlier check writes (its rows, a new performer) changes how a later one is
  // judged, so every stored result is the one validating all before writing gave.
  const inOwnTransaction = () => {
    ctx.db.transaction(() => {
      for (const d of docs) {
        const p = prepareCheckAtLine(ctx, d, lookups);
        writeCheck(ctx, p, 'import', lookups.settings);
        count(p);
      }
    })();
    return result;
  };
  if (docs.length < ctx.writerThreadMinChecks) return inOwnTransaction();
  // A large import is written by a thread of its own while this one prepares the next check
  // (import-writer.ts): the same rows, in the same order, in one transaction.
  return importWriterFor(ctx.db).then(async (writer) => {
    if (!writer) return inOwnTransaction();
    writer.begin();
    try {
      for (const d of docs) {
        const p = prepareCheckAtLine(ctx, d, lookups);
        writer.write(checkWriteOf(ctx, p, 'import', lookups.settings));
        count(p);
      }
    } catch (e) {
      // The refusal is the answer; a writer that cannot even roll back has lost its
      // transaction with its connection anyway.
      await writer.rollback().catch(() => undefined);
      throw e;
    }
    await writer.commit();
    return result;
  });
}

export function exportCsv(ctx: ServiceContext) {
  function* checks(): Generator<HistoryCsvCheck> {
    for (const id of allCheckIds(ctx.db)) {
      const check = readCheck(ctx.db, id);
      if (!check) continue;
      const meter = requireMeter(ctx, check.meterAssetId).meter;
      yield { check, readingUnit: meter.dialKind === 'direct' ? 'Hz' : 'div' };
    }
  }
  return writeHistoryCsv(checks());
}

export const checkOps = {
  recordCheck,
  getCheck,
  evaluateBudget,
  airRefractivity,
  importCsv,
  exportCsv,
} satisfies OpGroup<
  'recordCheck' | 'getCheck' | 'evaluateBudget' | 'airRefractivity' | 'importCsv' | 'exportCsv'
>;
