// Impact of a reference found off, through the real service (in-memory lab, fixed clock): a
// standard's as-found deviation applied to the checks made with it, refusals naming the field,
// the list of checks against the records, and a meter's logged uses.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
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

async function addSecondStandard(api: LabApi): Promise<void> {
  await api.createStandard({
    assetId: 'SRC-B',
    description: 'Second synthesized source',
    certificates: [
      {
        certificateId: 'B-2026-1',
        issuedBy: 'Calibration body two',
        calibratedOn: '2026-01-15',
        dueOn: '2027-01-15',
        expandedUncertaintyPpm: 0.02,
      },
    ],
  });
}

describe('standardImpact', () => {
  it('a zero deviation with zero uncertainty changes nothing', async () => {
    const lab = await seededLab();
    const rec = await lab.api.recordCheck(goodCheck());
    const r = await lab.api.standardImpact({ standard: 'SRC-A', error: '0 ppm', uncertainty: '0 ppm' });
    expect(r.since).toBe('2026-06-01'); // the newest certificate's date
    expect(r.until).toBe('2026-12-01');
    expect(r.checks.map((c) => c.checkId)).toEqual([rec.checkId]);
    expect(r.pointsJudged).toBe(1);
    expect(r.pointsChanged).toBe(0);
    const p = r.checks[0]?.points[0];
    expect(p?.after.verdict).toBe(p?.before.verdict);
    expect(p?.after.errorHz).toBe(p?.before.errorHz);
    expect(p?.after.expandedHz).toBe(p?.before.expandedHz);
    expect(r.meters).toEqual([
      expect.objectContaining({ assetId: 'TW-01', stateHolds: true, dueDateHolds: true }),
    ]);
    lab.close();
  });

  it('a deviation that takes the error past the tolerance changes the verdict and the meter', async () => {
    // The check reads about +4 MHz at 10 GHz (+400 ppm); tolerance 0.1 % = 10 MHz (1000 ppm).
    // A +700 ppm deviation of the reference: E' = E + 700 ppm * 10 GHz = E + 7 MHz, about
    // +1100 ppm, beyond the tolerance: fail (VIM 2.16 sign: deviation = indicated - true).
    const lab = await seededLab();
    await lab.api.recordCheck(goodCheck());
    const r = await lab.api.standardImpact({ standard: 'SRC-A', error: '700 ppm' });
    const c = r.checks[0];
    const p = c?.points[0];
    expect(p?.before.verdict).toBe('pass');
    expect(p?.after.errorHz).toBeCloseTo((p?.before.errorHz ?? 0) + 7e6, 3);
    expect(p?.after.errorPpm).toBeCloseTo((p?.before.errorPpm ?? 0) + 700, 6);
    // The certificate's U = 0.01 ppm (k = 2) enters as u = 0.005 ppm = 50 Hz: U grows, a little.
    expect(p?.after.expandedHz).toBeGreaterThan(p?.before.expandedHz ?? Infinity);
    expect(r.deviation.standardUncertainty).toBeCloseTo(0.005, 12);
    expect(p?.after.verdict).toBe('fail');
    expect(p?.verdictChanged).toBe(true);
    expect(c?.asFoundAfter).toBe('fail');
    expect(c?.verdictChanged).toBe(true);
    expect(r.meters[0]).toMatchObject({ assetId: 'TW-01', stateHolds: false, dueDateHolds: false });
    lab.close();
  });

  it('refuses bad input naming the field, writing nothing', async () => {
    const lab = await seededLab();
    const fieldOf = async (q: object) => (await refusal(lab.api.standardImpact(q as never))).issues[0]?.field;
    expect(await fieldOf({ standard: 'NOPE', error: '1 ppm' })).toBe('standard');
    expect(await fieldOf({ standard: 'SRC-A', error: '0.3' })).toBe('error');
    expect((await refusal(lab.api.standardImpact({ standard: 'SRC-A', error: '0.3' }))).message).toMatch(
      /has no unit/,
    );
    expect(await fieldOf({ standard: 'SRC-A', error: '0.3 furlong' })).toBe('error');
    expect(await fieldOf({ standard: 'SRC-A', error: '1 ppm', since: '2027-01-01' })).toBe('since');
    expect(await fieldOf({ standard: 'SRC-A', error: '1 ppm', since: '2026-02-30' })).toBe('since');
    expect(await fieldOf({ standard: 'SRC-A', error: '40 Hz' })).toBe('uncertainty');
    expect(await fieldOf({ standard: 'SRC-A', error: '1 ppm', extra: 1 })).toBeDefined();
    expect((await refusal(lab.api.meterImpact({ meter: 'NOPE' }))).issues[0]?.field).toBe('meter');
    lab.close();
  });

  it('lists exactly the checks whose records name the standard in the window', async () => {
    const days = Array.from(
      { length: 20 },
      (_, i) => `2026-${String(1 + Math.floor(i / 2) + 1).padStart(2, '0')}-${i % 2 ? '20' : '05'}`,
    );
    await fc.assert(
      fc.asyncProperty(
        fc.uniqueArray(
          fc.record({
            day: fc.constantFrom(...days),
            meter: fc.constantFrom('TW-01'),
            standards: fc.constantFrom<string[]>(
              ['SRC-A'],
              ['SRC-B'],
              ['SRC-B', 'SRC-A'],
              ['SRC-A', 'SRC-B'],
            ),
          }),
          { minLength: 0, maxLength: 6, selector: (c) => `${c.meter}/${c.day}` },
        ),
        fc.constantFrom(...days),
        async (checks, since) => {
          const lab = await seededLab();
          await addSecondStandard(lab.api);
          const ids = new Map<number, (typeof checks)[number]>();
          for (const c of checks) {
            const rec = await lab.api.recordCheck(goodCheck({ date: c.day, standards: c.standards }));
            ids.set(rec.checkId, c);
          }
          const r = await lab.api.standardImpact({ standard: 'SRC-A', error: '0 ppm', since });
          const expected = [...ids]
            .filter(([, c]) => c.standards.includes('SRC-A') && c.day >= since)
            .map(([id]) => id)
            .sort((a, b) => a - b);
          expect(r.checks.map((c) => c.checkId).sort((a, b) => a - b)).toEqual(expected);
          // Only points made with SRC-A (the first standard named) are judged again.
          for (const c of r.checks)
            for (const p of c.points)
              expect(p.usedStandard).toBe(ids.get(c.checkId)?.standards[0] === 'SRC-A');
          lab.close();
        },
      ),
      { numRuns: 15 },
    );
  }, 60_000);
});

describe('uses and meterImpact', () => {
  it('logs a use (audited) and lists it when the meter is later found off', async () => {
    const lab = await seededLab();
    await lab.api.recordCheck(goodCheck({ date: '2026-03-01' }));
    const use = await lab.api.logUse({
      meter: 'TW-01',
      at: '9.3 GHz',
      purpose: 'Job 4471, radar head',
      usedAt: '2026-05-02T10:00:00.000Z',
    });
    expect(use).toMatchObject({ assetId: 'TW-01', frequencyHz: 9.3e9, purpose: 'Job 4471, radar head' });
    // A failing check: readings 20 MHz high at 10 GHz (2000 ppm against 1000 ppm).
    const off = goodCheck({
      date: '2026-11-20',
      points: [
        {
          reference: '10 GHz',
          readings: [
            { value: '10.020 GHz', direction: 'up' },
            { value: '10.021 GHz', direction: 'down' },
          ],
        },
      ],
    });
    await lab.api.recordCheck(off);
    const m = await lab.api.meterImpact({ meter: 'TW-01' });
    expect(m.asFoundVerdict).toBe('fail');
    expect(m.affected).toBe(true);
    expect(m.since).toBe('2026-03-01');
    expect(m.uses.map((u) => u.id)).toEqual([use.id]);
    const audit = await lab.api.listAudit({ entity: 'meter', entityId: 'TW-01' });
    expect(JSON.stringify(audit)).toMatch(/log-use/);
    lab.close();
  });

  it('refuses a use without a unit or in the future, writing nothing', async () => {
    const lab = await seededLab();
    const e = await refusal(lab.api.logUse({ meter: 'TW-01', at: '9.3', purpose: 'x' }));
    expect(e.issues[0]?.field).toBe('at');
    const f = await refusal(
      lab.api.logUse({ meter: 'TW-01', at: '9.3 GHz', purpose: 'x', usedAt: '2027-01-01T00:00:00Z' }),
    );
    expect(f.issues[0]?.field).toBe('usedAt');
    expect((await lab.api.meterImpact({ meter: 'TW-01' })).uses).toEqual([]);
    lab.close();
  });
});
