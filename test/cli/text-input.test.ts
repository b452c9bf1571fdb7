// Text the CLI reads must be UTF-8 without NUL bytes: a damaged byte is refused naming the file
// and the line, with exit 2 and nothing written (WHATWG Encoding Standard: UTF-8 decode with
// error mode "fatal", as TextDecoder does).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { decodeTextFile } from '../../app/cli/read-text';
import { clock, goodCheck, seededLab } from '../fixtures/lab';

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

describe('text input', () => {
  it('reads UTF-8 and drops a byte-order mark', () => {
    expect(decodeTextFile(Buffer.from('\ufeffRavi Ostränder\n', 'utf8'), 'a.csv')).toBe('Ravi Ostränder\n');
  });

  it('refuses bytes that are not UTF-8, naming the line', () => {
    // 0xE4 alone is "ä" in Latin-1 but an incomplete sequence in UTF-8 (RFC 3629 section 3).
    const bytes = Buffer.concat([
      Buffer.from('line one\nRavi Ostr'),
      Buffer.from([0xe4]),
      Buffer.from('nder\n'),
    ]);
    expect(() => decodeTextFile(bytes, 'h.csv')).toThrow(/h\.csv line 2: bytes that are not UTF-8/);
  });

  it('refuses a NUL byte, naming the line', () => {
    expect(() => decodeTextFile(Buffer.from('a\nb\nc\u0000d'), 'x.json')).toThrow(
      /x\.json line 3: a NUL byte/,
    );
  });

  it('record refuses a document with a damaged performer name: exit 2, nothing written', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-text-'));
    const file = path.join(dir, 'lab.dipledger');
    (await seededLab(file)).close();
    const json = JSON.stringify(goodCheck({ performer: 'Ada FenwickXX' }), null, 2);
    const at = json.indexOf('XX');
    const bytes = Buffer.from(json, 'utf8');
    bytes[at] = 0xff;
    bytes[at + 1] = 0xfe;
    writeFileSync(path.join(dir, 'check.json'), bytes);
    const o = io(dir);
    expect(await runCli(['--db', file, 'record', 'check.json'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(/check\.json line \d+: bytes that are not UTF-8/);
    const after = io(dir);
    expect(await runCli(['--db', file, '--json', 'audit', '--entity', 'check'], after)).toBe(0);
    expect(JSON.parse(after.stdout.join('\n'))).toEqual([]);
  });
});
