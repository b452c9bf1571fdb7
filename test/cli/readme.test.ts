// The README's command-line examples, as a newcomer runs them: every `npx dipledger` line of its
// shell blocks, in order, in an empty folder holding only docs/examples, on the demo lab its
// first line makes. Passphrases come from DIPLEDGER_PASSPHRASE, the variable meant for scripts.
// Also: `--version`, and `COMMAND --help` for every command.
import { cpSync, existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { commandHelp, commandNames, runCli, type CliIo } from '../../app/cli/main';
import { clock } from '../fixtures/lab';

const ROOT = path.resolve(import.meta.dirname, '../..');

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return {
    stdout,
    stderr,
    out: (t) => stdout.push(t),
    err: (t) => stderr.push(t),
    env: { DIPLEDGER_PASSPHRASE: 'a passphrase for the readme' },
    cwd,
    clock,
  };
}

/** The words of a shell line as sh would split them: double or single quotes group, an
 * unquoted # starts a comment. Only what the README uses (no escapes, no variables). */
export function shellWords(line: string): string[] {
  const words: string[] = [];
  let word = '';
  let quote: string | null = null;
  let started = false;
  for (const ch of line) {
    if (quote) {
      if (ch === quote) quote = null;
      else word += ch;
    } else if (ch === '"' || ch === "'") {
      quote = ch;
      started = true;
    } else if (ch === '#') break;
    else if (/\s/.test(ch)) {
      if (started) words.push(word);
      word = '';
      started = false;
    } else {
      word += ch;
      started = true;
    }
  }
  if (quote) throw new Error(`unclosed quote in: ${line}`);
  if (started) words.push(word);
  return words;
}

/** Every `npx dipledger` line inside the README's ``` blocks, in order. */
function readmeCommands(): string[] {
  const lines: string[] = [];
  let inBlock = false;
  for (const line of readFileSync(path.join(ROOT, 'README.md'), 'utf8').split('\n')) {
    if (line.startsWith('```')) inBlock = !inBlock;
    else if (inBlock && line.trim().startsWith('npx dipledger')) lines.push(line.trim());
  }
  return lines;
}

describe('shellWords', () => {
  it('groups quoted words and drops comments', () => {
    expect(shellWords(`npx dipledger sign 165 --as "Ravi Ostrander"   # performer`)).toEqual([
      'npx',
      'dipledger',
      'sign',
      '165',
      '--as',
      'Ravi Ostrander',
    ]);
    expect(shellWords(`a 'b # c' ""`)).toEqual(['a', 'b # c', '']);
  });
});

describe('the README examples', () => {
  const lines = readmeCommands();

  it('start with the line that makes the demo lab, and name only files they ship or make', () => {
    expect(lines.length).toBeGreaterThanOrEqual(25);
    expect(shellWords(lines[0]!).slice(2)).toEqual(['--db', 'my.dipledger', 'init', '--sample']);
    for (const line of lines) {
      for (const word of shellWords(line)) {
        if (word.startsWith('docs/')) expect(existsSync(path.join(ROOT, word)), word).toBe(true);
      }
    }
  });

  it('every `npx dipledger` line runs, in order, with exit code 0', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-readme-'));
    cpSync(path.join(ROOT, 'docs/examples'), path.join(dir, 'docs/examples'), { recursive: true });
    const outputs = new Map<string, string>();
    for (const line of lines) {
      const words = shellWords(line);
      expect(words.slice(0, 2)).toEqual(['npx', 'dipledger']);
      const o = io(dir);
      const code = await runCli(words.slice(2), o);
      expect({ line, code, stderr: o.stderr.join('\n') }).toEqual({ line, code: 0, stderr: '' });
      outputs.set(words.slice(2).join(' '), o.stdout.join('\n'));
    }
    // A few outcomes that show the lines did what their comments say.
    const out = (prefix: string) => [...outputs].find(([k]) => k.includes(prefix))?.[1] ?? '';
    expect(out('record docs/examples/check.json')).toMatch(/check 165\b/);
    expect(out('verify cert.pdf')).not.toMatch(/mismatch/i);
    expect(out('my-copy.dipledger integrity')).toMatch(/all records intact/);
    for (const made of ['history.csv', 'ws.pdf', 'cert.pdf', 'my-copy.dipledger'])
      expect(existsSync(path.join(dir, made)), made).toBe(true);
  }, 300000);
});

describe('dipledger --version and COMMAND --help', () => {
  it('prints the version of package.json', async () => {
    const o = io(ROOT);
    expect(await runCli(['--version'], o)).toBe(0);
    const version = (JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as { version: string })
      .version;
    expect(o.stdout.join('\n')).toBe(`dipledger ${version}`);
  });

  it('answers --help for every command with its usage and exit code 0', async () => {
    const names = commandNames();
    expect(names.length).toBeGreaterThanOrEqual(30);
    for (const name of names) {
      expect(commandHelp(name), name).toBeDefined();
      const o = io(ROOT);
      expect(await runCli([name, '--help'], o), name).toBe(0);
      const text = o.stdout.join('\n');
      expect(text).toMatch(new RegExp(`^usage:\\s+dipledger .*\\b${name}\\b`));
      expect(text).toMatch(/--db FILE/);
    }
  });

  it('refuses --help for a command it does not know, with exit code 2', async () => {
    const o = io(ROOT);
    expect(await runCli(['frobnicate', '--help'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(/unknown command "frobnicate"/);
  });
});
