// The set-up commands as a coordinator runs them on a new lab: meters from JSON and from the
// register CSV, specification edits with a reason, standards and their certificates, the lab's
// settings and people's keys; every refusal exits 2, names the field (or line and column) and
// leaves the lab file byte-for-byte unchanged.
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { clock, seededLab } from '../fixtures/lab';

const EXAMPLES = path.resolve('docs/examples');

function io(cwd: string, env: NodeJS.ProcessEnv = {}): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env, cwd, clock };
}

async function labDir(): Promise<{
  dir: string;
  file: string;
  run: (args: string[], env?: NodeJS.ProcessEnv) => Promise<{ code: number; out: string; err: string }>;
}> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-cli-setup-'));
  const file = path.join(dir, 'lab.dipledger');
  const lab = await seededLab(file);
  lab.close();
  for (const f of ['meter.json', 'standard.json', 'standard-certificate.json', 'register.csv', 'lab.json'])
    copyFileSync(path.join(EXAMPLES, f), path.join(dir, f));
  const run = async (args: string[], env: NodeJS.ProcessEnv = {}) => {
    const o = io(dir, env);
    const code = await runCli(['--db', file, ...args], o);
    return { code, out: o.stdout.join('\n'), err: o.stderr.join('\n') };
  };
  return { dir, file, run };
}

describe('dipledger set-up commands with the documented examples', () => {
  it('meter add, edit, import (dry run, then for real), export; show lists the revision', async () => {
    const { dir, run } = await labDir();
    expect((await run(['meter', 'add', 'meter.json'])).code).toBe(0);
    writeFileSync(path.join(dir, 'edit.json'), JSON.stringify({ accuracyRelPpm: 1500 }));
    const edit = await run(['meter', 'edit', 'NEW-201', 'edit.json', '--reason', 'maker data sheet B']);
    expect(edit.code).toBe(0);
    expect(edit.out).toMatch(/rev 2 from 2026-12-01 by .*: accuracyRelPpm \(maker data sheet B\)/);
    const json = await run(['--json', 'show', 'NEW-201']);
    expect((JSON.parse(json.out) as { meter: { accuracyRelPpm: number } }).meter.accuracyRelPpm).toBe(1500);
    expect((await run(['show', 'NEW-201'])).out).toMatch(
      /specification: revision 2, in effect from 2026-12-01/,
    );
    const dry = await run(['meter', 'import', 'register.csv', '--dry-run']);
    expect(dry.out).toMatch(/would add 2 meters \(dry run: nothing written\)/);
    expect((await run(['show', 'NEW-301'])).code).toBe(2);
    expect((await run(['meter', 'import', 'register.csv'])).out).toMatch(/added 2 meters/);
    expect((await run(['meter', 'export', '--out', 'out.csv'])).code).toBe(0);
    const exported = readFileSync(path.join(dir, 'out.csv'), 'utf8');
    expect(exported.split('\n')[0]).toBe(readFileSync(path.join(dir, 'register.csv'), 'utf8').split('\n')[0]);
    expect(exported).toMatch(
      /^NEW-302,S-band coaxial meter with micrometer,coaxial,N female,2000000000 Hz,4000000000 Hz,divisions,/m,
    );
  });

  it('standard add, certificate, retire and standards; lab show and set; person key', async () => {
    const { dir, run } = await labDir();
    expect((await run(['standard', 'add', 'standard.json'])).code).toBe(0);
    const cert = await run(['standard', 'certificate', 'SRC-NEW-1', 'standard-certificate.json']);
    expect(cert.out).toMatch(/certificate EX-2027-0077 recorded; due 2028-02-20/);
    const list = await run(['standards']);
    expect(list.out).toMatch(/SRC-NEW-1\s+source\s+.*EX-2027-0077/);
    expect((await run(['standard', 'retire', 'SRC-NEW-1', '--reason', 'replaced'])).out).toMatch(
      /retired on 2026-12-01/,
    );
    expect((await run(['lab', 'set', 'lab.json'])).code).toBe(0);
    const show = await run(['lab', 'show']);
    expect(show.out).toMatch(/^Example frequency laboratory/);
    expect(show.out).toMatch(/intervals\s+6 to 48 months/);
    writeFileSync(path.join(dir, 'ada.pass'), 'ada-passphrase-1\n');
    writeFileSync(path.join(dir, 'ada2.pass'), 'ada-passphrase-2\n');
    expect((await run(['person', 'add', 'Ada Fenwick', '--passphrase-file', 'ada.pass'])).code).toBe(0);
    const key = await run(['person', 'key', 'Ada Fenwick', '--passphrase-file', 'ada2.pass']);
    expect(key.out).toMatch(/new signing key .*older signatures still verify/);
    expect((await run(['person', 'role', 'Bo Marsh', '--role', 'administrator'])).out).toMatch(
      /now a administrator/,
    );
    expect((await run(['person', 'left', 'Ada Fenwick'])).out).toMatch(/left on 2026-12-01/);
    expect((await run(['integrity'])).code).toBe(0);
  });

  it('answers --help for each command', async () => {
    const { run } = await labDir();
    for (const c of ['meter', 'standard', 'standards', 'lab', 'person']) {
      const h = await run([c, '--help']);
      expect(h.code).toBe(0);
      expect(h.out).toMatch(new RegExp(`dipledger ${c}`));
    }
  });
});

describe('refusals exit 2 and leave the lab file byte-for-byte unchanged', () => {
  const meter = JSON.parse(readFileSync(path.join(EXAMPLES, 'meter.json'), 'utf8')) as Record<
    string,
    unknown
  >;
  const cases: [string, string, string[], RegExp][] = [
    [
      'band min above max',
      JSON.stringify({ ...meter, min: '5 GHz' }),
      ['meter', 'add', 'bad.json'],
      /"4 GHz" is not above/,
    ],
    [
      'a negative accuracy',
      JSON.stringify({ ...meter, accuracyRelPpm: -1 }),
      ['meter', 'add', 'bad.json'],
      /accuracy.*-1/,
    ],
    [
      'an accuracy over 100 %',
      JSON.stringify({ ...meter, accuracyRelPpm: 2e6 }),
      ['meter', 'add', 'bad.json'],
      /2000000.*100 %/,
    ],
    [
      'a plan frequency outside the band',
      JSON.stringify({ ...meter, plan: ['9 GHz'] }),
      ['meter', 'add', 'bad.json'],
      /plan 1: 9.00000 GHz is out/,
    ],
    [
      'a duplicate asset id',
      JSON.stringify({ ...meter, assetId: 'TW-01' }),
      ['meter', 'add', 'bad.json'],
      /TW-01 is already in the register/,
    ],
    [
      'an interval of 0 months',
      JSON.stringify({ ...meter, intervalMonths: 0 }),
      ['meter', 'add', 'bad.json'],
      /at least 1 month/,
    ],
    ['an unknown field', JSON.stringify({ ...meter, colour: 'red' }), ['meter', 'add', 'bad.json'], /colour/],
    [
      'an edit of the asset id',
      JSON.stringify({ assetId: 'TW-77' }),
      ['meter', 'edit', 'TW-01', 'bad.json', '--reason', 'rename'],
      /assetId/,
    ],
    [
      'a certificate due before its calibration date',
      JSON.stringify({
        certificateId: 'X-1',
        issuedBy: 'Body',
        calibratedOn: '2027-02-01',
        dueOn: '2027-01-01',
        expandedUncertaintyPpm: 0.02,
      }),
      ['standard', 'certificate', 'SRC-A', 'bad.json'],
      /2027-01-01 is not after/,
    ],
    [
      'a lab setting out of range',
      JSON.stringify({ intervalMinMonths: 0 }),
      ['lab', 'set', 'bad.json'],
      /interval/,
    ],
    [
      'a register row with a bad cell',
      'asset_id,construction,min,max,dial_kind,accuracy_rel_ppm,resolution,alpha_per_k\nNEW-9,coaxial,2 GHz,4 GHz,direct,abc,1 MHz,1e-5\n',
      ['meter', 'import', 'bad.json'],
      /accuracy_rel_ppm.*"abc": expected a number/,
    ],
  ];
  for (const [what, text, args, message] of cases)
    it(`on ${what}`, async () => {
      const { dir, file, run } = await labDir();
      writeFileSync(path.join(dir, 'bad.json'), text);
      const before = readFileSync(file);
      const r = await run(args);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(new RegExp(message.source, 'i'));
      expect(readFileSync(file).equals(before)).toBe(true);
    });

  it('on a missing reason', async () => {
    const { file, run } = await labDir();
    const before = readFileSync(file);
    expect((await run(['standard', 'retire', 'SRC-A'])).code).toBe(2);
    expect(readFileSync(file).equals(before)).toBe(true);
  });
});
