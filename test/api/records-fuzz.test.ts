// Property-based tests (fast-check, fixed seed from test/setup.ts): malformed and random inputs
// to every API operation and every file reader. Each must answer or refuse with a LabError
// (never crash, never an "internal" fault); a refusal, and any read, leaves the lab file as it
// was. The long run (`npm run test:long`, DIPLEDGER_TEST_LONG=1) takes 10,000 cases per entry point;
// DIPLEDGER_FUZZ_RUNS sets any other count.
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { OPERATIONS, type LabApi, type OperationName } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { createLabService, csvToDocuments, CSV_COLUMNS } from '../../app/api/service';
import { parseDivisions, parseFrequencyHz } from '../../app/engine';
import { readDelimitedTrace } from '../../app/formats/trace-csv';
import { readSweepFile } from '../../app/formats/sweep-file';
import { readTouchstone } from '../../app/formats/touchstone';
import { openLabDb, type LabDb } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';
import { LONG } from '../fixtures/test-level';

const RUNS = Number(process.env.DIPLEDGER_FUZZ_RUNS ?? (LONG ? 10000 : 60));
const TIMEOUT_MS = Math.max(60_000, RUNS * 40);

let db: LabDb;
let api: LabApi;
let fingerprint: () => string;

beforeAll(async () => {
  db = openLabDb(':memory:');
  api = createLabService(db, { clock });
  await seed(api);
  await api.enrolSigner({ name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' });
  await api.enrolSigner({ name: 'Bo Marsh', passphrase: 'bo-passphrase-22' });
  await api.recordCheck(goodCheck());
  const tables = (
    db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name").all() as {
      name: string;
    }[]
  )
    .map((t) => t.name)
    // meter_summary is the register's cache of derived per-meter summaries, filled by whichever
    // read first needs a meter's summary; integrity compares it with the records.
    .filter((t) => t !== 'meter_summary');
  // Row counts of every table, plus the rows an update may change in place.
  const counts = tables.map((t) => db.prepare(`SELECT count(*) AS n FROM "${t}"`).pluck());
  const inPlace = [
    db.prepare('SELECT * FROM lab'),
    db.prepare('SELECT asset_id, state FROM meter ORDER BY id'),
    db.prepare('SELECT id, state FROM check_revision ORDER BY id'),
    db.prepare('SELECT max(id) FROM audit_entry').pluck(),
  ];
  fingerprint = () => JSON.stringify([counts.map((s) => s.get()), inPlace.map((s) => s.all())]);
}, 60_000);

/** Weighted toward the shapes an operation expects, so cases get past the first check. */
const junk = fc.anything({
  withBigInt: true,
  withDate: true,
  withMap: true,
  withSet: true,
  withTypedArray: true,
});
const text = fc.oneof(
  fc.string(),
  fc.string({ unit: 'grapheme' }),
  fc.constantFrom('', ' ', '\u0000', '\uD800'),
);
const rare = <T>(common: fc.Arbitrary<T>, special: fc.Arbitrary<T>) =>
  fc.oneof({ arbitrary: common, weight: 30 }, { arbitrary: special, weight: 1 });

const checkDoc = fc
  .record({
    key: fc.constantFrom(...Object.keys(goodCheck()), 'points.0.readings.0.value', 'conditions.temperatureC'),
    value: fc.oneof(junk, text, fc.double()),
    date: fc.date({ min: new Date('2020-01-01'), max: new Date('2027-12-31'), noInvalidDate: true }),
  })
  .map(({ key, value, date }) => {
    const doc = JSON.parse(JSON.stringify(goodCheck({ date: date.toISOString().slice(0, 10) }))) as Record<
      string,
      unknown
    >;
    const parts = key.split('.');
    let at: Record<string, unknown> = doc;
    for (const p of parts.slice(0, -1)) at = at[p] as Record<string, unknown>;
    at[parts[parts.length - 1] as string] = value;
    return doc;
  });

const csvText = fc
  .array(fc.array(fc.oneof(text, fc.double().map(String)), { maxLength: CSV_COLUMNS.length + 2 }), {
    maxLength: 6,
  })
  .map((rows) => [CSV_COLUMNS.join(','), ...rows.map((r) => r.join(','))].join('\r\n'));

const SPECIFIC: Partial<Record<OperationName, fc.Arbitrary<unknown>>> = {
  recordCheck: checkDoc,
  importCsv: fc.oneof(csvText, text),
  getCheck: fc.oneof(fc.integer(), fc.double(), text),
  signCheck: fc.record(
    {
      checkId: rare(fc.oneof(fc.integer(), junk), fc.constant(1)),
      person: rare(text, fc.constantFrom('Ada Fenwick', 'Bo Marsh')),
      passphrase: fc.oneof(text, junk),
      meaning: fc.oneof(fc.constantFrom('performed', 'reviewed', 'approved'), junk),
    },
    { requiredKeys: [] },
  ),
  amendCheck: fc.record(
    {
      checkId: fc.oneof(fc.constant(1), fc.integer(), junk),
      reason: fc.oneof(text, junk),
      document: fc.oneof(checkDoc, junk),
    },
    { requiredKeys: [] },
  ),
  enrolSigner: fc.record(
    {
      name: rare(fc.oneof(fc.constantFrom('Ada Fenwick', 'Bo Marsh'), junk), text),
      role: fc.oneof(fc.constantFrom('technician', 'reviewer', 'administrator'), junk),
      passphrase: fc.oneof(text, junk),
    },
    { requiredKeys: ['name'] },
  ),
  getCheckRevision: fc.record(
    { checkId: fc.oneof(fc.constant(1), junk), revision: fc.oneof(fc.integer(), junk) },
    { requiredKeys: [] },
  ),
  listAudit: fc.record(
    { entity: fc.oneof(text, junk), entityId: fc.oneof(text, junk), limit: fc.oneof(fc.integer(), junk) },
    { requiredKeys: [] },
  ),
  changeMeterState: fc.record(
    {
      assetId: fc.oneof(fc.constantFrom('TW-01', 'TW-02'), text),
      state: fc.oneof(fc.constantFrom('in-service', 'quarantined', 'withdrawn'), junk),
      reason: fc.oneof(text, junk),
    },
    { requiredKeys: [] },
  ),
};

/** Operations whose success is costly (documents, key derivation) are still run on every case. */
async function callOnce(op: OperationName, input: unknown): Promise<void> {
  const before = fingerprint();
  const call = (arg: unknown) => (api[op] as (a: unknown) => Promise<unknown>)(arg);
  let refused = false;
  try {
    await call(input);
  } catch (e) {
    refused = true;
    if (!(e instanceof LabError))
      throw new Error(`${op} crashed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
    if (e.code === 'internal') throw new Error(`${op} reported an internal fault: ${e.message}`);
    expect(typeof e.message === 'string' && e.message.length > 0).toBe(true);
  }
  if (refused || OPERATIONS[op] === 'read')
    expect(fingerprint(), `${op} ${refused ? 'refused but wrote' : 'read but wrote'}`).toBe(before);
}

describe('every API operation on malformed and random input', () => {
  const ops = Object.keys(OPERATIONS) as OperationName[];
  it.each(ops)(
    '%s: answers or refuses with a LabError; a refusal or a read writes nothing',
    async (op) => {
      const arb = SPECIFIC[op]
        ? fc.oneof({ arbitrary: SPECIFIC[op], weight: 3 }, { arbitrary: junk, weight: 1 })
        : fc.oneof(junk, text, fc.object());
      await fc.assert(
        fc.asyncProperty(arb, (input) => callOnce(op, input)),
        { numRuns: RUNS },
      );
    },
    TIMEOUT_MS,
  );
});

describe('every reader on malformed and random text', () => {
  const readers: [string, (t: string) => unknown][] = [
    ['history CSV (csvToDocuments)', (t) => csvToDocuments(t)],
    ['frequency text (parseFrequencyHz)', (t) => parseFrequencyHz(t, 'f')],
    ['dial divisions (parseDivisions)', (t) => parseDivisions(t, 'd')],
    ['Touchstone (readTouchstone)', (t) => readTouchstone(t, 'trace.s2p')],
    ['delimited trace (readDelimitedTrace)', (t) => readDelimitedTrace(t)],
    ['sweep file (readSweepFile)', (t) => readSweepFile(t, 'trace.csv')],
  ];
  it.each(readers)(
    '%s never throws anything but a LabError',
    (_name, read) => {
      const input = fc.oneof(
        text,
        csvText,
        fc.array(fc.oneof(fc.double().map(String), text), { maxLength: 12 }).map((a) => a.join(' ')),
      );
      fc.assert(
        fc.property(input, (t) => {
          try {
            read(t);
          } catch (e) {
            if (!(e instanceof LabError)) throw e;
          }
        }),
        { numRuns: RUNS },
      );
    },
    TIMEOUT_MS,
  );
});
