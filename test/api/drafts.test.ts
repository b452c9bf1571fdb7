// Drafts through the real API path: a check being typed is saved, replaced, listed, survives
// closing the lab file, becomes a record through recordCheck, and bad input is refused with the
// field named and nothing written.
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { openApi } from '../../app/api/open';
import { MAX_DRAFT_BYTES } from '../../app/api/ops/drafts';
import { clock, goodCheck, seed, seededLab } from '../fixtures/lab';

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

/** A check as it looks half typed: the second point has no readings yet. */
function halfTyped(): Record<string, unknown> {
  const doc = goodCheck() as unknown as Record<string, unknown>;
  return {
    ...doc,
    points: [
      ...(doc.points as unknown[]),
      {
        reference: '12 GHz',
        readings: [
          { value: '', direction: 'up' },
          { value: '', direction: 'down' },
        ],
      },
    ],
  };
}

const temps: string[] = [];
afterEach(() => {
  for (const t of temps.splice(0)) rmSync(t, { recursive: true, force: true });
});

describe('drafts of a check', () => {
  it('saves a new draft, replaces it as typing goes on, and gives it back unchanged', async () => {
    const { api } = await seededLab();
    const first = await api.saveDraft({ document: { format: 'dipledger.check/1', meter: 'TW-01' } });
    expect(first.draftId).toBeGreaterThan(0);
    expect(first).toMatchObject({ meterAssetId: 'TW-01', date: null, pointCount: 0, pointsStarted: 0 });
    expect(first.updatedAt).toBe(clock.now());

    const doc = halfTyped();
    const second = await api.saveDraft({ draftId: first.draftId, document: doc });
    expect(second.draftId).toBe(first.draftId);
    expect(second).toMatchObject({ date: '2026-11-20', pointCount: 2, pointsStarted: 1 });

    const back = await api.getDraft(first.draftId);
    expect(back.document).toEqual(doc);
    expect(await api.listDrafts()).toHaveLength(1);
  });

  it('lists drafts newest first', async () => {
    const { api } = await seededLab();
    const a = await api.saveDraft({ document: { meter: 'TW-01' } });
    const b = await api.saveDraft({ document: { meter: 'TW-02' } });
    // Same fixed clock for both: the later draft still comes first.
    expect((await api.listDrafts()).map((d) => d.draftId)).toEqual([b.draftId, a.draftId]);
  });

  it('keeps a draft when the lab file is closed and opened again', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'dipledger-drafts-'));
    temps.push(dir);
    const file = path.join(dir, 'lab.dipledger');
    const one = openApi(file, { create: true, clock });
    await seed(one.api);
    const saved = await one.api.saveDraft({ document: halfTyped() });
    one.close();
    const two = openApi(file, { clock });
    try {
      expect((await two.api.getDraft(saved.draftId)).document).toEqual(halfTyped());
    } finally {
      two.close();
    }
  });

  it('holds exactly the document recordCheck takes, and is discarded once recorded', async () => {
    const { api } = await seededLab();
    const document: Record<string, unknown> = { ...goodCheck() };
    const saved = await api.saveDraft({ document });
    const draft = await api.getDraft(saved.draftId);
    const rec = await api.recordCheck(draft.document as never);
    expect(rec.meterAssetId).toBe('TW-01');
    expect(rec.asLeftVerdict).toBe('pass');
    expect(await api.discardDraft(saved.draftId)).toEqual({ draftId: saved.draftId });
    expect(await api.listDrafts()).toEqual([]);
    const gone = await refusal(api.getDraft(saved.draftId));
    expect(gone.code).toBe('not-found');
    expect(gone.message).toContain(`no draft number ${saved.draftId}`);
  });
});

describe('refusals write nothing', () => {
  async function unchanged(api: LabApi, attempt: () => Promise<unknown>): Promise<LabError> {
    const before = JSON.stringify(await api.listDrafts());
    const e = await refusal(attempt());
    expect(JSON.stringify(await api.listDrafts())).toBe(before);
    return e;
  }

  it('refuses a document that is not a JSON object, naming the field', async () => {
    const { api } = await seededLab();
    for (const document of [[], 'text', null, 3]) {
      const e = await unchanged(api, () => api.saveDraft({ document } as never));
      expect(e.code).toBe('invalid-input');
      expect(e.issues[0]?.field).toBe('document');
      expect(e.issues[0]?.expected).toContain('JSON object');
    }
  });

  it('refuses another format and a meter that is not text', async () => {
    const { api } = await seededLab();
    const wrongFormat = await unchanged(api, () =>
      api.saveDraft({ document: { format: 'dipledger.budget/1' } }),
    );
    expect(wrongFormat.issues[0]?.field).toBe('document');
    expect(wrongFormat.message).toContain('dipledger.check/1');
    const numericMeter = await unchanged(api, () => api.saveDraft({ document: { meter: 101 } }));
    expect(numericMeter.message).toContain('asset id');
  });

  it('refuses an unknown or malformed draft number', async () => {
    const { api } = await seededLab();
    await api.saveDraft({ document: { meter: 'TW-01' } });
    const unknown = await unchanged(api, () => api.saveDraft({ draftId: 999, document: { meter: 'TW-02' } }));
    expect(unknown.code).toBe('not-found');
    expect(unknown.message).toContain('999');
    const bad = await refusal(api.getDraft('seven' as never));
    expect(bad.code).toBe('invalid-input');
    expect(bad.issues[0]?.field).toBe('draftId');
    const negative = await unchanged(api, () => api.discardDraft(-1));
    expect(negative.issues[0]?.field).toBe('draftId');
    expect((await refusal(api.discardDraft(999))).code).toBe('not-found');
  });

  it('refuses a document larger than a page of typing', async () => {
    const { api } = await seededLab();
    const e = await unchanged(api, () =>
      api.saveDraft({ document: { meter: 'TW-01', remarks: 'x'.repeat(MAX_DRAFT_BYTES) } }),
    );
    expect(e.issues[0]?.field).toBe('document');
    expect(e.message).toContain('KiB');
  });
});
