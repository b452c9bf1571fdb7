// Point results stored packed (app/api/point-pack.ts) read back as the very value the JSON text
// of before gave: on the demo lab (every point of every check, key order included, the bytes a
// signature covers, and the text a packed row holds), on generated values (non-finite numbers,
// -0, strings that look like the form's own codes), and on a lab file written the old way and
// signed, which still reads, verifies, and takes new packed checks beside the old ones.
import fc from 'fast-check';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { decodeJson, encodeJson } from '../../app/api/json';
import { canonicalBytes } from '../../app/api/records-signing';
import { createLabService } from '../../app/api/service';
import { openLabDb, type LabDb } from '../../db/store';
import { loadBundle, readSampleBundle, type SampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';
import type * as PointPack from '../../app/api/point-pack';

// The writer's input, seen as insertRevision hands it over; `plain` makes it write JSON as
// before the packed form existed (an old lab file).
const spy = vi.hoisted(() => ({ plain: false, seen: [] as unknown[] }));
vi.mock('../../app/api/point-pack', async (importOriginal) => {
  const mod = await importOriginal<typeof PointPack>();
  return {
    ...mod,
    packPointResult: (v: unknown) => {
      spy.seen.push(structuredClone(v));
      return spy.plain ? undefined : mod.packPointResult(v);
    },
  };
});
const { packPointResult, PACK_MARK } = await vi.importActual<typeof PointPack>('../../app/api/point-pack');

/** What insertRevision stores for a result. */
const stored = (v: unknown): string => packPointResult(v) ?? encodeJson(v);

/** Same value, same key order, same types (NaN and Infinity included). */
function sameValue(a: unknown, b: unknown): void {
  expect(a).toStrictEqual(b);
  expect(encodeJson(a)).toBe(encodeJson(b));
}

let bundle: SampleBundle;
const labs: { packed?: { db: LabDb; api: LabApi; seen: unknown[] }; plain?: { db: LabDb; api: LabApi } } = {};

async function demoLab(plain: boolean): Promise<{ db: LabDb; api: LabApi; seen: unknown[] }> {
  spy.plain = plain;
  spy.seen = [];
  const db = openLabDb(':memory:');
  const api = createLabService(db, { clock });
  await loadBundle(api, { ...bundle, meters: bundle.meters.map((m) => ({ ...m, state: 'in-service' })) });
  const seen = spy.seen;
  spy.plain = false;
  return { db, api, seen };
}

const storedTexts = (db: LabDb) =>
  db.prepare('SELECT result_json FROM check_point ORDER BY id').pluck().all() as string[];
const checkIds = (db: LabDb) =>
  db.prepare('SELECT id FROM check_event ORDER BY id').pluck().all() as number[];

beforeAll(async () => {
  bundle = readSampleBundle();
  labs.packed = await demoLab(false);
  labs.plain = await demoLab(true);
}, 120_000);

describe('packed point results on the demo lab', () => {
  it('store every point packed, and read back what the JSON text of the same result reads as', () => {
    const { db, seen } = labs.packed as { db: LabDb; seen: unknown[] };
    const texts = storedTexts(db);
    expect(texts.length).toBeGreaterThan(1000);
    expect(seen.length).toBe(texts.length);
    let packedChars = 0;
    let jsonChars = 0;
    texts.forEach((text, i) => {
      const result = seen[i];
      expect(text.startsWith(PACK_MARK)).toBe(true);
      expect(text).toBe(stored(result));
      const json = encodeJson(result);
      // SQLite's JSON functions read the numbers outside the budget lines where they were.
      const viaSql = db
        .prepare("SELECT ? -> '$.budget.combinedHz', ? ->> '$.decision.verdict', ? -> '$.errorHz'")
        .raw()
        .get(text, text, text);
      expect(viaSql).toEqual(
        db
          .prepare("SELECT ? -> '$.budget.combinedHz', ? ->> '$.decision.verdict', ? -> '$.errorHz'")
          .raw()
          .get(json, json, json),
      );
      sameValue(decodeJson(text), decodeJson(json));
      expect(canonicalBytes(decodeJson(text)).equals(canonicalBytes(decodeJson(json)))).toBe(true);
      packedChars += text.length;
      jsonChars += json.length;
    });
    // The point of the form: about half the text (0.52 on the demo lab when written).
    expect(packedChars / jsonChars).toBeLessThan(0.55);
  });

  it('give the same checks through the API as a lab file written with JSON results', async () => {
    const packed = labs.packed as { db: LabDb; api: LabApi };
    const plain = labs.plain as { db: LabDb; api: LabApi };
    expect(storedTexts(plain.db).every((t) => t.startsWith('{'))).toBe(true);
    const ids = checkIds(packed.db);
    expect(ids).toEqual(checkIds(plain.db));
    for (const id of ids) {
      const a = await packed.api.getCheck(id);
      const b = await plain.api.getCheck(id);
      sameValue(a, b);
      expect(canonicalBytes(a).equals(canonicalBytes(b))).toBe(true);
    }
    const meter = bundle.meters[0]?.assetId as string;
    sameValue(await packed.api.getTrend(meter), await plain.api.getTrend(meter));
    sameValue(await packed.api.exportCsv(), await plain.api.exportCsv());
  }, 120_000);

  it('keep an old file signed with JSON results verifying, beside new packed checks', async () => {
    const old = labs.plain as { db: LabDb; api: LabApi };
    const first = await old.api.getCheck(1);
    const passphrase = 'old-file-passphrase';
    await old.api.enrolSigner({ name: first.performer, passphrase });
    const signedOld = await old.api.signCheck({ checkId: 1, person: first.performer, passphrase });
    expect(signedOld.record.state).toBe('signed');
    // The file as the new code finds it: rows still JSON, the signature made over them.
    const before = await old.api.getCheck(1);
    expect((await old.api.verifyIntegrity()).ok).toBe(true);
    // A check recorded now is packed; it signs and verifies beside the old ones.
    const c = bundle.checks[0] as { date: string };
    const recorded = await old.api.recordCheck({ ...(c as object), date: '2026-11-30' } as Parameters<
      LabApi['recordCheck']
    >[0]);
    const text = old.db
      .prepare(
        'SELECT cp.result_json FROM check_point cp JOIN check_revision cr ON cr.id = cp.revision_id WHERE cr.check_id = ?',
      )
      .pluck()
      .get(recorded.checkId) as string;
    expect(text.startsWith(PACK_MARK)).toBe(true);
    await old.api.enrolSigner({ name: recorded.performer, passphrase: 'new-check-passphrase' }).catch(() => {
      // Already enrolled when the same person performed both.
    });
    const who = recorded.performer === first.performer ? passphrase : 'new-check-passphrase';
    await old.api.signCheck({ checkId: recorded.checkId, person: recorded.performer, passphrase: who });
    const report = await old.api.verifyIntegrity();
    expect(report.ok).toBe(true);
    sameValue(await old.api.getCheck(1), before);
  }, 120_000);
});

describe('packPointResult on any value', () => {
  const words = fc.constantFrom(
    'Infinity',
    '-Infinity',
    'NaN',
    '~',
    '~0',
    '~~x',
    '~1|a',
    'Hz',
    'Reference source (certificate)',
    'Setting on the dip (',
    'Setting on the dip ()',
    'Repeatability (pooled s = 1 Hz, 4 readings)',
    'test uncertainty ratio 1.20 is below 4',
    '__proto__',
  );
  const leaf = fc.oneof(
    fc.double(),
    fc.constantFrom(Infinity, -Infinity, NaN, -0, 0),
    fc.string(),
    words,
    fc.boolean(),
    fc.constant(null),
  );
  const key = fc.oneof(
    fc.string(),
    words,
    fc.constantFrom('kind', 'multipleOfU', 'key', 'label', 'contributions', '1', '10'),
  );
  const { value } = fc.letrec((tie) => ({
    value: fc.oneof(
      { depthSize: 'small', withCrossShrink: true },
      leaf,
      fc.array(tie('value'), { maxLength: 4 }),
      fc.dictionary(key, tie('value'), { maxKeys: 4 }),
    ),
  }));
  // Budget lines in the engine's two key orders with any values, and anything else.
  const line = fc.oneof(
    fc.record({
      key: words,
      label: fc.oneof(words, fc.string()),
      type: leaf,
      distribution: leaf,
      unit: leaf,
      standardUncertainty: leaf,
      sensitivity: leaf,
      dof: leaf,
      contributionHz: value,
    }),
    fc.record({
      key: leaf,
      label: fc.oneof(words, fc.string()),
      unit: words,
      sensitivity: leaf,
      type: leaf,
      distribution: leaf,
      standardUncertainty: leaf,
      dof: leaf,
      contributionHz: leaf,
    }),
    value,
  );
  const result = fc
    .record({ lines: fc.array(line, { maxLength: 10 }), top: leaf, notes: fc.array(leaf, { maxLength: 3 }) })
    .map(({ lines, top, notes }) => {
      const r = structuredClone((labs.packed as { seen: unknown[] }).seen[0]) as Record<string, unknown>;
      r.meanDial = top;
      r.notes = notes;
      (r.budget as Record<string, unknown>).contributions = lines;
      return r;
    });

  it('reads back as the JSON text of the same result reads', () => {
    let packed = 0;
    fc.assert(
      fc.property(result, (v) => {
        const text = stored(v);
        if (text.startsWith(PACK_MARK)) packed++;
        sameValue(decodeJson(text), decodeJson(encodeJson(v)));
      }),
      { numRuns: 3000 },
    );
    expect(packed).toBeGreaterThan(1500);
  });

  it('leaves to JSON what the form cannot hold exactly, and refuses codes it does not know', () => {
    const result = (labs.packed as { seen: unknown[] }).seen[0] as Record<string, unknown>;
    const budget = result.budget as Record<string, unknown>;
    expect(packPointResult({ ...result, extra: 1 })).toBeUndefined();
    expect(
      packPointResult({ ...result, budget: { ...budget, contributions: [{ a: undefined }] } }),
    ).toBeUndefined();
    expect(
      packPointResult({ ...result, budget: { ...budget, contributions: [new Date(0)] } }),
    ).toBeUndefined();
    expect(
      packPointResult({ ...result, budget: { ...budget, contributions: [JSON.parse('{"__proto__": 1}')] } }),
    ).toBeUndefined();
    const text = stored(result);
    expect(() => decodeJson(text.replace(/"~[0-9a-z]+"/, '"~zz"'))).toThrow(/unknown word/);
    expect(() => decodeJson(text.replace(/\[\d,/, '[99,'))).toThrow(/unknown shape/);
    // A text that begins like the form but is not it reads as plain JSON.
    sameValue(decodeJson('{"~":1,"a":"Infinity"}'), { '~': 1, a: Infinity });
    sameValue(decodeJson('{"dof":"Infinity","a":[1,"NaN"]}'), { dof: Infinity, a: [1, NaN] });
  });
});
