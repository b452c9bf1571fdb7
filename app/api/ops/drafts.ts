// Drafts of checks: stores the exchange document as it is typed. Only the shape is checked
// here (a JSON object of bounded size, a known format); the full meaning is checked when the
// draft is recorded with recordCheck, since half-typed readings are normal in a draft.
import { appendAudit } from '../../../db/queries/audit';
import { z } from 'zod';
import {
  deleteDraft,
  getDraft as readDraft,
  insertDraft,
  listDrafts as readDrafts,
  updateDraft,
} from '../../../db/queries/drafts';
import type { DraftRecord } from '../../../db/queries/drafts';
import type { OpGroup, ServiceContext } from './context';
import type { Draft, DraftsApi, DraftSummary } from '../contract-drafts';
import { LabError, describe } from '../errors';
import { parseWith } from '../issues';

/** A draft is a page of typing, not a file: anything larger is a mistake, not a check. */
export const MAX_DRAFT_BYTES = 256 * 1024;

const DraftIdSchema = z.int('expected a draft number').positive('expected a draft number above 0');

const DraftInputSchema = z.object({
  draftId: DraftIdSchema.optional(),
  document: z
    .record(z.string(), z.unknown(), 'expected the check document being typed, as a JSON object')
    .refine(
      (d) => d.format === undefined || d.format === 'dipledger.check/1',
      'expected format "dipledger.check/1" (or none yet)',
    )
    .refine(
      (d) => d.meter === undefined || typeof d.meter === 'string',
      'expected the meter as an asset id (text)',
    ),
});

function summary(r: DraftRecord): DraftSummary {
  const points = Array.isArray(r.document.points) ? (r.document.points as unknown[]) : [];
  const started = points.filter((p) => {
    const readings = (p as { readings?: unknown } | null)?.readings;
    return (
      Array.isArray(readings) &&
      readings.some((x) => {
        const v = (x as { value?: unknown } | null)?.value;
        return (typeof v === 'string' && v.trim() !== '') || typeof v === 'number';
      })
    );
  }).length;
  const date = typeof r.document.date === 'string' && r.document.date ? r.document.date : null;
  return {
    draftId: r.id,
    meterAssetId: r.meterAssetId,
    date,
    pointsStarted: started,
    pointCount: points.length,
    createdAt: r.createdAt,
    updatedAt: r.updatedAt,
  };
}

function full(r: DraftRecord): Draft {
  return { ...summary(r), document: r.document };
}

function requireDraft(ctx: ServiceContext, draftId: unknown): DraftRecord {
  const id = parseWith(DraftIdSchema, draftId, 'draftId');
  const d = readDraft(ctx.db, id);
  if (!d)
    throw new LabError('not-found', `no draft number ${describe(draftId)}: it was recorded or discarded`);
  return d;
}

export function saveDraft(ctx: ServiceContext, input: Parameters<DraftsApi['saveDraft']>[0]) {
  const d = parseWith(DraftInputSchema, input);
  const text = JSON.stringify(d.document);
  if (Buffer.byteLength(text) > MAX_DRAFT_BYTES) {
    throw LabError.field(
      'document',
      `${Buffer.byteLength(text)} bytes`,
      `a check document of at most ${MAX_DRAFT_BYTES / 1024} KiB`,
    );
  }
  const meter =
    typeof d.document.meter === 'string' && d.document.meter.trim() ? d.document.meter.trim() : null;
  const at = ctx.clock.now();
  let id = d.draftId;
  ctx.db.transaction(() => {
    if (id === undefined) {
      id = insertDraft(ctx.db, {
        meterAssetId: meter,
        document: d.document,
        createdAt: at,
        updatedAt: at,
      });
    } else if (!updateDraft(ctx.db, id, { meterAssetId: meter, document: d.document, updatedAt: at })) {
      throw new LabError('not-found', `no draft number ${id}: it was recorded or discarded`);
    }
    draftAudit(ctx, at, d.draftId === undefined ? 'create' : 'save', id, { meter });
  })();
  return summary(requireDraft(ctx, id));
}

export function getDraft(ctx: ServiceContext, draftId: Parameters<DraftsApi['getDraft']>[0]) {
  return full(requireDraft(ctx, draftId));
}

export function listDrafts(ctx: ServiceContext) {
  return readDrafts(ctx.db).map(summary);
}

export function discardDraft(ctx: ServiceContext, draftId: Parameters<DraftsApi['discardDraft']>[0]) {
  const d = requireDraft(ctx, draftId);
  ctx.db.transaction(() => {
    if (!deleteDraft(ctx.db, d.id)) throw new LabError('not-found', `no draft number ${d.id}`);
    draftAudit(ctx, ctx.clock.now(), 'discard', d.id, undefined);
  })();
  return { draftId: d.id };
}

/** Drafts are shown and resumed, so their saves are in the trail too (with the draft's digest). */
function draftAudit(ctx: ServiceContext, at: string, action: string, id: number, after: unknown): void {
  appendAudit(ctx.db, {
    at,
    actor: ctx.actor,
    action,
    entity: 'draft',
    entityId: String(id),
    before: undefined,
    after,
  });
}

export const draftOps = { saveDraft, getDraft, listDrafts, discardDraft } satisfies OpGroup<keyof DraftsApi>;
