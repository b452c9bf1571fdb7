// End to end in browser mode: the built renderer served by the loopback server over a fake
// lab, driven in Debian's Chromium: the columns, the filters and sorting from the keyboard, and a
// fleet of 2,000 meters that mounts only a window of rows. Leaves test-output/register.png.
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import type { Browser, Page } from 'playwright-core';
import { build } from 'vite';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer } from '../../app/server/server';
import type { RunningServer } from '../../app/server/server';
import { DEMO_LAB, DEMO_ROWS, fakeLabApi } from './fixtures/fakeLab';
import { fleetApi, fleetAssetId } from './fixtures/registerFleet';
import { RegisterPage } from './pages/RegisterPage';
import { itFullBrowser } from '../fixtures/test-level';

// Debian's Chromium; never a downloaded browser. The variable exists to try the skip path.
const CHROMIUM = process.env.DIPLEDGER_CHROMIUM ?? '/usr/bin/chromium';
const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const outputDir = path.join(repoRoot, 'test-output');
const haveChromium = existsSync(CHROMIUM);
/** Soonest due first: never checked, overdue, soon, later; withdrawn last. */
const DUE_ORDER = ['WM-005', 'WM-003', 'WM-004', 'WM-002', 'WM-001', 'WM-006', 'WM-007'];
if (!haveChromium)
  console.warn(`register e2e skipped: ${CHROMIUM} not found (CI installs it: apt-get install chromium)`);

describe.skipIf(!haveChromium)(
  `register page in Chromium${haveChromium ? '' : ` (skipped: ${CHROMIUM} missing)`}`,
  () => {
    let distDir: string;
    let server: RunningServer;
    let fleetServer: RunningServer;
    let browser: Browser;
    let page: Page;
    let register: RegisterPage;
    const problems: string[] = [];

    beforeAll(async () => {
      // A fresh build in a temporary folder: never a stale renderer/dist, never racing another build.
      distDir = await mkdtemp(path.join(os.tmpdir(), 'dipledger-dist-'));
      await build({
        configFile: path.join(repoRoot, 'vite.config.ts'),
        logLevel: 'warn',
        build: { outDir: distDir, emptyOutDir: true },
      });
      server = await startServer({ api: fakeLabApi(), staticDir: distDir });
      fleetServer = await startServer({ api: fleetApi(2000), staticDir: distDir });
      browser = await chromium.launch({
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
      page = await browser.newPage({ viewport: { width: 1280, height: 860 }, colorScheme: 'light' });
      // Console errors include CSP violations, which would mean the page is half broken.
      page.on('console', (m) => m.type() === 'error' && problems.push(m.text()));
      page.on('pageerror', (e) => problems.push(e.message));
      page.on('response', (r) => r.status() >= 400 && problems.push(`HTTP ${r.status()} ${r.url()}`));
      register = new RegisterPage(page);
      await register.open(server.launchUrl);
    }, 120_000);

    afterAll(async () => {
      await browser?.close();
      await server?.close();
      await fleetServer?.close();
      if (distDir) await rm(distDir, { recursive: true, force: true });
    });

    it('shows the lab name, the cautions and every meter', async () => {
      expect(await register.heading.innerText()).toBe(DEMO_LAB.name);
      const cautions = await register.cautions.innerText();
      expect(cautions).toContain('Maximum input power');
      expect(cautions).toContain('open waveguide');
      expect(cautions).toContain('quality system');
      expect(await register.assetIds()).toEqual(DUE_ORDER);
      expect(await register.sortOf('Due date')).toBe('ascending');
    });

    it('writes bands with units, states and verdicts in words, due in days', async () => {
      expect(await register.cell('WM-003', 'Band')).toBe('8.2–12.4 GHz');
      expect(await register.cell('WM-007', 'Band')).toBe('75–110 GHz');
      expect(await register.cell('WM-004', 'State')).toContain('Quarantined');
      expect(await register.cell('WM-004', 'Last verdict')).toContain('Fail');
      expect(await register.cell('WM-002', 'Last verdict')).toContain('Conditional pass');
      expect(await register.cell('WM-005', 'Last verdict')).toBe('Not checked yet');
      expect(await register.cell('WM-003', 'Last verdict')).toBe('✓ Pass\n2025-01-15');
      expect(await register.cell('WM-003', 'Days to due')).toContain('21 d overdue');
      expect(await register.cell('WM-001', 'Days to due')).toBe('90 d');
      expect(await register.cell('WM-002', 'Days to due')).toBe('12 d, soon');
      expect(await register.cell('WM-007', 'Days to due')).toBe('not in use');
      expect(await register.alignment('WM-003', 'Days to due')).toBe('right');
      expect(await register.summary.innerText()).toMatch(/7 meters\s+2 overdue\s+1 due within 30 d/);
      expect(await register.alignment('WM-003', 'Band')).toBe('right');
    });

    it('filters by asset id or description', async () => {
      await register.filter('ka-band');
      await expect.poll(() => register.assetIds()).toEqual(['WM-005']);
      await register.filter('wm-00');
      await expect.poll(() => register.assetIds()).toHaveLength(DEMO_ROWS.length);
      await register.filter('dropped');
      await expect.poll(() => register.assetIds()).toEqual(['WM-004']);
      expect(await register.summary.innerText()).toContain('Showing 1 of 7 meters');
      await register.filter('no such meter');
      await expect.poll(() => register.assetIds()).toEqual([]);
      expect(await register.emptyMessage.innerText()).toContain('No meter matches');
      await register.filter('');
      await expect.poll(() => register.assetIds()).toHaveLength(DEMO_ROWS.length);
    });

    it('filters by state, due status, construction, a covered frequency and flags', async () => {
      await register.filterBy({ state: 'quarantined' });
      await expect.poll(() => register.assetIds()).toEqual(['WM-004']);
      expect(await register.summary.innerText()).toContain('Showing 1 of 7 meters');
      await register.filterBy({ state: 'any', due: 'overdue' });
      await expect.poll(() => register.assetIds()).toEqual(['WM-003', 'WM-004']);
      await register.filterBy({ due: 'any', construction: 'coaxial' });
      await expect.poll(() => register.assetIds()).toEqual(['WM-002', 'WM-001']);
      await register.filterBy({ construction: 'any', frequency: '13 GHz' });
      await expect.poll(() => register.assetIds()).toEqual(['WM-004']);
      await register.filterBy({ frequency: '13' });
      await expect.poll(() => register.frequencyProblem.innerText()).toContain('"13" has no unit');
      await expect.poll(() => register.assetIds()).toHaveLength(DEMO_ROWS.length);
      await register.filterBy({ frequency: '', flaggedOnly: true });
      await expect.poll(() => register.assetIds()).toEqual(['WM-003', 'WM-006']);
      expect(await register.cell('WM-006', 'Flags')).toBe('⚑ dip fading\n⚑ Q falling');
      await register.clearFilters();
      await expect.poll(() => register.assetIds()).toEqual(DUE_ORDER);
      expect(await register.summary.innerText()).toMatch(/^7 meters/);
    });

    it('sorts by a column from the keyboard and says so with aria-sort', async () => {
      await register.sortBy('Asset id');
      await expect.poll(() => register.assetIds()).toEqual(DEMO_ROWS.map((r) => r.assetId));
      expect(await register.sortOf('Asset id')).toBe('ascending');
      expect(await register.sortOf('Due date')).toBeNull();
      await register.sortBy('Asset id');
      await expect.poll(() => register.assetIds()).toEqual(DEMO_ROWS.map((r) => r.assetId).reverse());
      expect(await register.sortOf('Asset id')).toBe('descending');
      await register.sortBy('Due date');
      await expect.poll(() => register.assetIds()).toEqual(DUE_ORDER);
    });

    itFullBrowser('mounts a window of rows for 2,000 meters and brings later rows on scrolling', async () => {
      const fleet = new RegisterPage(await browser.newPage({ viewport: { width: 1280, height: 860 } }));
      try {
        await fleet.open(fleetServer.launchUrl);
        expect(await fleet.table.getAttribute('aria-rowcount')).toBe('2001');
        const first = await fleet.rowIndexes();
        expect(first[0]).toBe(2);
        expect(first.length).toBeLessThan(80);
        await fleet.scrollTo(1);
        await expect.poll(async () => Math.max(...(await fleet.rowIndexes()))).toBe(2001);
        expect((await fleet.rowIndexes()).length).toBeLessThan(80);
        // The page itself does not grow with the fleet: the register scrolls in its own frame.
        const pageHeight = await fleet.page.evaluate(() => document.documentElement.scrollHeight);
        expect(pageHeight).toBeLessThan(3000);
        await fleet.filter(fleetAssetId(1234));
        await expect.poll(() => fleet.assetIds()).toEqual([fleetAssetId(1234)]);
        await fleet.filter('');
        await fleet.scrollTo(0.5);
        await expect.poll(async () => Math.min(...(await fleet.rowIndexes()))).toBeGreaterThan(900);
        await fleet.page.screenshot({ path: path.join(outputDir, 'register-fleet.png') });
      } finally {
        await fleet.page.close();
      }
    });

    it('loads without console errors and leaves a screenshot', async () => {
      await mkdir(outputDir, { recursive: true });
      await register.search.blur();
      // The whole table must fit a 1280 px window: no sideways scrolling to see days to due.
      const overflow = await page.locator('.table-wrap').evaluate((el) => el.scrollWidth - el.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await page.screenshot({ path: path.join(outputDir, 'register.png'), fullPage: true });
      expect(problems).toEqual([]);
    });
  },
);
