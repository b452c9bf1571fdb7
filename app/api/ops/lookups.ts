// Records every operation group looks up the same way: the lab's settings, a meter by asset id,
// a register row with its due date, a standard's certificate on a date.
import { getMeterByAsset, type MeterRecord, type registerRows } from '../../../db/queries/meters';
import { getLab } from '../../../db/queries/lab';
import type { StandardRecord } from '../../../db/queries/standards';
import { addMonthsIso, daysBetween } from '../clock';
import type { LabSettings, RegisterRow, Standard } from '../contract';
import { LabError, describe } from '../errors';
import type { ServiceContext } from './context';

/** The lab's settings; refuses when the file has none yet. */
export function requireLab(ctx: ServiceContext): LabSettings {
  const settings = getLab(ctx.db);
  if (!settings) throw new LabError('refused', 'this lab file has no lab settings yet: run "dipledger init"');
  return settings;
}

/** The meter with that asset id, or a not-found LabError. */
export function requireMeter(ctx: ServiceContext, assetId: string): MeterRecord {
  const m = getMeterByAsset(ctx.db, assetId);
  if (!m) throw new LabError('not-found', `no meter with asset id ${describe(assetId)} in this lab`, []);
  return m;
}

/** A stored register row with its due date and the days to it. */
export function registerRowOf(ctx: ServiceContext, r: ReturnType<typeof registerRows>[number]): RegisterRow {
  // A withdrawn meter is out of use: nothing falls due for it.
  const dueDate =
    r.lastCheckDate && r.state !== 'withdrawn' ? addMonthsIso(r.lastCheckDate, r.intervalMonths) : null;
  return { ...r, dueDate, daysToDue: dueDate ? daysBetween(ctx.clock.today(), dueDate) : null };
}

/** The certificate of a standard valid on a date, if any. */
export function certificateOn(
  s: StandardRecord,
  date: string,
): StandardRecord['certificates'][number] | undefined {
  return s.certificates.find((c) => c.calibratedOn <= date && date <= c.dueOn);
}

export function toStandard(ctx: ServiceContext, s: StandardRecord): Standard {
  const newest = s.certificates[0];
  const dueOn = newest?.dueOn ?? '';
  return {
    assetId: s.assetId,
    description: s.description,
    kind: s.kind,
    minHz: s.minHz,
    maxHz: s.maxHz,
    retiredOn: s.retiredOn,
    retiredReason: s.retiredReason,
    certificates: s.certificates.map(({ id: _id, ...c }) => c),
    dueOn,
    daysToDue: dueOn ? daysBetween(ctx.clock.today(), dueOn) : 0,
  };
}
