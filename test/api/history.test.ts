// The history group through the real API and the CLI, on the invented demo lab (story in
// sample-lab/story.ts): WG-202 drifts toward its limit, WG-201 stepped in 2019 and was adjusted,
// CW-102's dip fades, CW-101 is steady, CW-103 is overdue, WG-206 quarantined, WG-208 withdrawn.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, afterAll, describe, expect, it } from 'vitest';
import { openApi, type OpenedLab } from '../../app/api/open';
import { LabError } from '../../app/api/errors';
import { decodeStoredJson as decodeJson } from '../../db/codec/stored-json';
import type { TrendReport, UseReport, CoverageReport } from '../../app/api/contract-history';
import { runCli, type CliIo } from '../../app/cli/main';
import { createLabFile, loadBundle, readSampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';

let lab: OpenedLab;
beforeAll(async () => {
  lab = openApi(':memory:', { create: true, clock });
  await loadBundle(lab.api, readSampleBundle());
}, 120_000);
afterAll(() => lab.close());

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

describe('trend on the demo lab', () => {
  it('WG-202 (drifting toward its limit): a projected exit date and a shortened interval', async () => {
    const t = await lab.api.getTrend('WG-202');
    expect(t.projectedExitDate).toMatch(/^20(2[7-9]|3\d)-\d\d-\d\d$/);
    expect(t.pooled?.driftPpmPerYear).toBeGreaterThan(45);
    expect(t.pooled?.driftPpmPerYear).toBeLessThan(55);
    expect(t.flags.map((f) => f.code)).toEqual(expect.arrayContaining(['drift-exit', 'alert-zone']));
    expect(t.suggestion.change).toBe('shorter');
    expect(t.suggestion.months).toBeLessThan(12);
    expect(t.suggestion.rationale).toMatch(/variables-data method/);
    expect(t.suggestion.rationale).toMatch(/alert level/);
    const f = t.frequencies[0];
    expect(f?.fit?.dof).toBe((f?.fit?.points ?? 0) - 2);
    expect(f?.fit?.slopePpmPerYear).toBeGreaterThan(40);
  });

  it('WG-201 (dropped in 2019, adjusted): the step is flagged and the fit starts after it', async () => {
    const t = await lab.api.getTrend('WG-201');
    const step = t.flags.find((f) => f.code === 'step');
    expect(step?.date).toBe('2019-04-03');
    expect(t.steps.find((s) => s.isStep)?.date).toBe('2019-04-03');
    expect(t.segmentFromDate).toBe('2019-04-03');
    for (const f of t.frequencies) {
      expect(f.fit?.fromDate).toBe('2019-04-03');
      expect(f.history.filter((h) => h.used).every((h) => h.date >= '2019-04-03')).toBe(true);
      expect(f.history.some((h) => !h.used && h.date < '2019-04-03')).toBe(true);
    }
    // Extrapolating across the +650 ppm step would predict a large error; after it, none.
    expect(t.projectedExitDate).toBeNull();
    expect(t.suggestion.rationale.length).toBeGreaterThan(40);
  });

  it('CW-102 (silver tarnishing): the fading dip is flagged', async () => {
    const t = await lab.api.getTrend('CW-102');
    const dip = t.flags.find((f) => f.code === 'dip-fading' || f.code === 'dip-below-minimum');
    expect(dip).toBeDefined();
    expect(t.health.dipFallFraction as number).toBeGreaterThan(0.5);
    expect(t.health.dip.length).toBeGreaterThan(10);
  });

  it('CW-101 (steady): a longer interval with its rationale, and no warning flag', async () => {
    const t = await lab.api.getTrend('CW-101');
    expect(t.suggestion.change).toBe('longer');
    expect(t.suggestion.months).toBeGreaterThan(12);
    expect(t.suggestion.method).toBe('variables');
    expect(t.suggestion.rationale).toMatch(/probability of conformity/);
    expect(t.flags.filter((f) => f.severity !== 'info')).toEqual([]);
    expect(t.printSuggestedInterval).toBe(false);
  });

  it('WG-206 (slipping dial, quarantined): a step at the newest check stops use', async () => {
    const t = await lab.api.getTrend('WG-206');
    expect(t.flags.find((f) => f.code === 'step-at-newest')?.severity).toBe('stop');
    const u = await lab.api.fitForUse({ assetId: 'WG-206', frequency: '60 GHz' });
    expect(u.answers[0]?.fit).toBe(false);
    expect(u.answers[0]?.reasons.map((r) => r.code)).toEqual(expect.arrayContaining(['quarantined', 'step']));
  });
});

describe('fit for use', () => {
  it('WG-202 at 15 GHz: fit today, with the correction interpolated from the last check', async () => {
    const r = await lab.api.fitForUse({ assetId: 'WG-202', frequency: '15 GHz' });
    const a = r.answers[0];
    expect(a?.fit).toBe(true);
    expect(a?.correction?.basis).toMatch(/interpolated between 14.5000 GHz and 15.5000 GHz/);
    // The last check found about +840 ppm: the correction is about -840 ppm, -12.6 MHz at 15 GHz.
    expect(a?.correction?.correctionPpm).toBeLessThan(-700);
    expect(a?.correction?.correctionHz).toBeCloseTo(((a?.correction?.correctionPpm ?? 0) * 15e9) / 1e6, 3);
    expect(a?.uncertainty?.expandedPpm).toBeGreaterThan(a?.correction?.uPpm ?? Infinity);
    expect(a?.warnings.join(' ')).toMatch(/tolerance/);
    expect(a?.daysToDue).toBeGreaterThan(0);
  });

  it('names every reason a meter is not fit: overdue, withdrawn, out of tolerance, outside the band', async () => {
    const cw103 = (await lab.api.fitForUse({ assetId: 'CW-103', frequency: '5 GHz' })).answers[0];
    expect(cw103?.fit).toBe(false);
    expect(cw103?.reasons.map((r) => r.code)).toEqual(['overdue']);
    const wg208 = (await lab.api.fitForUse({ assetId: 'WG-208', frequency: '12 GHz' })).answers[0];
    expect(wg208?.reasons.map((r) => r.code)).toEqual(
      expect.arrayContaining(['withdrawn', 'out-of-tolerance']),
    );
    const outside = (await lab.api.fitForUse({ assetId: 'CW-101', frequency: '3 GHz' })).answers[0];
    expect(outside?.reasons.map((r) => r.code)).toEqual(['outside-band']);
    expect(outside?.correction).toBeNull();
  });

  it('without a meter: every meter covering the frequency, fit ones first', async () => {
    const r = await lab.api.fitForUse({ frequency: '10 GHz' });
    expect(r.answers.map((a) => a.assetId)).toEqual(['WG-201', 'WG-208']);
    expect(r.answers[0]?.fit).toBe(true);
  });

  it('refuses an unknown meter, a frequency without a unit, and one outside every band', async () => {
    expect((await refusal(lab.api.fitForUse({ assetId: 'XX-9', frequency: '10 GHz' }))).code).toBe(
      'not-found',
    );
    const bare = await refusal(lab.api.fitForUse({ assetId: 'WG-201', frequency: '9.3' }));
    expect(bare.issues[0]?.field).toBe('frequency');
    const none = await refusal(lab.api.fitForUse({ frequency: '8.1 GHz' }));
    expect(none.message).toMatch(/outside every meter's band/);
    expect((await refusal(lab.api.getTrend('XX-9'))).code).toBe('not-found');
  });
});

describe('coverage and the due list', () => {
  it('shows the gaps: 4-8 GHz (overdue meter), 8-8.2 GHz (no meter), 60-75 GHz (quarantined)', async () => {
    const c = await lab.api.coverage();
    expect(c.gaps.map((g) => [g.fromHz, g.toHz])).toEqual([
      [4e9, 8e9],
      [8e9, 8.2e9],
      [60e9, 75e9],
    ]);
    expect(c.segments[0]).toMatchObject({ fromHz: 1e9, toHz: 2e9, usable: ['CW-101'], gap: false });
  });

  it('carries the history flags in the due list', async () => {
    const rows = await lab.api.listDue({ withinDays: 60 });
    const wg202 = rows.find((r) => r.assetId === 'WG-202');
    expect(wg202?.flags?.join(' ')).toMatch(/drift: exits/);
    expect(rows.find((r) => r.assetId === 'CW-103')?.flags).toEqual([]);
  });
});

describe('the command line', () => {
  function io(): CliIo & { stdout: string[]; stderr: string[] } {
    const stdout: string[] = [];
    const stderr: string[] = [];
    return {
      stdout,
      stderr,
      out: (t) => stdout.push(t),
      err: (t) => stderr.push(t),
      env: {},
      cwd: tmpdir(),
      clock,
    };
  }
  let file = '';
  beforeAll(async () => {
    file = path.join(mkdtempSync(path.join(tmpdir(), 'dipledger-history-')), 'lab.dipledger');
    await createLabFile(file, true, { clock });
  }, 120_000);

  it('trend prints the fits, flags and the suggestion; --json gives the report', async () => {
    const o = io();
    expect(await runCli(['--db', file, 'trend', 'WG-201'], o)).toBe(0);
    const text = o.stdout.join('\n');
    expect(text).toMatch(/step: 2019-04-03/);
    expect(text).toMatch(/suggested interval: \d+ months/);
    const j = io();
    expect(await runCli(['--db', file, '--json', 'trend', 'CW-102'], j)).toBe(0);
    const t = decodeJson(j.stdout.join('\n')) as TrendReport;
    expect(t.flags.some((f) => f.code === 'dip-fading')).toBe(true);
  });

  it('use exits 0 when fit, 1 when not, and lists meters without REF', async () => {
    expect(await runCli(['--db', file, 'use', 'WG-202', '--at', '15GHz'], io())).toBe(0);
    const o = io();
    expect(await runCli(['--db', file, 'use', 'CW-103', '--at', '5 GHz'], o)).toBe(1);
    expect(o.stdout.join('\n')).toMatch(/NOT FIT FOR USE[\s\S]*overdue/);
    const j = io();
    expect(await runCli(['--db', file, '--json', 'use', '--at', '55GHz'], j)).toBe(0);
    expect((decodeJson(j.stdout.join('\n')) as UseReport).answers.map((a) => a.assetId)).toEqual([
      'WG-205',
      'WG-206',
    ]);
  });

  it('coverage lists the gaps', async () => {
    const o = io();
    expect(await runCli(['--db', file, '--json', 'coverage'], o)).toBe(0);
    expect((decodeJson(o.stdout.join('\n')) as CoverageReport).gaps).toHaveLength(3);
  });

  it('exits 2 with a clear message for an unknown meter, a frequency without a unit, and one outside every band', async () => {
    const a = io();
    expect(await runCli(['--db', file, 'trend', 'XX-9'], a)).toBe(2);
    expect(a.stderr.join('\n')).toMatch(/no meter with asset id "XX-9"/);
    const b = io();
    expect(await runCli(['--db', file, 'use', 'WG-201', '--at', '9.3'], b)).toBe(2);
    expect(b.stderr.join('\n')).toMatch(/frequency: "9.3"/i);
    const c = io();
    expect(await runCli(['--db', file, 'use', '--at', '120GHz'], c)).toBe(2);
    expect(c.stderr.join('\n')).toMatch(/outside every meter's band/);
    const d = io();
    expect(await runCli(['--db', file, 'use', 'WG-201'], d)).toBe(2);
    expect(d.stderr.join('\n')).toMatch(/--at FREQ/);
  });
});
