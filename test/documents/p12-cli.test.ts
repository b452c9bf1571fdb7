// `certificate --p12` through the shipped command (bin/dipledger.mjs under plain Node, not the
// test runner's module loader, which forgives a default import of a CommonJS module that Node
// does not): the lab's own PKCS#12 signs the certificate, and pdfsig reports that signature valid.
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoLab, HAS_POPPLER, run, type DemoLab } from './fixture';
import { throwawayP12 } from './p12';

let demo: DemoLab;
beforeAll(async () => {
  demo = await demoLab();
  demo.lab.close();
});
afterAll(() => undefined);

const BIN = path.resolve('bin/dipledger.mjs');

function dipledger(args: string[], env: Record<string, string> = {}): { status: number; out: string } {
  const r = spawnSync(process.execPath, [BIN, '--db', demo.file, ...args], {
    encoding: 'utf8',
    cwd: demo.dir,
    env: { ...process.env, ...env },
  });
  return { status: r.status ?? -1, out: `${r.stdout}${r.stderr}` };
}

describe('certificate --p12 through the command', () => {
  it('signs with the lab PKCS#12 and writes the certificate', () => {
    const p12File = path.join(demo.dir, 'lab.p12');
    writeFileSync(p12File, throwawayP12('p12-passphrase'));
    const out = path.join(demo.dir, 'p12-signed.pdf');
    const r = dipledger(['certificate', String(demo.adjustedCheckId), '--out', out, '--p12', p12File], {
      DIPLEDGER_P12_PASSPHRASE: 'p12-passphrase',
    });
    expect(r.out).not.toMatch(/could not sign/);
    expect(r.status).toBe(0);
    expect(r.out).toMatch(/PDF signature embedded/);
    expect(readFileSync(out).subarray(0, 5).toString('latin1')).toBe('%PDF-');
    if (HAS_POPPLER) expect(run('pdfsig', [out]).out).toMatch(/Signature Validation: Signature is Valid\./);
    const v = dipledger(['verify', out]);
    expect(v.out).toMatch(/^VERIFIED/m);
    expect(v.status).toBe(0);
  }, 60_000);
});
