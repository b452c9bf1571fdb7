// The lab's standards: the traceable sources checks are made against.
import { appendAudit } from '../../../db/queries/audit';
import {
  getStandardByAsset,
  insertStandard,
  listStandards as readStandards,
} from '../../../db/queries/standards';
import { z } from 'zod';
import { insertStandardCertificate, retireStandardRow, setStandardKind } from '../../../db/queries/upkeep';
import { LabError, describe } from '../errors';
import { frequencyOrIssue, Issues, parseWith } from '../issues';
import { StandardCertificateSchema, StandardSchema } from '../schemas';
import type { OpGroup, ServiceContext } from './context';
import { toStandard } from './lookups';

export function listStandards(ctx: ServiceContext) {
  return readStandards(ctx.db).map((s) => toStandard(ctx, s));
}

export function createStandard(ctx: ServiceContext, input: unknown) {
  const s = parseWith(StandardSchema, input);
  const issues = new Issues();
  s.certificates.forEach((c, i) => {
    if (c.dueOn <= c.calibratedOn)
      issues.add(
        `certificates[${i}].dueOn`,
        c.dueOn,
        `a date after calibratedOn (${c.calibratedOn})`,
        `certificates[${i}].dueOn: ${c.dueOn} is not after calibratedOn ${c.calibratedOn}; a certificate falls due after its calibration date`,
      );
  });
  const range = rangeOf(issues, s.min, s.max);
  if (getStandardByAsset(ctx.db, s.assetId))
    issues.add(
      'assetId',
      s.assetId,
      'an asset id not already used',
      `assetId: ${s.assetId} is already a lab standard`,
    );
  const ids = new Set<string>();
  s.certificates.forEach((c, i) => {
    if (ids.has(c.certificateId))
      issues.add(`certificates[${i}].certificateId`, c.certificateId, 'certificate numbers that differ');
    ids.add(c.certificateId);
  });
  issues.throwIfAny();
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
    const id = insertStandard(ctx.db, { ...s, certificates: [] }, at);
    for (const c of s.certificates) insertStandardCertificate(ctx.db, id, c);
    setStandardKind(ctx.db, id, s.kind, range.minHz, range.maxHz);
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'create',
      entity: 'standard',
      entityId: s.assetId,
      before: undefined,
      after: s,
    });
  })();
  const rec = getStandardByAsset(ctx.db, s.assetId);
  if (!rec) throw new LabError('internal', 'standard not found after writing it');
  return toStandard(ctx, rec);
}

/** A standard's frequency range: both ends or neither, min below max. */
function rangeOf(
  issues: Issues,
  min: string | number | undefined,
  max: string | number | undefined,
): { minHz: number | null; maxHz: number | null } {
  if (min === undefined && max === undefined) return { minHz: null, maxHz: null };
  if (min === undefined || max === undefined) {
    issues.add(min === undefined ? 'min' : 'max', undefined, 'both ends of the frequency range, or neither');
    return { minHz: null, maxHz: null };
  }
  const minHz = frequencyOrIssue(issues, min, 'min');
  const maxHz = frequencyOrIssue(issues, max, 'max');
  if (minHz !== undefined && maxHz !== undefined && !(maxHz > minHz))
    issues.add('max', max, `a frequency above min (${describe(min)})`);
  return { minHz: minHz ?? null, maxHz: maxHz ?? null };
}

const CertificateInputSchema = z.strictObject({
  assetId: z
    .string('expected the asset id of a lab standard')
    .trim()
    .min(1, 'expected the asset id of a lab standard'),
  certificate: StandardCertificateSchema,
});

function requireStandard(ctx: ServiceContext, assetId: string) {
  const rec = getStandardByAsset(ctx.db, assetId);
  if (!rec) throw new LabError('not-found', `no lab standard with asset id ${describe(assetId)} in this lab`);
  return rec;
}

/** Records a new certificate of a standard (its recalibration). */
export function addStandardCertificate(ctx: ServiceContext, input: unknown) {
  const { assetId, certificate: c } = parseWith(CertificateInputSchema, input);
  const rec = requireStandard(ctx, assetId);
  const issues = new Issues();
  if (rec.retiredOn)
    issues.add(
      'assetId',
      assetId,
      'a standard in use',
      `assetId: ${assetId} was retired on ${rec.retiredOn}`,
    );
  if (c.dueOn <= c.calibratedOn)
    issues.add(
      'certificate.dueOn',
      c.dueOn,
      `a date after calibratedOn (${c.calibratedOn})`,
      `certificate.dueOn: ${c.dueOn} is not after certificate.calibratedOn ${c.calibratedOn}; a certificate falls due after its calibration date`,
    );
  if (rec.certificates.some((x) => x.certificateId === c.certificateId))
    issues.add(
      'certificate.certificateId',
      c.certificateId,
      'a certificate number not already recorded for this standard',
    );
  issues.throwIfAny();
  ctx.db.transaction(() => {
    insertStandardCertificate(ctx.db, rec.id, c);
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: 'add-certificate',
      entity: 'standard',
      entityId: assetId,
      before: undefined,
      after: c,
    });
  })();
  return toStandard(ctx, requireStandard(ctx, assetId));
}

const RetireSchema = z.strictObject({
  assetId: z
    .string('expected the asset id of a lab standard')
    .trim()
    .min(1, 'expected the asset id of a lab standard'),
  reason: z
    .string('expected the reason for retiring it')
    .trim()
    .min(3, 'expected a reason of a few words')
    .max(1000, 'expected a reason of at most 1000 characters'),
});

/** Retires a standard from today: no check dated after today may name it; past checks stand. */
export function retireStandard(ctx: ServiceContext, input: unknown) {
  const r = parseWith(RetireSchema, input);
  const rec = requireStandard(ctx, r.assetId);
  if (rec.retiredOn)
    throw LabError.field(
      'assetId',
      r.assetId,
      'a standard in use',
      `assetId: ${r.assetId} was already retired on ${rec.retiredOn}`,
    );
  const on = ctx.clock.today();
  ctx.db.transaction(() => {
    retireStandardRow(ctx.db, rec.id, on, r.reason);
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: 'retire',
      entity: 'standard',
      entityId: r.assetId,
      before: undefined,
      after: { retiredOn: on, reason: r.reason },
    });
  })();
  return toStandard(ctx, requireStandard(ctx, r.assetId));
}

export const standardOps = {
  listStandards,
  createStandard,
  addStandardCertificate,
  retireStandard,
} satisfies OpGroup<'listStandards' | 'createStandard' | 'addStandardCertificate' | 'retireStandard'>;
