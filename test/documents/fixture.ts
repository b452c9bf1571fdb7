// The demo lab with two signed checks of WG-201 (one adjusted, with as-found and as-left
// points), built once per test file on a fixed clock, and the poppler tools the document tests
// read PDFs with.
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { openApi, type OpenedLab } from '../../app/api/open';
import { createLabFile } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';

export const RAVI = { name: 'Ravi Ostrander', passphrase: 'ravi-passphrase-1' };
export const MAREN = { name: 'Maren Holt-Ibsen', passphrase: 'maren-passphrase-1' };
export const ALBA = { name: 'Alba Quennell', passphrase: 'alba-passphrase-1' };

export interface DemoLab {
  dir: string;
  file: string;
  lab: OpenedLab;
  /** WG-201, 2019-04-03: adjusted (as found and as left). */
  adjustedCheckId: number;
  /** WG-201, 2026-09-04: not adjusted. */
  newestCheckId: number;
  /** WG-201, 2025-09-15: left as a draft. */
  draftCheckId: number;
}

export async function demoLab(): Promise<DemoLab> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-docs-'));
  const file = path.join(dir, 'demo.dipledger');
  await createLabFile(file, true, { clock });
  const lab = openApi(file, { clock });
  for (const p of [RAVI, MAREN, ALBA]) await lab.api.enrolSigner(p);
  const checks = (await lab.api.getMeter('WG-201')).checks;
  const id = (date: string) => {
    const c = checks.find((x) => x.date === date);
    if (!c) throw new Error(`demo lab has no WG-201 check on ${date}`);
    return c.checkId;
  };
  const adjustedCheckId = id('2019-04-03');
  const newestCheckId = id('2026-09-04');
  for (const checkId of [adjustedCheckId, newestCheckId]) {
    await lab.api.signCheck({ checkId, person: RAVI.name, passphrase: RAVI.passphrase });
    await lab.api.signCheck({ checkId, person: MAREN.name, passphrase: MAREN.passphrase });
  }
  return { dir, file, lab, adjustedCheckId, newestCheckId, draftCheckId: id('2025-09-15') };
}

export const HAS_POPPLER = ['pdftotext', 'pdftoppm', 'pdfsig', 'pdffonts', 'pdfinfo'].every(
  (t) => spawnSync(t, ['-v'], { encoding: 'utf8' }).error === undefined,
);
if (!HAS_POPPLER)
  console.warn(
    'poppler-utils (pdftotext, pdftoppm, pdfsig, pdffonts, pdfinfo) not found: PDF reading tests are skipped',
  );

export function run(tool: string, args: string[]): { status: number; out: string } {
  const r = spawnSync(tool, args, { encoding: 'utf8' });
  return { status: r.status ?? -1, out: `${r.stdout}${r.stderr}` };
}

export function writeTemp(dir: string, name: string, bytes: Buffer): string {
  const f = path.join(dir, name);
  writeFileSync(f, bytes);
  return f;
}

/** Text of a PDF as pdftotext reads it, whitespace collapsed so phrases match across lines. */
export function pdfText(file: string): string {
  return run('pdftotext', ['-enc', 'UTF-8', file, '-']).out.replace(/\s+/g, ' ');
}

/** Renders every page to test-output/documents/NAME-N.png for a person to look at. */
export function renderPages(file: string, name: string): string[] {
  const outDir = path.resolve('test-output/documents');
  mkdirSync(outDir, { recursive: true });
  for (const f of readdirSync(outDir)) if (f.startsWith(`${name}-`)) rmSync(path.join(outDir, f));
  run('pdftoppm', ['-png', '-r', '70', file, path.join(outDir, name)]);
  // pdftoppm pads page numbers to the width of the page count (name-1.png or name-01.png).
  return readdirSync(outDir)
    .filter((f) => f.startsWith(`${name}-`) && f.endsWith('.png'))
    .sort()
    .map((f) => path.join(outDir, f));
}
