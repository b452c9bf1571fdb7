// Property tests over the set-up documents: the register CSV reader never throws and names a
// line for every problem; any meter the API accepts goes out through the register CSV and comes
// back the same; a meter document of any shape is either added whole or refused with named
// fields and nothing written.
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { openApi } from '../../app/api/open';
import { LabError } from '../../app/api/errors';
import { readRegisterCsv, REGISTER_COLUMNS } from '../../app/formats/register-csv';
import { clock } from '../fixtures/lab';

const RUNS = Number(process.env.FC_RUNS ?? 60);

const lab = openApi(':memory:', { create: true, clock });
afterAll(() => lab.close());

const cell = fc.oneof(
  fc.string({ maxLength: 12 }),
  fc.constantFrom(
    '2 GHz',
    '4 GHz',
    'direct',
    'divisions',
    'coaxial',
    '1 MHz',
    '0=4 GHz;10=2 GHz',
    '"',
    ',',
    '\n',
    '-1',
    '1e400',
  ),
);

describe('register CSV reader', () => {
  it('never throws, and every problem names a line and a column', () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.string({ maxLength: 300 }),
          fc
            .array(fc.array(cell, { minLength: 1, maxLength: REGISTER_COLUMNS.length + 2 }), { maxLength: 5 })
            .map((rows) => [REGISTER_COLUMNS.join(','), ...rows.map((r) => r.join(','))].join('\n')),
        ),
        (text) => {
          const read = readRegisterCsv(text);
          for (const i of read.issues) {
            expect(i.line).toBeGreaterThanOrEqual(1);
            expect(i.message).toMatch(new RegExp(`^line ${i.line}, column `));
          }
          for (const r of read.rows) expect(r.line).toBeGreaterThanOrEqual(2);
        },
      ),
      { numRuns: RUNS * 5 },
    );
  });
});

const meterDoc = fc.record({
  assetId: fc.stringMatching(/^[A-Z]{2}-[0-9]{1,4}$/),
  description: fc.string({ maxLength: 20 }),
  construction: fc.constantFrom('coaxial', 'waveguide'),
  port: fc.constantFrom('', 'N female', 'WR-90', 'SMA, "f"'),
  minGHz: fc.double({ min: 1, max: 50, noNaN: true }),
  spanGHz: fc.double({ min: 0.5, max: 50, noNaN: true }),
  accuracyRelPpm: fc.oneof(fc.double({ min: -10, max: 2e6, noNaN: true }), fc.constant(0)),
  intervalMonths: fc.integer({ min: -1, max: 250 }),
  alphaPerK: fc.double({ min: -2e-4, max: 2e-4, noNaN: true }),
  location: fc.string({ maxLength: 10 }),
});

describe('meter documents', () => {
  it('are added whole or refused with named fields, nothing written; what is added round-trips through the CSV', async () => {
    let added = 0;
    await fc.assert(
      fc.asyncProperty(meterDoc, async (d) => {
        const before = await lab.api.exportRegister();
        const trail = (await lab.api.listAudit({ limit: 10000 })).length;
        const doc = {
          assetId: d.assetId,
          description: d.description,
          construction: d.construction,
          port: d.port,
          min: `${d.minGHz} GHz`,
          max: `${d.minGHz + d.spanGHz} GHz`,
          dialKind: 'direct',
          accuracyRelPpm: d.accuracyRelPpm,
          resolution: '1 MHz',
          alphaPerK: d.alphaPerK,
          intervalMonths: d.intervalMonths,
          location: d.location,
          plan: [`${d.minGHz + d.spanGHz / 2} GHz`],
        };
        try {
          const m = await lab.api.createMeter(doc as never);
          added += 1;
          expect(m.assetId).toBe(d.assetId);
        } catch (e) {
          expect(e).toBeInstanceOf(LabError);
          const issues = (e as LabError).issues;
          expect(issues.length).toBeGreaterThan(0);
          for (const i of issues) expect(i.field).not.toBe('');
          expect(await lab.api.exportRegister()).toBe(before);
          expect((await lab.api.listAudit({ limit: 10000 })).length).toBe(trail);
        }
      }),
      { numRuns: RUNS },
    );
    expect(added).toBeGreaterThan(0);
    const csv = await lab.api.exportRegister();
    const other = openApi(':memory:', { create: true, clock });
    try {
      await other.api.updateLab({ name: 'Copy' });
      await other.api.importRegister({ csv });
      expect(await other.api.exportRegister()).toBe(csv);
      for (const r of await lab.api.listMeters())
        expect((await other.api.getMeter(r.assetId)).meter).toEqual(
          (await lab.api.getMeter(r.assetId)).meter,
        );
    } finally {
      other.close();
    }
  });
});
