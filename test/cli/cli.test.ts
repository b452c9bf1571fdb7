// The command line as a user runs it: exit codes, messages naming the field, and a lab file
// left byte-for-byte unchanged by any refusal.
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { decodeStoredJson as decodeJson } from '../../db/codec/stored-json';
import { clock, goodCheck, seededLab } from '../fixtures/lab';

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

async function labDir(): Promise<{ dir: string; file: string }> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-cli-'));
  const file = path.join(dir, 'lab.dipledger');
  const lab = await seededLab(file);
  lab.close();
  return { dir, file };
}

describe('dipledger air', () => {
  it('prints N and n as JSON (ITU-R P.453 at 20 degC, 1013.25 hPa, 50 %RH)', async () => {
    const o = io(tmpdir());
    const code = await runCli(['air', '--temp', '20', '--rh', '50', '--pressure', '1013.25', '--json'], o);
    expect(code).toBe(0);
    const r = decodeJson(o.stdout.join('\n')) as { refractivityN: number; refractiveIndex: number };
    expect(r.refractivityN).toBeGreaterThan(318);
    expect(r.refractivityN).toBeLessThan(321);
    expect(r.refractiveIndex).toBeCloseTo(1.000319, 5);
  });

  it('exits 2 naming the option when a value is not a number', async () => {
    const o = io(tmpdir());
    expect(await runCli(['air', '--temp', '20,5', '--rh', '50', '--pressure', '1013'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(/--temp: "20,5" is not a number/);
    const o2 = io(tmpdir());
    expect(await runCli(['air', '--temp', '20', '--rh', '150', '--pressure', '1013'], o2)).toBe(2);
    expect(o2.stderr.join('\n')).toMatch(/Relative humidity \(%RH\)/);
  });
});

describe('dipledger record', () => {
  it('records a good check and prints its verdicts', async () => {
    const { dir, file } = await labDir();
    writeFileSync(path.join(dir, 'check.json'), JSON.stringify(goodCheck()));
    const o = io(dir);
    expect(await runCli(['--db', file, 'record', 'check.json'], o)).toBe(0);
    expect(o.stdout.join('\n')).toMatch(/as found PASS; as left PASS/);
    const o2 = io(dir);
    expect(await runCli(['--db', file, '--json', 'show', 'TW-01'], o2)).toBe(0);
    expect((decodeJson(o2.stdout.join('\n')) as { checks: unknown[] }).checks).toHaveLength(1);
  });

  it('exits 1 with --require-pass when a verdict is not a pass', async () => {
    const { dir, file } = await labDir();
    const failing = goodCheck({
      points: [
        {
          reference: '10 GHz',
          readings: [
            { value: '10.02 GHz', direction: 'up' },
            { value: '10.021 GHz', direction: 'down' },
          ],
        },
      ],
    });
    writeFileSync(path.join(dir, 'check.json'), JSON.stringify(failing));
    const o = io(dir);
    expect(await runCli(['--db', file, 'record', 'check.json', '--require-pass'], o)).toBe(1);
    expect(o.stdout.join('\n')).toMatch(/FAIL/);
  });

  const bad: [string, Record<string, unknown>, RegExp][] = [
    [
      '9,3 GHz',
      {
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
      /Point 1, reference frequency: "9,3 GHz" uses a decimal comma/,
    ],
    [
      'a missing unit',
      {
        points: [
          {
            reference: '9.3',
            readings: [
              { value: '9.3 GHz', direction: 'up' },
              { value: '9.3 GHz', direction: 'down' },
            ],
          },
        ],
      },
      /Point 1, reference frequency: "9.3" has no unit/,
    ],
    [
      'a reading outside the band',
      {
        points: [
          {
            reference: '10 GHz',
            readings: [
              { value: '18 GHz', direction: 'up' },
              { value: '10 GHz', direction: 'down' },
            ],
          },
        ],
      },
      /Point 1, reading 1, value: "18 GHz" is outside the band/,
    ],
    ['a date in the future', { date: '2026-12-24' }, /Date: 2026-12-24 is in the future/],
    ['an unknown meter', { meter: 'TW-99' }, /Meter: no meter "TW-99"/],
    [
      'a lab standard that does not exist',
      { standards: ['SRC-404'] },
      /Standard 1: no lab standard "SRC-404"/,
    ],
  ];
  for (const [name, change, message] of bad) {
    it(`exits 2 on ${name} and leaves the lab file byte-for-byte unchanged`, async () => {
      const { dir, file } = await labDir();
      writeFileSync(path.join(dir, 'bad.json'), JSON.stringify(goodCheck(change)));
      const before = readFileSync(file);
      const o = io(dir);
      expect(await runCli(['--db', file, 'record', 'bad.json'], o)).toBe(2);
      expect(o.stderr.join('\n')).toMatch(message);
      expect(o.stderr.join('\n')).toMatch(/nothing was written/);
      expect(readFileSync(file).equals(before)).toBe(true);
    });
  }

  it('exits 2 on a file that is not JSON', async () => {
    const { dir, file } = await labDir();
    writeFileSync(path.join(dir, 'broken.json'), '{ "format": ');
    const o = io(dir);
    expect(await runCli(['--db', file, 'record', 'broken.json'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(/not valid JSON/);
  });

  it('exits 2 on an unknown command or option', async () => {
    const o = io(tmpdir());
    expect(await runCli(['frobnicate'], o)).toBe(2);
    expect(await runCli(['refs', '--colour'], o)).toBe(2);
  });
});

describe('the installed command', () => {
  it('runs through bin/dipledger.mjs', () => {
    const bin = path.resolve('bin/dipledger.mjs');
    const out = execFileSync(
      process.execPath,
      [bin, 'air', '--temp', '20', '--rh', '50', '--pressure', '1013.25', '--json'],
      {
        encoding: 'utf8',
      },
    );
    expect(JSON.parse(out)).toHaveProperty('refractiveIndex');
    const bad = spawnSync(process.execPath, [bin, '--db', '/nonexistent/dir/lab.dipledger', 'refs'], {
      encoding: 'utf8',
    });
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/no lab file/);
  });
});

describe('the demo lab and the documented examples', () => {
  it('init --sample, refs --json, and every example in docs/examples works on it', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-sample-'));
    const file = path.join(dir, 'demo.dipledger');
    const o = io(path.resolve('.'));
    expect(await runCli(['--db', file, 'init', '--sample'], o)).toBe(0);

    const refs = io(dir);
    expect(await runCli(['--db', file, '--json', 'refs'], refs)).toBe(0);
    const rows = decodeJson(refs.stdout.join('\n')) as {
      assetId: string;
      minHz: number;
      maxHz: number;
      state: string;
      dueDate: string | null;
    }[];
    expect(rows.length).toBeGreaterThanOrEqual(8);
    expect(rows.length).toBeLessThanOrEqual(12);
    for (const r of rows) {
      expect(r.maxHz).toBeGreaterThan(r.minHz);
      expect(['in-service', 'quarantined', 'withdrawn']).toContain(r.state);
      if (r.state !== 'withdrawn') expect(r.dueDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    }
    expect(Math.min(...rows.map((r) => r.minHz))).toBeLessThanOrEqual(2e9);
    expect(Math.max(...rows.map((r) => r.maxHz))).toBeGreaterThanOrEqual(75e9);

    const due = io(dir);
    expect(await runCli(['--db', file, '--json', 'due', '--within', '0'], due)).toBe(0);
    expect((decodeJson(due.stdout.join('\n')) as unknown[]).length).toBeGreaterThanOrEqual(1); // one is overdue

    const record = io(path.resolve('.'));
    expect(await runCli(['--db', file, 'record', 'docs/examples/check.json', '--require-pass'], record)).toBe(
      0,
    );
    const budget = io(path.resolve('.'));
    expect(await runCli(['--db', file, 'budget', 'docs/examples/budget.json'], budget)).toBe(0);
    expect(budget.stdout.join('\n')).toMatch(/Welch|effective dof/);
    const imp = io(path.resolve('.'));
    expect(await runCli(['--db', file, 'import', 'docs/examples/history.csv'], imp)).toBe(0);
    expect(imp.stdout.join('\n')).toMatch(/imported 1 checks/);
    const show = io(dir);
    expect(await runCli(['--db', file, 'show', 'CW-101'], show)).toBe(0);
    expect(show.stdout.join('\n')).toMatch(/2026-11-25/);
  });
});
