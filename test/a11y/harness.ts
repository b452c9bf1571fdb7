// The accessibility tests' bench: the demo lab in a temporary lab file at a fixed clock, the
// built renderer served by the loopback server, and Debian's Chromium driven by playwright-core
// with axe-core injected into each page. Shared by the axe and keyboard tests in this folder.
import { existsSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { build } from 'vite';
import { openApi } from '../../app/api/open';
import type { OpenedLab } from '../../app/api/open';
import { fixedClock } from '../../app/api/service';
import { startServer } from '../../app/server/server';
import type { RunningServer } from '../../app/server/server';
import { createLabFile } from '../../sample-lab/load';

export const CHROMIUM = process.env.DIPLEDGER_CHROMIUM ?? '/usr/bin/chromium';
export const haveChromium = existsSync(CHROMIUM);
export const NOW = '2026-12-01T09:00:00.000Z';
const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

/** The WCAG 2.1 level A and AA rules of axe-core: the floor the window has to meet. */
export const WCAG_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];

export interface Bench {
  url: string;
  lab: OpenedLab;
  browser: Browser;
  close(): Promise<void>;
}

export async function openBench(): Promise<Bench> {
  const tmp = await mkdtemp(path.join(os.tmpdir(), 'dipledger-a11y-'));
  const distDir = path.join(tmp, 'dist');
  // DIPLEDGER_A11Y_TREE measures another copy of the sources (e.g. an older commit, to compare).
  const tree = process.env.DIPLEDGER_A11Y_TREE ? path.resolve(process.env.DIPLEDGER_A11Y_TREE) : repoRoot;
  await build({
    configFile: path.join(tree, 'vite.config.ts'),
    logLevel: 'warn',
    build: { outDir: distDir, emptyOutDir: true },
  });
  const file = path.join(tmp, 'demo.dipledger');
  const clock = fixedClock(NOW);
  await createLabFile(file, true, { clock });
  const lab = openApi(file, { clock });
  const server: RunningServer = await startServer({ api: lab.api, staticDir: distDir });
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    url: server.launchUrl,
    lab,
    browser,
    async close() {
      await browser.close();
      await server.close();
      lab.close();
      await rm(tmp, { recursive: true, force: true });
    },
  };
}

export async function newPage(
  bench: Bench,
  options: { width?: number; scheme?: 'light' | 'dark' } = {},
): Promise<{ context: BrowserContext; page: Page; problems: string[] }> {
  const context = await bench.browser.newContext({
    viewport: { width: options.width ?? 1280, height: 900 },
    colorScheme: options.scheme ?? 'light',
    timezoneId: 'UTC',
    locale: 'en-GB',
    reducedMotion: 'reduce',
    // axe-core goes in as an inline script, which the window's policy (rightly) refuses.
    bypassCSP: true,
  });
  const page = await context.newPage();
  await page.clock.setFixedTime(new Date(NOW));
  const problems: string[] = [];
  page.on('pageerror', (e) => problems.push(e.message));
  return { context, page, problems };
}

let axeSource: string | undefined;

export interface AxeFinding {
  id: string;
  impact: string | null;
  help: string;
  nodes: string[];
}

/** Runs axe-core's WCAG 2.1 A/AA rules on the page as it stands; one entry per rule broken. */
export async function axe(page: Page): Promise<AxeFinding[]> {
  if (!axeSource) {
    const require = createRequire(import.meta.url);
    axeSource = await readFile(require.resolve('axe-core/axe.min.js'), 'utf8');
  }
  if (!(await page.evaluate(() => 'axe' in window))) await page.addScriptTag({ content: axeSource });
  return page.evaluate(async (tags) => {
    const w = window as unknown as {
      axe: {
        run(
          ctx: Document,
          opts: object,
        ): Promise<{
          violations: {
            id: string;
            impact: string | null;
            help: string;
            nodes: { target: unknown[]; failureSummary?: string }[];
          }[];
        }>;
      };
    };
    const result = await w.axe.run(document, {
      runOnly: { type: 'tag', values: tags },
      resultTypes: ['violations'],
    });
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.map((n) => `${n.target.join(' ')}: ${n.failureSummary ?? ''}`.slice(0, 300)),
    }));
  }, WCAG_TAGS);
}

/** Every view of the window, with the element that says it has finished loading. */
export const VIEWS: { name: string; hash: string; ready: string }[] = [
  { name: 'register', hash: '#/register', ready: 'table' },
  { name: 'meter', hash: '#/meter/WG-202', ready: 'figure' },
  { name: 'record', hash: '#/record', ready: 'form' },
  { name: 'record-meter', hash: '#/record/WG-201', ready: 'table' },
  { name: 'check', hash: '#/check/1', ready: 'table' },
  { name: 'use', hash: '#/use', ready: 'form' },
  { name: 'standards', hash: '#/standards', ready: 'table' },
  { name: 'documents', hash: '#/documents', ready: 'h2' },
  { name: 'settings', hash: '#/settings', ready: 'h2' },
];

/** Opens a view from a fresh load and waits until its content (not only its heading) is drawn. */
export async function openView(page: Page, bench: Bench, view: { hash: string; ready: string }) {
  await page.goto(`${bench.url}${view.hash}`);
  await page.locator(view.ready).first().waitFor({ timeout: 30_000 });
  await page.waitForFunction(() => !document.querySelector('[aria-busy="true"]'), undefined, {
    timeout: 30_000,
  });
}
