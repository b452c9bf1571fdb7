// `dipledger impact` and `dipledger use --log` as a user runs them: JSON with checkId, each point
// before and after and verdictChanged; exit 2 naming the field on bad input, nothing written.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { clock, goodCheck, seededLab } from '../fixtures/lab';

function io(): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return {
    stdout,
    stderr,
    out: (t) => stdout.push(t),
    err: (t) => stderr.push(t),
    env: { USER: 'Ada Fenwick' },
    cwd: tmpdir(),
    clock,
  };
}

async function labWithCheck(): Promise<string> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-impact-'));
  const file = path.join(dir, 'lab.dipledger');
  const lab = await seededLab(file);
  await lab.api.recordCheck(goodCheck());
  lab.close();
  return file;
}

describe('dipledger impact STANDARD', () => {
  it('gives each check with checkId, points before and after, and verdictChanged', async () => {
    const file = await labWithCheck();
    const o = io();
    expect(await runCli(['impact', 'SRC-A', '--error', '700 ppm', '--json', '--db', file], o)).toBe(0);
    const r = JSON.parse(o.stdout.join('\n')) as {
      checks: {
        checkId: number;
        verdictChanged: boolean;
        points: { before: { verdict: string }; after: { verdict: string } }[];
      }[];
    };
    expect(r.checks).toHaveLength(1);
    expect(r.checks[0]?.checkId).toBe(1);
    expect(r.checks[0]?.verdictChanged).toBe(true);
    expect(r.checks[0]?.points[0]?.before.verdict).toBe('pass');
    expect(r.checks[0]?.points[0]?.after.verdict).toBe('fail');
    const t = io();
    expect(await runCli(['impact', 'SRC-A', '--error', '700 ppm', '--db', file], t)).toBe(0);
    expect(t.stdout.join('\n')).toMatch(/CHANGED/);
  });

  it('exits 2 naming the field, leaving the file unchanged', async () => {
    const file = await labWithCheck();
    const before = readFileSync(file);
    const cases: [string[], RegExp][] = [
      [['impact', 'NOPE', '--error', '1 ppm'], /standard/i],
      [['impact', 'SRC-A', '--error', '0.3'], /error: "0.3" has no unit/i],
      [
        ['impact', 'SRC-A', '--error', '1 ppm', '--since', '2030-01-01'],
        /since: 2030-01-01 is in the future/i,
      ],
      [['impact', 'NOPE'], /meter/i],
    ];
    for (const [args, message] of cases) {
      const o = io();
      expect(await runCli([...args, '--db', file], o)).toBe(2);
      expect(o.stderr.join('\n')).toMatch(message);
    }
    expect(readFileSync(file).equals(before)).toBe(true);
  });
});

describe('dipledger use --log', () => {
  it('logs who, when, where and what for', async () => {
    const file = await labWithCheck();
    const o = io();
    const code = await runCli(
      ['use', 'TW-01', '--at', '10 GHz', '--log', 'Job 12, filter tuning', '--json', '--db', file],
      o,
    );
    expect(code).toBe(0);
    const r = JSON.parse(o.stdout.join('\n')) as {
      logged: { usedBy: string; usedAt: string; frequencyHz: number; purpose: string };
    };
    expect(r.logged).toEqual(
      expect.objectContaining({
        usedBy: 'Ada Fenwick',
        usedAt: '2026-12-01T09:30:00.000Z',
        frequencyHz: 10e9,
        purpose: 'Job 12, filter tuning',
      }),
    );
  });
});
