// Numbers the command line prints: no float noise (965.9499999999999), no e-notation, the
// expanded uncertainty to two significant digits (JCGM 100:2008 7.2.6), and --json numbers in SI
// units at 15 significant digits (DBL_DIG of IEEE 754 binary64; docs/exchange.md).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { clock } from '../fixtures/lab';

const E_NOTATION = /\d[eE][+-]?\d/;
const FLOAT_NOISE = /\.\d*(?:9{6,}\d|[1-9]0{6,}[1-9])(?!\d)/;

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

let file = '';
beforeAll(async () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-numbers-'));
  file = path.join(dir, 'demo.dipledger');
  expect(await runCli(['--db', file, 'init', '--sample'], io(path.resolve('.')))).toBe(0);
}, 120_000);

async function text(args: string[]): Promise<string> {
  const o = io(path.resolve('.'));
  expect(await runCli(['--db', file, ...args], o), o.stderr.join('\n')).toBe(0);
  return o.stdout.join('\n');
}

describe('numbers printed by the command line', () => {
  it('chart: dial readings without float noise (965.95, not 965.9499999999999)', async () => {
    const out = await text(['chart', 'WG-203']);
    expect(out).toMatch(/\b965\.95\b/);
    expect(out).not.toMatch(FLOAT_NOISE);
    expect(out).not.toMatch(E_NOTATION);
  });

  it('budget: prefixes, ppm/K, U to two significant digits, one wording for p_c', async () => {
    const out = await text(['budget', 'docs/examples/budget.json']);
    expect(out).not.toMatch(E_NOTATION);
    expect(out).not.toMatch(FLOAT_NOISE);
    expect(out).toMatch(/expanded U {11}\d{2,3} kHz|expanded U {11}\d\.\d [kM]Hz/);
    expect(out).toMatch(/ppm\/K/);
    expect(out).toMatch(/GHz·K/);
    expect(out).toMatch(/P\(conformity\) {8}(> 99\.9 %|< 0\.1 %|\d+\.\d %)/);
    expect(out).toMatch(/\(1000 ppm of reading\)/);
  });

  it('show, use and trend print no e-notation and no float noise', async () => {
    for (const args of [
      ['show', 'WG-203'],
      ['use', 'WG-201', '--at', '10 GHz'],
      ['trend', 'WG-201'],
    ]) {
      const out = await text(args);
      expect(out, args.join(' ')).not.toMatch(E_NOTATION);
      expect(out, args.join(' ')).not.toMatch(FLOAT_NOISE);
    }
  });

  it('air --json: SI numbers at 15 significant digits at most', async () => {
    const out = await text(['air', '--temp', '20', '--rh', '50', '--pressure', '1013.25', '--json']);
    const numbers = out.match(/-?\d+\.\d+/g) ?? [];
    expect(numbers.length).toBeGreaterThanOrEqual(3);
    for (const n of numbers)
      expect(n.replace(/^-?0*\.?0*/, '').replace('.', '').length).toBeLessThanOrEqual(15);
    const r = JSON.parse(out) as { refractiveIndex: number; refractivityN: number };
    // ITU-R P.453: N of about 319 at 20 °C, 1013.25 hPa, 50 %RH; n = 1 + N × 10⁻⁶.
    expect(r.refractiveIndex).toBeCloseTo(1 + r.refractivityN * 1e-6, 12);
  });
});
