// The per-meter summaries (app/api/history/summaries.ts, migration 0006) change no answer: on the demo lab,
// the register with flags, every meter's page (getMeter, getTrend), fit for use at every check
// frequency, the fleet-wide fit for use and the coverage come out identical with summaries off
// (computed fresh) and on (cold, then warm), and again after each kind of change a summary must
// notice: a new check, signing, an amendment once signed, and a change of state. The counts of
// computed summaries show the warm answers really came from the cache, and that a change
// recomputes only the meter it touched. On a small synthetic fleet whose drift exits turn into
// warnings as the years pass, the register on later days is what fresh computation gives on that
// day, with nothing recomputed (the summaries hold no date). The summaries kept in the lab file
// (0008) are tested in stored-summaries.test.ts.
import { beforeAll, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import type { CheckDocumentInput } from '../../app/api/schemas';
import { createLabService, fixedClock } from '../../app/api/service';
import { setSummariesEnabled, summariesComputed } from '../../app/api/history/summaries';
import { openLabDb, type LabDb } from '../../db/store';
import { loadBundle, readSampleBundle, type SampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';
import { createFleet, historyCsv } from '../bench/fleet-data';

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

describe('register flags on later days', () => {
  it('are what fresh computation gives on each day, with nothing recomputed after the first', async () => {
    const fleetDb = openLabDb(':memory:');
    await createFleet(createLabService(fleetDb, { clock }), 30);
    await createLabService(fleetDb, { clock }).importCsv(historyCsv(0, 30).csv);
    const days = ['2026-12-01', '2028-12-01', '2030-06-01', '2033-01-01'];
    const shown = new Set<string>();
    let computed: number | null = null;
    for (const day of days) {
      const onDay = createLabService(fleetDb, { clock: fixedClock(`${day}T09:30:00.000Z`) });
      setSummariesEnabled(fleetDb, false);
      const expected = await onDay.listDue({ withinDays: 3650 });
      setSummariesEnabled(fleetDb, true);
      expect(await onDay.listDue({ withinDays: 3650 })).toStrictEqual(expected);
      // The first day computes every meter; later days only resolve the stored words.
      computed ??= summariesComputed(fleetDb).flags;
      expect(summariesComputed(fleetDb).flags).toBe(computed);
      shown.add(JSON.stringify(expected.map((r) => r.flags)));
    }
    expect(computed).toBe(30);
    // A projected drift exit becomes a warning within three years of it: the days differ.
    expect(shown.size).toBeGreaterThan(1);
    fleetDb.close();
  }, 120_000);
});
