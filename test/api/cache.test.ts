// The per-meter summaries (app/api/summaries.ts, migration 0006) change no answer: on the demo lab,
// the register with flags, every meter's page (getMeter, getTrend), fit for use at every check
// frequency, the fleet-wide fit for use and the coverage come out identical with summaries off
// (computed fresh) and on (cold, then warm), and again after each kind of change a summary must
// notice: a new check, signing, an amendment once signed, and a change of state. The counts of
// computed summaries show the warm answers really came from the cache, and that a change
// recomputes only the meter it touched.
import { beforeAll, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import type { CheckDocumentInput } from '../../app/api/schemas';
import { createLabService } from '../../app/api/service';
import { setSummariesEnabled, summariesComputed } from '../../app/api/summaries';
import { openLabDb, type LabDb } from '../../db/store';
import { loadBundle, readSampleBundle, type SampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';

let db: LabDb;
let api: LabApi;
let bundle: SampleBundle;

beforeAll(async () => {
  db = openLabDb(':memory:');
  api = createLabService(db, { clock });
  bundle = readSampleBundle();
  await loadBundle(api, bundle);
}, 120_000);

/** Every answer the summaries feed, for every meter. */
async function answers(): Promise<Record<string, unknown>> {
  const out: Record<string, unknown> = {
    due: await api.listDue({ withinDays: 3650 }),
    register: await api.listMeters(),
    coverage: await api.coverage(),
  };
  const rows = await api.listMeters();
  for (const r of rows) {
    const detail = await api.getMeter(r.assetId);
    out[`page ${r.assetId}`] = detail;
    out[`trend ${r.assetId}`] = await api.getTrend(r.assetId);
    for (const f of detail.meter.planHz) {
      out[`use ${r.assetId} ${f}`] = await api.fitForUse({ assetId: r.assetId, frequency: `${f} Hz` });
    }
  }
  const first = (await api.getMeter(rows[0]?.assetId ?? '')).meter;
  out['use fleet'] = await api.fitForUse({ frequency: `${first.planHz[0]} Hz` });
  return out;
}

async function fresh(): Promise<Record<string, unknown>> {
  setSummariesEnabled(db, false);
  try {
    return await answers();
  } finally {
    setSummariesEnabled(db, true);
  }
}

/** The newest check of the bundle for an in-service meter, as a document to change. */
function newestCheckOfAnInServiceMeter(skip: string[] = []): CheckDocumentInput {
  const inService = new Set(
    bundle.meters.filter((m) => (m.state ?? 'in-service') === 'in-service').map((m) => m.assetId),
  );
  const c = [...bundle.checks]
    .reverse()
    .find((x) => inService.has(x.meter) && !skip.includes(x.meter)) as CheckDocumentInput;
  return JSON.parse(JSON.stringify(c)) as CheckDocumentInput;
}

const dayAfter = (iso: string) =>
  new Date(Date.parse(`${iso}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

/** Cached answers and how many meters' flags they recomputed. */
async function cachedAnswers(): Promise<{ got: Record<string, unknown>; recomputed: number }> {
  const before = summariesComputed(db).flags;
  const got = await answers();
  return { got, recomputed: summariesComputed(db).flags - before };
}

async function checkIdOf(meter: string, date: string): Promise<number> {
  const detail = await api.getMeter(meter);
  const c = detail.checks.find((x) => x.date === date);
  if (!c) throw new Error(`no check of ${meter} on ${date}`);
  return c.checkId;
}

describe('cached per-meter summaries', () => {
  it('give the same answers as fresh computation, cold and warm, for every meter', async () => {
    const expected = await fresh();
    const before = summariesComputed(db);
    expect(await answers()).toStrictEqual(expected);
    const afterCold = summariesComputed(db);
    expect(afterCold.flags).toBeGreaterThan(before.flags);
    expect(await answers()).toStrictEqual(expected);
    // Warm: nothing recomputed.
    expect(summariesComputed(db)).toEqual(afterCold);
  }, 120_000);

  it('notice a new check, and recompute only that meter', async () => {
    await answers();
    const doc = newestCheckOfAnInServiceMeter();
    const date = dayAfter(doc.date);
    expect(date <= clock.today()).toBe(true);
    await api.recordCheck({ ...doc, date });
    const before = summariesComputed(db);
    const expected = await fresh();
    expect(await answers()).toStrictEqual(expected);
    expect(summariesComputed(db).flags - before.flags).toBe(1);
  }, 120_000);

  it('notice signing, an amendment once signed, and a change of state', async () => {
    await answers();
    const doc = newestCheckOfAnInServiceMeter();
    const checkId = await checkIdOf(doc.meter, doc.date);
    const passphrase = 'summaries-cache-passphrase-1';
    await api.enrolSigner({ name: doc.performer, passphrase });
    await api.signCheck({ checkId, person: doc.performer, passphrase });
    let now = await cachedAnswers();
    expect(now.got).toStrictEqual(await fresh());
    expect(now.recomputed).toBe(1);

    // Warmer bench air changes every point's corrections, so the amended revision differs.
    const amended = { ...doc, conditions: { ...doc.conditions, temperatureC: 24.5 } };
    await api.amendCheck({ checkId, reason: 'bench temperature misread', document: amended });
    now = await cachedAnswers();
    expect(now.got).toStrictEqual(await fresh());
    expect(now.recomputed).toBe(1);
    const trendBefore = now.got[`trend ${doc.meter}`];
    await api.signCheck({ checkId, person: doc.performer, passphrase });
    now = await cachedAnswers();
    expect(now.got).toStrictEqual(await fresh());
    expect(now.recomputed).toBe(1);
    // The signed amendment is now the effective revision: the meter's history really changed.
    expect(now.got[`trend ${doc.meter}`]).not.toStrictEqual(trendBefore);

    await api.changeMeterState({ assetId: doc.meter, state: 'quarantined', reason: 'dropped on the bench' });
    now = await cachedAnswers();
    expect(now.got).toStrictEqual(await fresh());
    expect(now.recomputed).toBe(1);
    const row = (now.got.due as { assetId: string; state: string }[]).find((r) => r.assetId === doc.meter);
    expect(row?.state).toBe('quarantined');
  }, 180_000);
});
