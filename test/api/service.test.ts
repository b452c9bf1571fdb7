// Integration through the real API path: in-memory lab file, fixed clock, the same service the
// CLI and the UI use. Bad input is refused with the field named, and nothing is written.
import { describe, expect, it } from 'vitest';
import { LabError } from '../../app/api/errors';
import type { LabApi } from '../../app/api/contract';
import { goodCheck, seededLab } from '../fixtures/lab';

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

/** A fingerprint of everything the lab holds, to show a refusal wrote nothing. */
async function fingerprint(api: LabApi): Promise<string> {
  const meters = await api.listMeters();
  const details = await Promise.all(meters.map((m) => api.getMeter(m.assetId)));
  return JSON.stringify([
    meters,
    details,
    await api.listStandards(),
    await api.listPeople(),
    await api.exportCsv(),
  ]);
}

describe('recording a check', () => {
  it('judges every point and updates the register', async () => {
    const lab = await seededLab();
    const rec = await lab.api.recordCheck(goodCheck());
    expect(rec.revision).toBe(1);
    expect(rec.state).toBe('draft');
    expect(rec.engineVersion).toMatch(/^\d+\.\d+\.\d+$/);
    const p = rec.points[0];
    expect(p).toBeDefined();
    if (!p) return;
    expect(p.referenceHz).toBe(10e9);
    // Indication is the mean of the direction means: (10.0035 + 10.0045) / 2 GHz.
    expect(p.result.indicatedHz).toBeCloseTo(10.004e9, 0);
    expect(p.result.errorHz).toBeCloseTo(p.result.correctedHz - 10e9, 3);
    // 0.1 % of reading at 10 GHz is 10 MHz (common practice tolerance).
    expect(p.result.decision.toleranceHz).toBeCloseTo(0.001 * p.result.correctedHz, 0);
    expect(p.result.budget.contributions.map((c) => c.key)).toEqual(
      expect.arrayContaining([
        'reference',
        'repeatability',
        'resolution',
        'hysteresis',
        'setting',
        'temperature',
        'pressure',
        'humidity',
      ]),
    );
    expect(rec.asFoundVerdict).toBe('pass');
    expect(rec.asLeftVerdict).toBe('pass');
    const reg = (await lab.api.listMeters()).find((r) => r.assetId === 'TW-01');
    expect(reg).toMatchObject({
      lastCheckDate: '2026-11-20',
      lastVerdict: 'pass',
      dueDate: '2027-11-20',
      daysToDue: 354,
    });
    const again = await lab.api.getCheck(rec.checkId);
    expect(again).toEqual(rec);
    lab.close();
  });

  it('reads a divisions meter through its chart', async () => {
    const lab = await seededLab();
    const rec = await lab.api.recordCheck(
      goodCheck({
        meter: 'TW-02',
        points: [
          {
            reference: '2.9 GHz',
            readings: [
              { value: 10.01, direction: 'up' },
              { value: 10.02, direction: 'up' },
              { value: '10.00 div', direction: 'down' },
              { value: 10.01, direction: 'down' },
            ],
          },
        ],
      }),
    );
    const p = rec.points[0];
    // Divisions rise as frequency falls; 10.01 div is just below 2.9 GHz on this chart.
    expect(p?.result.indicatedHz).toBeLessThan(2.9e9);
    expect(p?.result.indicatedHz).toBeGreaterThan(2.898e9);
    lab.close();
  });

  it('stores the adjusted as-left points apart from the as-found ones', async () => {
    const lab = await seededLab();
    const rec = await lab.api.recordCheck(
      goodCheck({
        adjusted: true,
        points: [
          {
            phase: 'as-found',
            reference: '10 GHz',
            readings: [
              { value: '10.0150 GHz', direction: 'up' },
              { value: '10.0160 GHz', direction: 'down' },
            ],
          },
          {
            phase: 'as-left',
            reference: '10 GHz',
            readings: [
              { value: '10.0010 GHz', direction: 'up' },
              { value: '10.0012 GHz', direction: 'down' },
            ],
          },
        ],
      }),
    );
    expect(rec.asFoundVerdict).toBe('fail');
    expect(rec.asLeftVerdict).toBe('pass');
    lab.close();
  });
});

describe('refusals name the field and write nothing', () => {
  const cases: { name: string; doc: Record<string, unknown>; field: RegExp; words: RegExp }[] = [
    {
      name: 'a decimal comma',
      doc: {
        points: [
          {
            reference: '9,3 GHz',
            readings: [
              { value: '9.3 GHz', direction: 'up' },
              { value: '9.3 GHz', direction: 'down' },
            ],
          },
        ],
      },
      field: /^points\[0\]\.reference$/,
      words: /decimal comma/,
    },
    {
      name: 'a missing unit',
      doc: {
        points: [
          {
            reference: '10 GHz',
            readings: [
              { value: '10.004', direction: 'up' },
              { value: '10.004 GHz', direction: 'down' },
            ],
          },
        ],
      },
      field: /^points\[0\]\.readings\[0\]\.value$/,
      words: /no unit/,
    },
    {
      name: 'a reading outside the band',
      doc: {
        points: [
          {
            reference: '12 GHz',
            readings: [
              { value: '14.2 GHz', direction: 'up' },
              { value: '12 GHz', direction: 'down' },
            ],
          },
        ],
      },
      field: /^points\[0\]\.readings\[0\]\.value$/,
      words: /band|outside/,
    },
    { name: 'a date in the future', doc: { date: '2027-01-15' }, field: /^date$/, words: /future/ },
    { name: 'an unknown meter', doc: { meter: 'NOPE-9' }, field: /^meter$/, words: /no meter "NOPE-9"/ },
    {
      name: 'a lab standard that does not exist',
      doc: { standards: ['SRC-Z'] },
      field: /^standards\[0\]$/,
      words: /no lab standard "SRC-Z"/,
    },
    {
      name: 'a standard out of calibration on the date',
      doc: { date: '2024-03-01' },
      field: /^standards\[0\]$/,
      words: /no valid calibration on 2024-03-01/,
    },
    {
      name: 'an unknown performer',
      doc: { performer: 'Nobody Known' },
      field: /^performer$/,
      words: /not one of the lab's people/,
    },
    { name: 'a malformed date', doc: { date: '2026-13-01' }, field: /^date$/, words: /YYYY-MM-DD/ },
    {
      name: 'humidity out of range',
      doc: { conditions: { temperatureC: 21, pressureHpa: 1010, humidityPct: 140 } },
      field: /^conditions\.humidityPct$/,
      words: /0 to 100/,
    },
    {
      name: 'a single reading',
      doc: { points: [{ reference: '10 GHz', readings: [{ value: '10 GHz', direction: 'up' }] }] },
      field: /^points\[0\]\.readings$/,
      words: /at least two/,
    },
    {
      name: 'a wrong direction word',
      doc: {
        points: [
          {
            reference: '10 GHz',
            readings: [
              { value: '10 GHz', direction: 'sideways' },
              { value: '10 GHz', direction: 'up' },
            ],
          },
        ],
      },
      field: /^points\[0\]\.readings\[0\]\.direction$/,
      words: /"up" or "down"/,
    },
  ];

  for (const c of cases) {
    it(`refuses ${c.name}`, async () => {
      const lab = await seededLab();
      const before = await fingerprint(lab.api);
      const e = await refusal(lab.api.recordCheck(goodCheck(c.doc)));
      expect(e.code).toBe('invalid-input');
      expect(e.issues.map((i) => i.field)).toEqual(expect.arrayContaining([expect.stringMatching(c.field)]));
      expect(e.message).toMatch(c.words);
      expect(await fingerprint(lab.api)).toBe(before);
      lab.close();
    });
  }

  it('refuses the same meter and date twice', async () => {
    const lab = await seededLab();
    await lab.api.recordCheck(goodCheck());
    const e = await refusal(lab.api.recordCheck(goodCheck()));
    expect(e.message).toMatch(/already recorded/);
  });

  it('refuses a meter whose band is given the wrong way round', async () => {
    const lab = await seededLab();
    const e = await refusal(
      lab.api.createMeter({
        assetId: 'X',
        construction: 'coaxial',
        min: '4 GHz',
        max: '2 GHz',
        dialKind: 'direct',
        accuracyRelPpm: 1000,
        resolution: '1 MHz',
        alphaPerK: 1e-5,
      }),
    );
    expect(e.issues[0]?.field).toBe('max');
  });
});

describe('the register and due dates', () => {
  it('lists what falls due within a window, overdue first', async () => {
    const lab = await seededLab();
    await lab.api.recordCheck(goodCheck({ date: '2025-12-10' })); // due 2026-12-10: in 9 days
    const due = await lab.api.listDue({ withinDays: 30 });
    expect(due.map((r) => r.assetId)).toEqual(['TW-02', 'TW-01']); // never checked first
    expect(due[1]?.daysToDue).toBe(9);
    expect((await lab.api.listDue({ withinDays: 5 })).map((r) => r.assetId)).toEqual(['TW-02']);
    const e = await refusal(lab.api.listDue({ withinDays: -3 }));
    expect(e.issues[0]?.field).toBe('withinDays');
  });
});

describe('one point on its own', () => {
  it('gives the same budget as the recorded check', async () => {
    const lab = await seededLab();
    const rec = await lab.api.recordCheck(goodCheck());
    const doc = goodCheck();
    const point = doc.points[0];
    if (!point) throw new Error('fixture');
    const res = await lab.api.evaluateBudget({
      format: 'dipledger.budget/1',
      meter: 'TW-01',
      standard: 'SRC-A',
      conditions: doc.conditions,
      reference: point.reference,
      readings: point.readings,
    });
    expect(res).toEqual(rec.points[0]?.result);
  });

  it('gives air refractivity at the bench (ITU-R P.453 formula, see test/reference)', async () => {
    const lab = await seededLab();
    const a = await lab.api.airRefractivity({ temperatureC: 20, humidityPct: 50, pressureHpa: 1013.25 });
    expect(a.refractivityN).toBeGreaterThan(318);
    expect(a.refractivityN).toBeLessThan(321);
    expect(a.refractiveIndex).toBeCloseTo(1 + a.refractivityN * 1e-6, 12);
    expect(a.shiftPpm).toBeCloseTo(0, 9); // the reference air itself
  });
});

describe('history in and out as CSV', () => {
  it('round-trips: export, import into a fresh lab, same results', async () => {
    const a = await seededLab();
    await a.api.recordCheck(goodCheck());
    await a.api.recordCheck(
      goodCheck({
        date: '2026-10-02',
        meter: 'TW-02',
        points: [
          {
            reference: '3 GHz',
            readings: [
              { value: 9.01, direction: 'up' },
              { value: 9.02, direction: 'down' },
            ],
          },
        ],
      }),
    );
    const csv = await a.api.exportCsv();
    expect(csv.split('\r\n')[0]).toMatch(/^meter,date,performer,standards,/);
    const b = await seededLab();
    const r = await b.api.importCsv(csv);
    expect(r).toEqual({ metersSeen: 2, checksImported: 2, pointsImported: 2 });
    expect(await b.api.exportCsv()).toBe(csv);
    const ca = await a.api.getMeter('TW-01');
    const cb = await b.api.getMeter('TW-01');
    expect(cb.register).toEqual(ca.register);
  });

  it('refuses a file with one bad line, names the lines, and imports nothing', async () => {
    const a = await seededLab();
    await a.api.recordCheck(goodCheck());
    await a.api.recordCheck(goodCheck({ date: '2026-10-01' }));
    const lines = (await a.api.exportCsv()).split('\r\n');
    lines[lines.length - 2] = (lines[lines.length - 2] ?? '').replace(/,10004\d+,Hz,/, ',abc,Hz,');
    const b = await seededLab();
    const before = await fingerprint(b.api);
    const e = await refusal(b.api.importCsv(lines.join('\r\n')));
    expect(e.message).toMatch(/^lines \d+-\d+: points\[0\]\.readings\[\d\]\.value/);
    expect(await fingerprint(b.api)).toBe(before);
  });

  it('names missing columns', async () => {
    const b = await seededLab();
    const e = await refusal(b.api.importCsv('meter,date\nTW-01,2026-01-01\n'));
    expect(e.message).toMatch(/missing column\(s\) performer/);
  });
});
