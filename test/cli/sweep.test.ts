// `dipledger fit`, `chart`, `sweeps` and `record` with swept points, as a user runs them: malformed
// trace files exit 2 naming the line, and the lab file is left byte for byte unchanged.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { decodeStoredJson as decodeJson } from '../../db/codec/stored-json';
import { clock, goodCheck, seededLab } from '../fixtures/lab';
import { gaussian } from '../fixtures/sweeps';

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

async function labDir(): Promise<{ dir: string; file: string }> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-sweep-'));
  const file = path.join(dir, 'lab.dipledger');
  const lab = await seededLab(file);
  lab.close();
  return { dir, file };
}

const F0 = 10.004e9;
const W = F0 / 2000;

/** A two-port Touchstone 1.x file (GHz, RI) of a meter's through line: S21 = 1 - d / (1 + j u), a
 * notch circle of 1.5 dB depth, with seeded noise of 0.2 % on each part. */
function s2p(): string {
  const next = gaussian(11);
  const d = 1 - 10 ** (-1.5 / 20);
  const rows: string[] = [];
  for (let i = 0; i < 601; i++) {
    const f = F0 - 6 * W + (12 * W * i) / 600;
    const u = (2 * 2000 * (f - F0)) / F0;
    const re = 0.9 * (1 - d / (1 + u * u)) + 0.002 * next();
    const im = 0.9 * ((d * u) / (1 + u * u)) + 0.002 * next();
    rows.push(
      `${(f / 1e9).toFixed(9)} 0.01 0 ${re.toFixed(6)} ${im.toFixed(6)} ${re.toFixed(6)} ${im.toFixed(6)} 0.01 0`,
    );
  }
  return ['! invented sweep of an absorption meter', '# GHz S RI R 50', ...rows].join('\n');
}

describe('dipledger fit', () => {
  it('fits a .s2p file and prints every dip as JSON', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-fit-'));
    writeFileSync(path.join(dir, 'meter.s2p'), s2p());
    const o = io(dir);
    expect(await runCli(['fit', 'meter.s2p', '--json'], o)).toBe(0);
    const r = decodeJson(o.stdout.join('\n')) as {
      report: { main: { f0Hz: number; depthDb: number }; spurious: unknown[] };
    };
    expect(Math.abs(r.report.main.f0Hz - F0)).toBeLessThan(0.02 * W);
    expect(r.report.main.depthDb).toBeCloseTo(1.5, 0);
    const text = io(dir);
    expect(await runCli(['fit', 'meter.s2p'], text)).toBe(0);
    expect(text.stdout.join('\n')).toMatch(/main\s+10\.004\d* GHz/);
  });

  const good = s2p().split('\n');
  const malformed: [string, string, RegExp][] = [
    [
      'a truncated line',
      [...good.slice(0, 10), good[10]?.split(' ').slice(0, 5).join(' '), ...good.slice(11)].join('\n'),
      /line 11: truncated/,
    ],
    [
      'a text value',
      [...good.slice(0, 10), good[10]?.replace(/ 0\.01 0 /, ' 0.01 x '), ...good.slice(11)].join('\n'),
      /line 11: "x" is not a number/,
    ],
    [
      'a missing option line',
      good.filter((l) => !l.startsWith('#')).join('\n'),
      /line 2: data before the option line/,
    ],
    [
      'decreasing frequencies',
      [...good.slice(0, 10), good[8], ...good.slice(11)].join('\n'),
      /line 11: frequency .* does not rise/,
    ],
    ['an empty file', '', /the file is empty/],
  ];
  it.each(malformed)('%s exits 2 with the line number', async (_what, text, message) => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-fit-'));
    writeFileSync(path.join(dir, 'bad.s2p'), text);
    const o = io(dir);
    expect(await runCli(['fit', 'bad.s2p'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(message);
  });

  it('a malformed file named by a swept point exits 2 from record, and the lab file is unchanged', async () => {
    const { dir, file } = await labDir();
    writeFileSync(
      path.join(dir, 'bad.s2p'),
      [...good.slice(0, 10), good[10]?.replace(/ 0\.01 0 /, ' 0.01 x '), ...good.slice(11)].join('\n'),
    );
    const doc = {
      ...goodCheck(),
      method: 'sweep',
      points: [{ dialSetting: '10 GHz', sweep: { file: 'bad.s2p' } }],
    };
    writeFileSync(path.join(dir, 'check.json'), JSON.stringify(doc));
    const before = readFileSync(file);
    const o = io(dir);
    expect(await runCli(['--db', file, 'record', 'check.json'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(/Point 1, sweep file \(bad\.s2p\): line 11: "x" is not a number/);
    expect(o.stderr.join('\n')).toMatch(/nothing was written/);
    expect(readFileSync(file).equals(before)).toBe(true);
    const missing = io(dir);
    writeFileSync(
      path.join(dir, 'check2.json'),
      JSON.stringify({ ...doc, points: [{ dialSetting: '10 GHz', sweep: { file: 'nowhere.s2p' } }] }),
    );
    expect(await runCli(['--db', file, 'record', 'check2.json'], missing)).toBe(2);
    expect(missing.stderr.join('\n')).toMatch(/Point 1, sweep file: cannot read nowhere\.s2p/);
  });
});

describe('dipledger record with swept points, sweeps and chart', () => {
  it('records a sweep named by a file beside the document and lists it', async () => {
    const { dir, file } = await labDir();
    writeFileSync(path.join(dir, 'meter.s2p'), s2p());
    const doc = {
      ...goodCheck(),
      method: 'sweep',
      points: [{ dialSetting: '10 GHz', sweep: { file: 'meter.s2p' } }],
    };
    writeFileSync(path.join(dir, 'check.json'), JSON.stringify(doc));
    const o = io(dir);
    expect(await runCli(['--db', file, 'record', 'check.json'], o)).toBe(0);
    expect(o.stdout.join('\n')).toMatch(/as found PASS/);
    const s = io(dir);
    expect(await runCli(['--db', file, 'sweeps', 'TW-01'], s)).toBe(0);
    expect(s.stdout.join('\n')).toMatch(/10\.004\d* GHz/);
    const c = io(dir);
    expect(await runCli(['--db', file, 'chart', 'TW-02'], c)).toBe(0);
    expect(c.stdout.join('\n')).toMatch(/dial chart of TW-02/);
    const d = io(dir);
    expect(await runCli(['--db', file, 'chart', 'TW-01'], d)).toBe(2);
  });
});

describe('dipledger budget with a swept point', () => {
  it('reads the trace file beside the document and judges the point as recording would', async () => {
    const { dir, file } = await labDir();
    writeFileSync(path.join(dir, 'p1.s2p'), s2p());
    const base = goodCheck();
    const budget = {
      format: 'dipledger.budget/1',
      meter: base.meter,
      standard: base.standards[0],
      conditions: base.conditions,
      dialSetting: '10 GHz',
      sweep: { file: 'p1.s2p' },
    };
    writeFileSync(path.join(dir, 'budget.json'), JSON.stringify(budget));
    const o = io(dir);
    expect(await runCli(['--db', file, '--json', 'budget', 'budget.json'], o)).toBe(0);
    const r = decodeJson(o.stdout.join('\n')) as {
      budget: { contributions: { key: string }[] };
      errorHz: number;
    };
    expect(r.budget.contributions.map((c) => c.key)).toContain('fit');
    // The dial at 10 GHz, the resonance near 10.004 GHz: about -4 MHz after small corrections.
    expect(r.errorHz / 1e6).toBeGreaterThan(-6);
    expect(r.errorHz / 1e6).toBeLessThan(-2);
    // A missing trace file: exit 2, naming the field.
    writeFileSync(path.join(dir, 'missing.json'), JSON.stringify({ ...budget, sweep: { file: 'nope.s2p' } }));
    const bad = io(dir);
    expect(await runCli(['--db', file, 'budget', 'missing.json'], bad)).toBe(2);
    expect(bad.stderr.join('\n')).toContain('Sweep file');
  });
});
