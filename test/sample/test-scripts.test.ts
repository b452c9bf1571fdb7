// The split of the test run: `npm test` runs every suite (the long ones in their short form), and
// the full forms are in `npm run test:long` and `npm run test:browser`. A
// suite that gains a long form must be named in the script that runs it, or it never runs long.
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = path.resolve(import.meta.dirname, '../..');
const pkg = JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as {
  scripts: Record<string, string>;
};

function testFiles(dir: string): string[] {
  return readdirSync(path.join(ROOT, dir), { withFileTypes: true }).flatMap((e) =>
    e.isDirectory()
      ? testFiles(path.join(dir, e.name))
      : /\.test\.tsx?$/.test(e.name)
        ? [path.join(dir, e.name)]
        : [],
  );
}

describe('test scripts', () => {
  const files = testFiles('test')
    .filter((f) => !f.endsWith('test-scripts.test.ts'))
    .map((f) => ({ file: f, text: readFileSync(path.join(ROOT, f), 'utf8') }));

  it('npm test is plain vitest over every test file', () => {
    expect(pkg.scripts.test).toBe('vitest run');
  });

  it('names in test:long every suite with a long form, and in test:browser every full browser flow', () => {
    const long = files.filter((f) => /\b(runs|sized|LONG)\b.*from '\.\.\/fixtures\/test-level'/.test(f.text));
    const browser = files.filter((f) => /itFullBrowser/.test(f.text));
    expect(long.length).toBeGreaterThanOrEqual(3);
    expect(browser.length).toBeGreaterThanOrEqual(2);
    for (const f of long) expect(pkg.scripts['test:long'], f.file).toContain(f.file);
    for (const f of browser) expect(pkg.scripts['test:browser'], f.file).toContain(f.file);
    expect(pkg.scripts['test:long']).toMatch(/^DIPLEDGER_TEST_LONG=1 vitest run /);
    expect(pkg.scripts['test:browser']).toMatch(/^DIPLEDGER_TEST_BROWSER=full vitest run /);
  });

  it('CI runs npm test, the README test command', () => {
    const ci = readFileSync(path.join(ROOT, '.ci/run'), 'utf8');
    expect(ci.split('\n').indexOf('npm test')).toBeGreaterThan(0);
  });
});
