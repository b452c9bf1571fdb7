// A prepared check as the rows written for it, and writing them (inside the caller's transaction).
import { revisionRowData } from '../../../db/queries/checks';
import { revisionRows, sweepRows } from './rows';
import { writeCheckRows, type CheckWrite } from '../../../db/queries/check-write';
import type { LabSettings } from '../contract';
import type { ServiceContext } from '../ops/context';
import { requireLab } from '../ops/lookups';
import type { PreparedCheck } from './prepared';

/** `settings`: the lab's, when the caller already read them (a bulk import, once per file). */
export function writeCheck(
  ctx: ServiceContext,
  c: PreparedCheck,
  action: string,
  settings?: LabSettings,
): number {
  return writeCheckRows(ctx.db, checkWriteOf(ctx, c, action, settings));
}

/** A prepared check as the rows written for it (packed results included). */
export function checkWriteOf(
  ctx: ServiceContext,
  c: PreparedCheck,
  action: string,
  settings?: LabSettings,
): CheckWrite {
  const rule = (settings ?? requireLab(ctx)).decisionRule;
  // The performer's id is settled where the check is written (writeCheckRows).
  const { performerId, ...revision } = revisionRowData(revisionRows(c, c.performer?.id ?? 0, rule));
  return {
    at: ctx.clock.now(),
    actor: ctx.actor,
    action,
    performerId: c.performer ? performerId : undefined,
    performerName: c.doc.performer,
    revision,
    sweeps: sweepRows(c),
    audit: {
      meter: c.meter.meter.assetId,
      date: c.doc.date,
      asFound: c.asFoundVerdict,
      asLeft: c.asLeftVerdict,
    },
  };
}
