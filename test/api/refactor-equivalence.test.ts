// Answers kept identical across the service's reorganisation: on the demo lab and a 300-meter
// fleet, every read answer (register, due list, each meter's page, trend, fitness for use,
// coverage, checks, sweeps, documents, audit) and the bytes of every stored row are compared,
// as SHA-256 digests, against test/fixtures/refactor-answers.json, which was written by this
// file run on the code before the reorganisation (see the note in that fixture). Signing keys
// and the salts that seal them come from a seeded stream instead of the system's randomness, so
// signatures and sealed keys are the same bytes on every run.
//
// To rewrite the fixture (only when an answer is meant to change, with the reason in the commit):
//   DIPLEDGER_WRITE_EQUIVALENCE=1 npx vitest run test/api/refactor-equivalence.test.ts
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it, vi } from 'vitest';
import type * as NodeCrypto from 'node:crypto';
import type { LabApi } from '../../app/api/contract';
import type * as Store from '../../db/store';
import type { LabDb } from '../../db/store';

vi.mock('node:crypto', async (importOriginal) => {
  const real = await importOriginal<typeof NodeCrypto>();
  let counter = 0;
  const stream = (n: number): Buffer => {
    const out: Buffer[] = [];
    let have = 0;
    while (have < n) {
      const block = real.createHash('sha256').update(`equivalence-seed/${counter++}`).digest();
      out.push(block);
      have += block.length;
    }
    return Buffer.concat(out).subarray(0, n);
  };
  // PKCS#8 wrapping of a raw 32-byte Ed25519 seed (RFC 8410).
  const PKCS8_ED25519 = Buffer.from('302e020100300506032b657004220420', 'hex');
  const generateKeyPairSync = ((type: string, ...rest: unknown[]) => {
    if (type !== 'ed25519') return (real.generateKeyPairSync as (...a: unknown[]) => unknown)(type, ...rest);
    const privateKey = real.createPrivateKey({
      key: Buffer.concat([PKCS8_ED25519, stream(32)]),
      format: 'der',
      type: 'pkcs8',
    });
    return { privateKey, publicKey: real.createPublicKey(privateKey) };
  }) as typeof real.generateKeyPairSync;
  const randomBytes = ((n: number) => stream(n)) as typeof real.randomBytes;
  const mocked = { ...real, generateKeyPairSync, randomBytes };
  return { ...mocked, default: mocked };
});

const { openApi } = await import('../../app/api/open');
const { loadBundle, readSampleBundle } = await import('../../sample-lab/load');
const { clock } = await import('../fixtures/lab');
const { createFleet, historyCsv } = await import('../bench/fleet-data');

const FIXTURE = new URL('../fixtures/refactor-answers.json', import.meta.url);
const WRITE = process.env.DIPLEDGER_WRITE_EQUIVALENCE === '1';
const FLEET_METERS = 300;

type Digests = Record<string, string>;

function digest(value: unknown): string {
  const text = JSON.stringify(value, (_k, v: unknown) => {
    if (typeof v === 'number' && !Number.isFinite(v)) return `#${String(v)}`;
    if (v instanceof Uint8Array) return `bytes:${Buffer.from(v).toString('base64')}`;
    return v;
  });
  return createHash('sha256')
    .update(text ?? 'undefined')
    .digest('hex')
    .slice(0, 16);
}

/** An answer, or the refusal it gave (a refusal is an answer too). */
async function answer(run: () => Promise<unknown>): Promise<unknown> {
  try {
    return await run();
  } catch (e) {
    return { refused: e instanceof Error ? e.message : String(e) };
  }
}

/** Every row of every table, byte for byte (ordered by rowid where the table has one). */
function storedRows(db: LabDb, out: Digests, prefix: string): void {
  const tables = db
    .prepare(
      "SELECT name, sql FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
    )
    .all() as { name: string; sql: string }[];
  for (const t of tables) {
    // The migration log records when the file was made, by the system clock.
    if (t.name === 'schema_migration') continue;
    const withoutRowid = /WITHOUT\s+ROWID/i.test(t.sql);
    const rows = db
      .prepare(`SELECT * FROM "${t.name}"${withoutRowid ? '' : ' ORDER BY rowid'}`)
      .raw(true)
      .all() as unknown[][];
    if (withoutRowid) rows.sort((a, b) => (digest(a) < digest(b) ? -1 : 1));
    out[`${prefix} rows ${t.name}`] = digest(rows);
  }
}

async function meterAnswers(api: LabApi, out: Digests, prefix: string, assetId: string): Promise<void> {
  const detail = await api.getMeter(assetId);
  out[`${prefix} meter ${assetId}`] = digest(detail);
  out[`${prefix} trend ${assetId}`] = digest(await answer(() => api.getTrend(assetId)));
  const { minHz, maxHz } = detail.meter;
  for (const [name, hz] of [
    ['low', minHz],
    ['mid', (minHz + maxHz) / 2],
    ['high', maxHz],
  ] as const) {
    out[`${prefix} use ${assetId} ${name}`] = digest(
      await answer(() => api.fitForUse({ assetId, frequency: `${hz} Hz` })),
    );
  }
  out[`${prefix} sweeps ${assetId}`] = digest(await answer(() => api.listSweeps(assetId)));
}

async function labAnswers(api: LabApi, out: Digests, prefix: string): Promise<string[]> {
  out[`${prefix} lab`] = digest(await api.getLab());
  const register = await api.listMeters();
  out[`${prefix} register`] = digest(register);
  out[`${prefix} due 3650`] = digest(await api.listDue({ withinDays: 3650 }));
  out[`${prefix} due 60`] = digest(await api.listDue({ withinDays: 60 }));
  out[`${prefix} coverage`] = digest(await answer(() => api.coverage()));
  out[`${prefix} standards`] = digest(await api.listStandards());
  out[`${prefix} people`] = digest(await api.listPeople());
  out[`${prefix} use anywhere 10 GHz`] = digest(await answer(() => api.fitForUse({ frequency: '10 GHz' })));
  return register.map((r) => r.assetId);
}

async function demoAnswers(): Promise<Digests> {
  const out: Digests = {};
  const lab = openApi(':memory:', { create: true, clock });
  try {
    const api = lab.api;
    const bundle = readSampleBundle();
    await loadBundle(api, bundle);
    const meters = await labAnswers(api, out, 'demo');
    for (const m of meters) await meterAnswers(api, out, 'demo', m);
    const checkIds: number[] = [];
    for (const m of meters) for (const c of (await api.getMeter(m)).checks) checkIds.push(c.checkId);
    for (const id of checkIds) {
      out[`demo check ${id}`] = digest(await api.getCheck(id));
      out[`demo check sweeps ${id}`] = digest(await answer(() => api.getSweeps(id)));
    }
    out['demo csv'] = digest(await api.exportCsv());
    out['demo worksheet'] = digest(await answer(() => api.worksheet(meters[0] as string)));

    // Signing, amending and issuing: the signed payloads, signatures and documents.
    const newest = checkIds.slice(-3);
    const performers = new Set<string>();
    for (const id of newest) performers.add((await api.getCheck(id)).performer);
    for (const name of [...performers].sort())
      await api.enrolSigner({ name, passphrase: 'performer passphrase' });
    await api.enrolSigner({ name: 'Bo Equivalence', role: 'reviewer', passphrase: 'second passphrase' });
    out['demo signers'] = digest(await api.listSigners());
    const signBoth = async (id: number) => {
      const performer = (await api.getCheck(id)).performer;
      await api.signCheck({ checkId: id, person: performer, passphrase: 'performer passphrase' });
      return api.signCheck({ checkId: id, person: 'Bo Equivalence', passphrase: 'second passphrase' });
    };
    for (const id of newest) out[`demo signed ${id}`] = digest(await signBoth(id));
    const amended = newest[0] as number;
    const original = await api.getCheck(amended);
    const source = bundle.checks.find((c) => c.meter === original.meterAssetId && c.date === original.date);
    out['demo revision before amend'] = digest(await api.getCheckRevision({ checkId: amended }));
    out['demo amend'] = digest(
      await answer(() =>
        api.amendCheck({
          checkId: amended,
          reason: 'Remark corrected after review',
          document: { ...source, remarks: 'Dial lock screw found loose; remark corrected after review' },
        }),
      ),
    );
    out['demo signed amendment'] = digest(await answer(() => signBoth(amended)));
    for (const id of newest) {
      const cert = await answer(() => api.issueCertificate({ checkId: id }));
      out[`demo certificate ${id}`] = digest(cert);
      out[`demo sheet ${id}`] = digest(await answer(() => api.issueSheet({ checkId: id })));
      const pdf = (cert as { pdfBase64?: string }).pdfBase64;
      expect(pdf, `certificate of check ${id}`).toBeTypeOf('string');
      const verified = await api.verifyDocument({ pdfBase64: pdf as string });
      expect(verified).toMatchObject({ ok: true });
      out[`demo verify ${id}`] = digest(verified);
      out[`demo revision ${id}`] = digest(await answer(() => api.getCheckRevision({ checkId: id })));
    }
    out['demo documents'] = digest(await api.listDocuments());
    out['demo audit'] = digest(await api.listAudit({ limit: 10000 }));
    out['demo integrity'] = digest(await api.verifyIntegrity());
    out['demo due after signing'] = digest(await api.listDue({ withinDays: 3650 }));
    out['demo register after signing'] = digest(await api.listMeters());
    storedRows(dbOf(api), out, 'demo');
  } finally {
    lab.close();
  }
  return out;
}

async function fleetAnswers(): Promise<Digests> {
  const out: Digests = {};
  const lab = openApi(':memory:', { create: true, clock });
  try {
    const api = lab.api;
    await createFleet(api, FLEET_METERS);
    const batch = 50;
    for (let from = 0; from < FLEET_METERS; from += batch) {
      const h = historyCsv(from, Math.min(FLEET_METERS, from + batch));
      out[`fleet import ${from}`] = digest(await api.importCsv(h.csv));
    }
    const meters = await labAnswers(api, out, 'fleet');
    for (const m of meters) await meterAnswers(api, out, 'fleet', m);
    storedRows(dbOf(api), out, 'fleet');
  } finally {
    lab.close();
  }
  return out;
}

/** The service's database handle, for reading stored rows (a test-only look behind the API). */
let lastDb: LabDb | undefined;
function dbOf(_api: LabApi): LabDb {
  if (!lastDb) throw new Error('no database opened');
  return lastDb;
}

// openApi does not hand out its database; wrap openLabDb to keep the last one opened.
vi.mock('../../db/store', async (importOriginal) => {
  const real = await importOriginal<typeof Store>();
  return {
    ...real,
    openLabDb: (...args: Parameters<typeof real.openLabDb>) => {
      lastDb = real.openLabDb(...args);
      return lastDb;
    },
  };
});

/** The answers whose digests differ (or are missing on one side). */
function differing(got: Digests, expected: Digests): string[] {
  return [...new Set([...Object.keys(expected), ...Object.keys(got)])].filter((k) => got[k] !== expected[k]);
}

interface Fixture {
  note: string;
  demo: Digests;
  fleet: Digests;
}

describe('answers identical to the code before the service was reorganised', () => {
  const expected: Fixture | undefined = WRITE
    ? undefined
    : (JSON.parse(readFileSync(FIXTURE, 'utf8')) as Fixture);
  const got: Partial<Fixture> = {};

  it('on the demo lab', async () => {
    got.demo = await demoAnswers();
    expect(Object.keys(got.demo).length).toBeGreaterThan(100);
    if (expected) expect(differing(got.demo, expected.demo)).toEqual([]);
  }, 300_000);

  it(`on a ${FLEET_METERS}-meter fleet with 25 years of history`, async () => {
    got.fleet = await fleetAnswers();
    expect(Object.keys(got.fleet).length).toBeGreaterThan(FLEET_METERS * 5);
    if (expected) expect(differing(got.fleet, expected.fleet)).toEqual([]);
    if (WRITE) {
      const fixture: Fixture = {
        note:
          'SHA-256 digests (first 16 hex) of answers and stored rows, written by ' +
          'test/api/refactor-equivalence.test.ts with DIPLEDGER_WRITE_EQUIVALENCE=1 on the code before the ' +
          'service was split into app/api/ops, checks and history (branch arch-service, from main at ba181e4).',
        demo: got.demo ?? {},
        fleet: got.fleet,
      };
      writeFileSync(FIXTURE, `${JSON.stringify(fixture, null, 0)}\n`);
    }
  }, 900_000);
});
