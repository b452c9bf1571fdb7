// Checks by the sweep method through the real API path: a swept point keeps its dial graduation,
// raw trace and fit; its budget uses the fit's u(f0) instead of the operator's lines; a bad trace
// is refused naming the point and the line, and nothing is written. Dial charts of divisions meters.
import { describe, expect, it } from 'vitest';
import { LabError } from '../../app/api/errors';
import type { LabApi } from '../../app/api/contract';
import type { SweptCheckDocumentInput } from '../../app/api/schemas';
import { goodCheck, seededLab } from '../fixtures/lab';
import { syntheticSweep } from '../fixtures/sweeps';

const F0 = 10.004e9;
const WIDTH = F0 / 2000;

function traceCsv(seed: number): string {
  const s = syntheticSweep([{ f0Hz: F0, loadedQ: 2000, depthDb: 2 }], {
    startHz: F0 - 6 * WIDTH,
    stopHz: F0 + 6 * WIDTH,
    points: 1201,
    seed,
  });
  return ['frequency_Hz,power_W', ...s.frequencyHz.map((f, i) => `${f},${s.power[i]}`)].join('\n');
}

function sweptCheck(points: SweptCheckDocumentInput['points']): SweptCheckDocumentInput {
  const base = goodCheck();
  return { ...base, method: 'sweep', points };
}

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

async function fingerprint(api: LabApi): Promise<string> {
  const meters = await api.listMeters();
  return JSON.stringify([
    meters,
    await Promise.all(meters.map((m) => api.getMeter(m.assetId))),
    await api.exportCsv(),
  ]);
}

describe('recording a check by the sweep method', () => {
  it('stores the graduation, the trace and the fit; the budget has the fit line and no operator lines', async () => {
    const lab = await seededLab();
    const typed = Array.from({ length: 41 }, (_, k) => {
      const f = F0 - 10e6 + k * 0.5e6;
      const u = (2 * 2000 * (f - F0)) / F0;
      // A negative-going detector: more power, more negative volts; the dip pulls it toward zero.
      return { frequency: `${(f / 1e6).toFixed(1)} MHz`, level: -1.2 * (1 - 0.37 / (1 + u * u)) };
    });
    const rec = await lab.api.recordCheck(
      sweptCheck([
        { dialSetting: '10 GHz', sweep: { text: traceCsv(1), name: 'p1.csv' } },
        { dialSetting: '10 GHz', sweep: { points: typed, level: 'volts', detectorSign: -1 } },
      ]) as never,
    );
    expect(rec.method).toBe('sweep');
    for (const p of rec.points) {
      // The fitted resonance is the point's reference; the graduation its indication.
      expect(Math.abs(p.referenceHz - F0)).toBeLessThan(0.02 * WIDTH);
      expect(p.result.meanDial).toBe(10e9);
      const keys = p.result.budget.contributions.map((c) => c.key);
      expect(keys).toContain('fit');
      expect(keys).not.toContain('repeatability');
      expect(keys).not.toContain('setting');
      expect(keys).not.toContain('hysteresis');
      const fitLine = p.result.budget.contributions.find((c) => c.key === 'fit');
      expect(fitLine?.type).toBe('A');
      expect(fitLine?.standardUncertainty).toBeGreaterThan(0);
      // Error: the graduation corrected to reference conditions minus f0, about -4 MHz: a pass.
      expect(p.result.errorHz).toBeCloseTo(p.result.correctedHz - p.referenceHz, 3);
      expect(p.result.errorHz / 1e6).toBeGreaterThan(-6);
      expect(p.result.errorHz / 1e6).toBeLessThan(-2);
      expect(p.readings).toEqual([]);
    }
    expect(rec.points[0]?.dipDepthDb).toBeCloseTo(2, 0);
    const sweeps = await lab.api.getSweeps(rec.checkId);
    expect(sweeps.map((s) => s.seq)).toEqual([1, 2]);
    expect(sweeps[0]?.frequencyHz).toHaveLength(1201);
    expect(sweeps[0]?.dialSetting).toBe(10e9);
    expect(sweeps[0]?.sourceKind).toBe('delimited');
    expect(sweeps[1]?.sourceKind).toBe('typed');
    expect(sweeps[1]?.levelKind).toBe('volts');
    expect(sweeps[0]?.fit.main.f0Hz).toBe(rec.points[0]?.referenceHz);
    const history = await lab.api.listSweeps('TW-01');
    expect(history).toHaveLength(2);
    expect(history[0]?.spuriousCount).toBe(0);
    lab.close();
  });

  it('judges a swept point on its own (the record form, live) exactly as recording it does', async () => {
    const lab = await seededLab();
    const doc = sweptCheck([{ dialSetting: '10 GHz', sweep: { text: traceCsv(4), name: 'p4.csv' } }]);
    const budget = {
      format: 'dipledger.budget/1' as const,
      meter: doc.meter,
      standard: doc.standards[0] as string,
      conditions: doc.conditions,
      dialSetting: '10 GHz',
      sweep: { text: traceCsv(4), name: 'p4.csv' },
    };
    const live = await lab.api.evaluateBudget(budget);
    const rec = await lab.api.recordCheck(doc as never);
    expect(live).toEqual(rec.points[0]?.result);
    expect(live.budget.contributions.map((c) => c.key)).toContain('fit');
    // A sweep with readings, or without its dial setting, is refused by name.
    const both = await refusal(
      lab.api.evaluateBudget({ ...budget, readings: [{ value: '10 GHz', direction: 'up' }] }),
    );
    expect(both.issues.map((i) => i.field)).toEqual(['readings']);
    const noDial = await refusal(lab.api.evaluateBudget({ ...budget, dialSetting: undefined }));
    expect(noDial.issues.map((i) => i.field)).toEqual(['dialSetting']);
    lab.close();
  });

  it('refuses a malformed trace naming the point and the line, and writes nothing', async () => {
    const lab = await seededLab();
    const before = await fingerprint(lab.api);
    const bad = traceCsv(2).split('\n');
    bad[7] = '10.0e9,abc';
    const e = await refusal(
      lab.api.recordCheck(
        sweptCheck([{ dialSetting: '10 GHz', sweep: { text: bad.join('\n'), name: 'bad.csv' } }]) as never,
      ),
    );
    expect(e.message).toMatch(/points\[0\]\.sweep \(bad\.csv\): line 8: "abc" is not a number/);
    expect(await fingerprint(lab.api)).toBe(before);
    lab.close();
  });

  it('refuses swept points in a tune-to-dip check, a sweep with no dial setting, and readings on a swept point', async () => {
    const lab = await seededLab();
    const e1 = await refusal(
      lab.api.recordCheck({
        ...sweptCheck([{ dialSetting: '10 GHz', sweep: { text: traceCsv(3) } }]),
        method: 'tune-to-dip',
      } as never),
    );
    expect(e1.message).toMatch(/points\[0\]\.sweep: the check's method is "tune-to-dip"/);
    const e2 = await refusal(lab.api.recordCheck(sweptCheck([{ sweep: { text: traceCsv(3) } }]) as never));
    expect(e2.issues.map((i) => i.field)).toContain('points[0].dialSetting');
    const e3 = await refusal(
      lab.api.recordCheck(
        sweptCheck([
          {
            dialSetting: '10 GHz',
            reference: '10 GHz',
            readings: [{ value: '10 GHz', direction: 'up' }],
            sweep: { text: traceCsv(3) },
          },
        ]) as never,
      ),
    );
    expect(e3.issues.map((i) => i.field).sort()).toEqual(['points[0].readings', 'points[0].reference']);
    const e4 = await refusal(
      lab.api.recordCheck(sweptCheck([{ dialSetting: '10 GHz', sweep: { file: 'p1.csv' } }]) as never),
    );
    expect(e4.message).toMatch(/must be read by the client/);
    lab.close();
  });

  it('still asks a tune-to-dip point for its reference and two readings', async () => {
    const lab = await seededLab();
    const e = await refusal(
      lab.api.recordCheck(
        goodCheck({ points: [{ readings: [{ value: '10 GHz', direction: 'up' }] } as never] }),
      ),
    );
    expect(e.issues.map((i) => i.field).sort()).toEqual(['points[0].readings', 'points[0].reference']);
    expect(e.message).toMatch(/at least two readings|a frequency such as/);
    lab.close();
  });
});

describe('fitTrace', () => {
  it('fits a file on its own and refuses a trace without a dip', async () => {
    const lab = await seededLab();
    const r = await lab.api.fitTrace({ text: traceCsv(4), name: 't.csv' });
    expect(Math.abs(r.report.main.f0Hz - F0)).toBeLessThan(0.02 * WIDTH);
    expect(r.pointCount).toBe(1201);
    const flat = ['f_GHz,dB', ...Array.from({ length: 50 }, (_, k) => `${9 + k * 0.001},-3`)].join('\n');
    const e = await refusal(lab.api.fitTrace({ text: flat, name: 'flat.csv' }));
    expect(e.message).toMatch(/no dip found/);
    lab.close();
  });
});

describe('dial charts', () => {
  it('fits the chart of a divisions meter from its stored chart, then from its newest check', async () => {
    const lab = await seededLab();
    const stored = await lab.api.getDialChart({ assetId: 'TW-02' });
    expect(stored.source.kind).toBe('stored-chart');
    expect(stored.table[0]?.divisions).toBe(0);
    expect(stored.fit.candidates).toHaveLength(3);
    const point = (reference: string, d: number) => ({
      reference,
      readings: [
        { value: d, direction: 'up' as const },
        { value: d + 0.02, direction: 'down' as const },
      ],
    });
    await lab.api.recordCheck(
      goodCheck({
        meter: 'TW-02',
        points: [point('3.9 GHz', 0.8), point('3.4 GHz', 5), point('2.9 GHz', 10), point('2.45 GHz', 15)],
      }),
    );
    const fromCheck = await lab.api.getDialChart({ assetId: 'TW-02', stepDivisions: 1 });
    expect(fromCheck.source).toMatchObject({ kind: 'check', date: '2026-11-20' });
    expect(fromCheck.pointCount).toBe(4);
    expect(fromCheck.table.map((r) => r.divisions)).toEqual([
      1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15,
    ]);
    // Each point's residual is its measured value minus the chart's, whichever model won.
    for (const r of fromCheck.fit.residuals) expect(r.residualHz).toBeCloseTo(r.frequencyHz - r.fittedHz, 3);
    const e = await refusal(lab.api.getDialChart({ assetId: 'TW-01' }));
    expect(e.message).toMatch(/direct-reading dial/);
    lab.close();
  });
});

describe('amending a check by the sweep method', () => {
  it('keeps each swept point trace and fit in the new revision (ISO/IEC 17025:2017 7.5.2: the amended record is complete)', async () => {
    const lab = await seededLab();
    await lab.api.enrolSigner({ name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' });
    await lab.api.enrolSigner({ name: 'Bo Marsh', passphrase: 'bo-passphrase-22' });
    const doc = sweptCheck([{ dialSetting: '10 GHz', sweep: { text: traceCsv(7), name: 'p1.csv' } }]);
    const rec = await lab.api.recordCheck(doc as never);
    await lab.api.signCheck({ checkId: rec.checkId, person: 'Ada Fenwick', passphrase: 'ada-passphrase-1' });
    await lab.api.signCheck({ checkId: rec.checkId, person: 'Bo Marsh', passphrase: 'bo-passphrase-22' });
    const amended = await lab.api.amendCheck({
      checkId: rec.checkId,
      reason: 'remark added after review',
      document: { ...doc, remarks: 'trace taken with the long cable' },
    });
    expect(amended.record.revision).toBe(2);
    const sweeps = await lab.api.getSweeps(rec.checkId);
    expect(sweeps.map((s) => [s.revision, s.seq])).toEqual([[2, 1]]);
    expect(sweeps[0]?.frequencyHz).toHaveLength(1201);
    lab.close();
  });
});
