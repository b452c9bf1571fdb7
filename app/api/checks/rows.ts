// A prepared check as the rows the store writes: one place for recording and amending, so a
// new revision always carries everything the first one did (points, standards, sweeps).
import { ENGINE_VERSION } from '../../engine';
import type { DecisionRule } from '../../engine/model';
import type { NewCheckRevision } from '../../../db/queries/checks';
import type { SweepData } from '../../../db/queries/sweeps';
import type { PreparedCheck } from './prepared';

export function revisionRows(
  c: PreparedCheck,
  performerId: number,
  decisionRule: DecisionRule,
  amendment?: { reason: string; by: string },
): NewCheckRevision {
  return {
    meterId: c.meter.id,
    performerId,
    date: c.doc.date,
    method: c.doc.method,
    conditions: c.conditions,
    adjusted: c.doc.adjusted,
    remarks: c.doc.remarks,
    decisionRule,
    engineVersion: ENGINE_VERSION,
    asFoundVerdict: c.asFoundVerdict,
    asLeftVerdict: c.asLeftVerdict,
    worstUsedFraction: c.worstUsedFraction,
    traceabilityExceptions: c.exceptions,
    ...(amendment ? { amendment } : {}),
    standards: c.standards.map((s) => ({ standardId: s.record.id, certificateRowId: s.certificate.id })),
    points: c.points.map((p) => ({
      phase: p.phase,
      referenceHz: p.referenceHz,
      standardId: p.standard.id,
      dipDepthDb: p.dipDepthDb,
      readings: p.readings,
      result: p.result,
    })),
  };
}

/** Swept points' traces and fits by point number (the store numbers points 1, 2, ... in order). */
export function sweepRows(c: PreparedCheck): { seq: number; sweep: SweepData }[] {
  return c.points.flatMap((p, i) => (p.sweep ? [{ seq: i + 1, sweep: p.sweep }] : []));
}
