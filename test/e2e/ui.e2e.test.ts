// End to end in browser mode on the real service: the demo lab in a temporary lab file, a fixed
// service clock (2026-12-01) and the same date in the page, the built renderer served by the
// loopback server, driven in Debian's Chromium through page objects. Records a check through the
// form (closing and reopening the window on the way) and finds it in the meter's history.
// Leaves screenshots of each view in test-output/.
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import type { Browser, Page } from 'playwright-core';
import { build } from 'vite';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { openApi } from '../../app/api/open';
import type { OpenedLab } from '../../app/api/open';
import { fixedClock } from '../../app/api/service';
import { startServer } from '../../app/server/server';
import type { RunningServer } from '../../app/server/server';
import { createLabFile } from '../../sample-lab/load';
import { syntheticSweep } from '../fixtures/sweeps';
import { AppShell } from './pages/AppShell';
import { MeterPage } from './pages/MeterPage';
import { RecordCheckPage } from './pages/RecordCheckPage';
import { CheckPage } from './pages/CheckPage';
import { DocumentsPage } from './pages/DocumentsPage';
import { RegisterPage } from './pages/RegisterPage';
import { SettingsPage } from './pages/SettingsPage';
import { itFullBrowser } from '../fixtures/test-level';

const CHROMIUM = process.env.DIPLEDGER_CHROMIUM ?? '/usr/bin/chromium';
const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const outputDir = path.join(repoRoot, 'test-output');
const haveChromium = existsSync(CHROMIUM);
const NOW = '2026-12-01T09:00:00.000Z';
/** Demo passphrases typed in the settings (test data, not a lab's). */
const ALBA_PASS = 'alba-bench-passphrase';
const MAREN_PASS = 'maren-review-passphrase';
// A real browser on a real lab file: a busy machine can take tens of seconds for the long steps.
vi.setConfig({ testTimeout: 120_000 });
if (!haveChromium)
  console.warn(`ui e2e skipped: ${CHROMIUM} not found (CI installs it: apt-get install chromium)`);

/** WG-201's plan (8.2 to 12.4 GHz) with readings a few hundred kHz high, as a dial reads. */
const PLAN_GHZ = ['8.2', '8.8', '9.3', '10', '10.7', '11.5', '12.4'];
const readings = (ghz: string) => {
  const f = Number(ghz);
  return {
    up: [(f + 0.0004).toFixed(4), (f + 0.0006).toFixed(4)],
    down: [(f + 0.0008).toFixed(4), (f + 0.0006).toFixed(4)],
  };
};

describe.skipIf(!haveChromium)(
  `the views on the demo lab in Chromium${haveChromium ? '' : ` (skipped: ${CHROMIUM} missing)`}`,
  () => {
    let tmp: string;
    let lab: OpenedLab;
    let server: RunningServer;
    let browser: Browser;
    let page: Page;
    let shell: AppShell;
    const problems: string[] = [];
    /** The check recorded through the form, and its certificate as downloaded. */
    let checkUrl = '';
    let pdfFile = '';
    /** A full-page screenshot from the top, with no tooltip open, after checking nothing is clipped. */
    const shot = async (name: string) => {
      await page.mouse.move(0, 0);
      await page.evaluate(() => window.scrollTo(0, 0));
      expect(await shell.sidewaysOverflow()).toBeLessThanOrEqual(0);
      // Tables scroll sideways inside their frame rather than the page: none may need to here.
      const clipped = await page
        .locator('.table-wrap')
        .evaluateAll((els) => els.filter((el) => el.scrollWidth > el.clientWidth + 1).length);
      expect(clipped).toBe(0);
      await page.screenshot({ path: path.join(outputDir, `${name}.png`), fullPage: true });
    };

    beforeAll(async () => {
      tmp = await mkdtemp(path.join(os.tmpdir(), 'dipledger-ui-'));
      const distDir = path.join(tmp, 'dist');
      await build({
        configFile: path.join(repoRoot, 'vite.config.ts'),
        logLevel: 'warn',
        build: { outDir: distDir, emptyOutDir: true },
      });
      const file = path.join(tmp, 'demo.dipledger');
      const clock = fixedClock(NOW);
      await createLabFile(file, true, { clock });
      lab = openApi(file, { clock });
      server = await startServer({ api: lab.api, staticDir: distDir });
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
      const context = await browser.newContext({
        viewport: { width: 1280, height: 900 },
        colorScheme: 'light',
        timezoneId: 'UTC',
        locale: 'en-GB',
      });
      page = await context.newPage();
      // The page's "today" is the service's: the form's default date is the check date.
      await page.clock.setFixedTime(new Date(NOW));
      page.on('console', (m) => m.type() === 'error' && problems.push(m.text()));
      page.on('pageerror', (e) => problems.push(e.message));
      page.on('response', (r) => r.status() >= 400 && problems.push(`HTTP ${r.status()} ${r.url()}`));
      shell = new AppShell(page);
      await mkdir(outputDir, { recursive: true });
    }, 180_000);

    afterAll(async () => {
      await browser?.close();
      await server?.close();
      lab?.close();
      if (tmp) await rm(tmp, { recursive: true, force: true });
    });

    it('shows the register with the band coverage and its gaps', async () => {
      const register = new RegisterPage(page);
      await register.open(server.launchUrl);
      expect(await shell.current()).toBe('Register');
      const gaps = await page.getByTestId('coverage-gaps').innerText();
      expect(gaps).toContain('Gap: 8–8.2 GHz.');
      // The service's coverage counts an overdue meter as not usable (CW-103 was due 2026-04-22).
      expect(gaps).toContain('Not usable now: 4–8 GHz (CW-103 overdue), 60–75 GHz (WG-206 quarantined).');
      expect(await page.locator('.coverage svg .seg-gap').count()).toBe(1);
      expect(await shell.sidewaysOverflow()).toBeLessThanOrEqual(0);
      await shot('ui-register');
    });

    it('opens a meter page from the register, with its power limit and a chart with units', async () => {
      await page.locator('table.register').getByRole('link', { name: 'WG-201' }).click();
      const meter = new MeterPage(page);
      await meter.powerLimit.waitFor();
      expect(await meter.heading.innerText()).toContain('WG-201');
      expect(await meter.powerLimit.innerText()).toContain('10 W (40.0 dBm)');
      expect(await meter.state.innerText()).toContain('In service');
      await meter.waitForChart();
      const text = await meter.chartText();
      expect(text).toContain('reference frequency / GHz');
      expect(text).toContain('error / ppm');
      expect(text).toContain('tolerance ±1000 ppm');
      // Three checks of seven points, each point with its U bar.
      expect(await meter.errorBarCount()).toBeGreaterThanOrEqual(21);
      expect((await meter.checkDates())[0]).toBe('2026-09-04');
      expect(await shell.sidewaysOverflow()).toBeLessThanOrEqual(0);
      await shot('ui-meter');
    });

    itFullBrowser(
      'records a check through the form, surviving a closed window, and opens it to be signed',
      async () => {
        const meter = new MeterPage(page);
        await meter.recordButton.click();
        const form = new RecordCheckPage(page);
        await page.getByTestId('meter-brief').waitFor();
        expect(await form.references()).toEqual(PLAN_GHZ.map((g) => `${g} GHz`));
        expect(await form.standard('STD-01').innerText()).toContain(
          'certificate AFM-2026-9557, due 2027-09-14',
        );
        await form.performer('Alba Quennell');
        await form.useStandard('STD-01');
        await form.useStandard('STD-03');
        await form.conditions('21.6', '1008.4', '46');
        for (const [i, g] of PLAN_GHZ.entries()) {
          const r = readings(g);
          await form.typePoint(i, r.up, r.down, '4.1');
        }
        await expect.poll(() => form.liveVerdict(6).innerText(), { timeout: 10_000 }).toContain('Pass');
        expect(await form.liveError(3).innerText()).toMatch(/^\+\d+\.\d ppm$/);
        await expect.poll(() => form.draftStatus.innerText(), { timeout: 10_000 }).toMatch(/Draft \d+ saved/);
        expect(await form.review.innerText()).toContain('7 of 7 points judged');
        await shot('ui-record');

        // Close the window and open it again: the draft comes back as typed.
        const draftUrl = page.url();
        expect(draftUrl).toMatch(/#\/record\/draft\/\d+$/);
        await page.goto('about:blank');
        await page.goto(draftUrl);
        await form.pointRows.first().waitFor();
        expect(await form.readingValues(3)).toEqual([...readings('10').up, ...readings('10').down]);
        expect(await page.getByLabel('Temperature / °C').inputValue()).toBe('21.6');
        expect((await lab.api.listDrafts()).length).toBe(1);

        await form.recordButton.click();
        // Recording ends on the check's own page, where it is signed and issued.
        await page.waitForURL(/#\/check\/\d+$/);
        checkUrl = page.url();
        const check = new CheckPage(page);
        await check.verdict.waitFor();
        expect(await check.verdict.innerText()).toContain('Pass');
        expect(await check.state.innerText()).toContain('not signed yet');
        expect(await lab.api.listDrafts()).toEqual([]);
        // Nobody in the demo lab has a signing key yet: the page says where to make one.
        expect(await page.getByText('No one in this lab has a signing key yet').count()).toBe(1);
        await shot('ui-check-unsigned');
      },
    );

    itFullBrowser('gives two people signing keys in the settings', async () => {
      await shell.go('Settings');
      const settings = new SettingsPage(page);
      await settings.people.waitFor();
      expect(await settings.person('Alba Quennell').innerText()).toContain('none: cannot sign');
      await settings.giveKey('Alba Quennell', ALBA_PASS);
      await settings.giveKey('Maren Holt-Ibsen', MAREN_PASS);
      expect(await settings.person('Alba Quennell').innerText()).toMatch(/enrolled 2026-12-01/);
      expect((await lab.api.listSigners()).map((x) => x.person.name).sort()).toEqual([
        'Alba Quennell',
        'Maren Holt-Ibsen',
      ]);
      await shot('ui-settings-people');
    });

    itFullBrowser(
      'signs the check (a wrong passphrase signs nothing), issues its certificate, and the register follows',
      async () => {
        await page.goto(checkUrl);
        const check = new CheckPage(page);
        await check.verdict.waitFor();
        await check.sign('Alba Quennell', 'not-her-passphrase', 'performed');
        await check.problems.waitFor();
        expect(await check.problems.innerText()).toContain('nothing was signed');
        // That refusal was expected: the browser logs its HTTP 422, which is not a problem here.
        const expected = (p: string) => /422|signCheck/.test(p);
        problems.splice(0, problems.length, ...problems.filter((p) => !expected(p)));
        await check.sign('Alba Quennell', ALBA_PASS, 'performed');
        await check.signatures.waitFor();
        await check.sign('Maren Holt-Ibsen', MAREN_PASS, 'reviewed');
        await expect.poll(() => check.signatures.innerText()).toMatch(/reviewed by Maren Holt-Ibsen/);
        expect(await check.signatures.innerText()).toMatch(/performed by Alba Quennell/);
        expect(await check.state.innerText()).toContain('reviewed');
        pdfFile = await check.issue('certificate', path.join(tmp, 'certificate.pdf'));
        expect(await page.getByTestId('issued').innerText()).toMatch(/Issued certificate C-2026-\d{4}/);
        await shot('ui-check-signed');

        // The register shows the new check: its date, its verdict, and a due date a full interval on.
        const register = new RegisterPage(page);
        await shell.go('Register');
        await register.rows.first().waitFor();
        const row = await page.locator('tr[data-asset-id="WG-201"]').innerText();
        expect(row).toContain('2026-12-01');
        expect(row).toContain('Pass');
        expect(row).not.toContain('overdue');

        const meter = new MeterPage(page);
        await page.locator('table.register').getByRole('link', { name: 'WG-201' }).click();
        await meter.powerLimit.waitFor();
        await expect.poll(() => meter.checkDates()).toContain('2026-12-01');
        expect((await meter.checkDates())[0]).toBe('2026-12-01');
        const newest = await meter.newestCheck();
        expect(newest.join(' | ')).toMatch(
          /2026-12-01 \| \d+ \| 1 \| .*Alba Quennell \| 7 \| .*Pass \| .*Pass/,
        );
        const detail = await lab.api.getMeter('WG-201');
        expect(detail.register.lastCheckDate).toBe('2026-12-01');
        await meter.waitForChart();
        expect(await meter.chartText()).toContain('2026-12-01');
        // U bars are drawn with a height, not only present: about ±35 ppm on a ±200 ppm scale.
        expect(await meter.tallestErrorBarPx()).toBeGreaterThan(20);
        await shot('ui-meter-after');
        await meter.chart.screenshot({ path: path.join(outputDir, 'ui-meter-chart.png') });
      },
    );

    it('shows the trend of a drifting meter, interval advice, dip depth, records and audit', async () => {
      const meter = new MeterPage(page);
      await meter.open(server.url, 'WG-202');
      await meter.waitForHistoryCharts();
      const trend = await meter.trendChart.innerText();
      expect(trend).toContain('check date / year');
      expect(trend).toContain('error / ppm');
      expect(trend).toContain('⚠ exit');
      expect(trend).toMatch(/Projected to leave the tolerance on 20\d\d-\d\d-\d\d/);
      expect(await page.getByTestId('interval-advice').innerText()).toMatch(/Suggested interval: \d+ months/);
      expect(await page.getByTestId('flags').innerText()).toMatch(/(Stop|Warning)/);
      expect(await meter.healthChart.innerText()).toContain('dip depth / dB');
      await page.getByTestId('revisions').waitFor();
      await page.getByTestId('audit').waitFor();
      expect(await page.getByTestId('audit').innerText()).toContain('meter WG-202');
      await shot('ui-meter-trend');
    });

    it('answers a fit-for-use question at a frequency', async () => {
      await shell.go('Fit for use');
      await page.getByLabel('Frequency, with its unit').fill('9.375 GHz');
      await page.keyboard.press('Enter');
      const rows = page.locator('table.use tbody tr[data-asset-id]');
      await rows.first().waitFor();
      const byMeter = Object.fromEntries(
        await rows.evaluateAll((trs) =>
          trs.map((tr) => [tr.getAttribute('data-asset-id') ?? '', (tr as HTMLElement).innerText]),
        ),
      ) as Record<string, string>;
      expect(Object.keys(byMeter).sort()).toEqual(['WG-201', 'WG-208']);
      expect(byMeter['WG-201']).toContain('Yes');
      expect(byMeter['WG-208']).toMatch(/✗ No\s+WG-208 is withdrawn/);
      expect(await page.getByTestId('use-correction').innerText()).toMatch(/^Add [+−]\d+\.\d\d ppm/);
      await shot('ui-fit-for-use');
    });

    itFullBrowser('attaches a swept trace to a point and draws the fitted dip over it', async () => {
      // An invented trace: a 2 dB dip at 9.3002 GHz, loaded Q 1500, seeded noise.
      const f0 = 9.3002e9;
      const w = f0 / 1500;
      const s = syntheticSweep([{ f0Hz: f0, loadedQ: 1500, depthDb: 2 }], {
        startHz: f0 - 5 * w,
        stopHz: f0 + 5 * w,
        points: 801,
        seed: 7,
      });
      const lines = s.frequencyHz.map(
        (f, i) => `${(f / 1e9).toFixed(7)},${(10 * Math.log10((s.power[i] as number) / 1e-3)).toFixed(5)}`,
      );
      const traceFile = path.join(tmp, 'wg201-9g3.csv');
      await writeFile(traceFile, ['frequency_GHz,level_dB', ...lines].join('\n'));

      await shell.go('Record a check');
      const form = new RecordCheckPage(page);
      await form.chooseMeter('WG-201');
      await form.useStandard('STD-01');
      await form.conditions('21.4', '1010.2', '45');
      await page.getByRole('radio', { name: /Swept/ }).check();
      const point = page.locator('[data-testid="swept-points"] li[data-point="2"]');
      expect(await point.getByLabel(/dial set to \/ GHz/).inputValue()).toBe('9.3');
      await point.getByLabel(/swept trace/).setInputFiles(traceFile);
      const result = point.getByTestId('swept-result');
      await result.waitFor();
      const said = await result.innerText();
      expect(said).toMatch(/wg201-9g3\.csv: resonance at 9\.\d{6} GHz, loaded Q 1[45]\d\d, dip 2\.0\d dB/);
      // Within 1 % of the linewidth (6.2 MHz) of the invented resonance.
      const fittedGhz = Number(/resonance at (\d+\.\d+) GHz/.exec(said)?.[1]);
      expect(Math.abs(fittedGhz * 1e9 - f0)).toBeLessThan(0.01 * w);
      // Judged live: the dial 200 kHz below the resonance is about −21.5 ppm before corrections.
      const verdict = point.getByTestId('swept-verdict');
      await verdict.waitFor();
      expect(await verdict.innerText()).toMatch(
        /^Error −\d+\.\d ppm after corrections, U = \d+\.\d ppm \(k = \d\.\d\d\): ✓ Pass$/,
      );
      const chart = point.getByRole('figure', { name: 'Swept trace wg201-9g3.csv with the fitted dip' });
      // The measured points and the fitted curve are both drawn, with units on the axes.
      expect(await chart.locator('.recharts-scatter-symbol').count()).toBeGreaterThan(200);
      expect(await chart.locator('path.recharts-curve').count()).toBeGreaterThanOrEqual(1);
      const text = await chart.innerText();
      expect(text).toContain('offset from f0 / MHz');
      expect(text).toContain('level / dB');
      await point.scrollIntoViewIfNeeded();
      await chart.screenshot({ path: path.join(outputDir, 'ui-record-sweep-dip.png') });
      // Not recorded: the draft is thrown away.
      await expect.poll(() => form.draftStatus.innerText(), { timeout: 10_000 }).toMatch(/Draft \d+ saved/);
      await page.getByRole('button', { name: 'Discard this draft' }).click();
      await expect.poll(() => lab.api.listDrafts()).toEqual([]);
    });

    itFullBrowser('verifies the issued certificate, and catches a changed byte', async () => {
      await shell.go('Documents');
      const docs = new DocumentsPage(page);
      await docs.issued.waitFor();
      expect(await docs.issued.innerText()).toMatch(/C-2026-\d{4}/);
      const text = await docs.verify(pdfFile);
      expect(text).toMatch(/✓ Genuine: certificate\.pdf is certificate C-2026-\d{4} revision 1 of WG-201/);
      expect(text).not.toContain('FAIL');
      await shot('ui-documents-verified');
      // One byte changed inside the file: the same page says it is not what was issued.
      const bytes = await readFile(pdfFile);
      const at = Math.floor(bytes.length / 2);
      bytes[at] = (bytes[at] ?? 0) ^ 0x01;
      const changed = path.join(tmp, 'changed.pdf');
      await writeFile(changed, bytes);
      expect(await docs.verify(changed)).toContain('✗ NOT VERIFIED');
    });

    it('refuses a browser that brings a wrong token, or none', async () => {
      const stranger = await browser.newContext();
      try {
        const p = await stranger.newPage();
        const wrong = await p.goto(`${server.url}?token=this-is-not-the-token-0123456789`);
        expect(wrong?.status()).toBe(401);
        expect(await p.locator('body').innerText()).toContain('needs its per-launch token');
        const none = await p.goto(server.url);
        expect(none?.status()).toBe(401);
        const api = await p.evaluate(async () => {
          const r = await fetch('/api/listMeters', {
            method: 'POST',
            headers: { 'content-type': 'application/json' },
            body: JSON.stringify({ args: [] }),
          });
          return { status: r.status, body: await r.text() };
        });
        expect(api.status).toBe(401);
        expect(api.body).not.toContain('WG-201');
      } finally {
        await stranger.close();
      }
    });

    it('shows the lab standards and the settings', async () => {
      await shell.go('Lab standards');
      await page.locator('table.standards tbody tr').first().waitFor();
      expect(await page.locator('tr[data-standard="STD-02"]').innerText()).toContain('2027-06-02');
      expect(await shell.sidewaysOverflow()).toBeLessThanOrEqual(0);
      await shot('ui-standards');
      await shell.go('Settings');
      const name = page.getByLabel('Name', { exact: true });
      await name.waitFor();
      expect(await name.inputValue()).toBe('Kestrel Row Microwave Laboratory');
      expect(await page.getByLabel('Reliability target / %').inputValue()).toBe('95');
      await shot('ui-settings');
      expect(problems).toEqual([]);
    });
  },
);
