// What changed between two revisions of a check, path by path, so an amendment shows what it
// altered (ISO/IEC 17025:2017 7.5.2). Hand-written: a path diff of two plain JSON values is a
// few lines, and arrays of points are compared position by position, which is what a reader
// of a check expects ("point 2, reading 3 changed"), not the moves a text diff would find.
import type { CheckRecord } from './contract';
import type { RevisionChange } from './contract-records';

/** The part of a revision an amendment can change: inputs and outcomes, not bookkeeping. Each
 * point's full budget is summarised by its error, expanded uncertainty and verdict. */
export function comparable(r: CheckRecord, extra: { standardsUsed: unknown; exceptions: string[] }): unknown {
  return {
    meter: r.meterAssetId,
    date: r.date,
    performer: r.performer,
    standards: r.standards,
    standardsUsed: extra.standardsUsed,
    traceabilityExceptions: extra.exceptions,
    method: r.method,
    conditions: r.conditions,
    adjusted: r.adjusted,
    remarks: r.remarks,
    engineVersion: r.engineVersion,
    asFoundVerdict: r.asFoundVerdict,
    asLeftVerdict: r.asLeftVerdict,
    points: r.points.map((p) => ({
      phase: p.phase,
      referenceHz: p.referenceHz,
      standard: p.standardAssetId,
      readings: p.readings,
      dipDepthDb: p.dipDepthDb,
      errorHz: p.result.errorHz,
      expandedHz: p.result.budget.expandedHz,
      verdict: p.result.decision.verdict,
    })),
  };
}

const isObject = (v: unknown): v is Record<string, unknown> =>
  typeof v === 'object' && v !== null && !Array.isArray(v);

/** Changed leaves from `before` to `after`; a value present on one side only shows as undefined on the other. */
export function diffValues(before: unknown, after: unknown, path = ''): RevisionChange[] {
  if (Object.is(before, after)) return [];
  if (Array.isArray(before) && Array.isArray(after)) {
    const out: RevisionChange[] = [];
    for (let i = 0; i < Math.max(before.length, after.length); i++)
      out.push(...diffValues(before[i], after[i], `${path}[${i}]`));
    return out;
  }
  if (isObject(before) && isObject(after)) {
    const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])];
    return keys.flatMap((k) => diffValues(before[k], after[k], path ? `${path}.${k}` : k));
  }
  return [{ path: path || '(record)', before, after }];
}
