// The lab's standards: the traceable sources checks are made against.
import { appendAudit } from '../../../db/queries/audit';
import {
  getStandardByAsset,
  insertStandard,
  listStandards as readStandards,
} from '../../../db/queries/standards';
import { LabError } from '../errors';
import { Issues, parseWith } from '../issues';
import { StandardSchema } from '../schemas';
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
      issues.add(`certificates[${i}].dueOn`, c.dueOn, `a date after calibratedOn (${c.calibratedOn})`);
  });
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
    insertStandard(ctx.db, s, at);
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

export const standardOps = { listStandards, createStandard } satisfies OpGroup<
  'listStandards' | 'createStandard'
>;
