// axe-core's WCAG 2.1 A and AA rules on every view of the window, in the light and the dark
// scheme, on the demo lab in Chromium: any violation fails. With DIPLEDGER_SHOTS=1 it also
// leaves screenshots of every view at 1440, 1024 and 320 CSS px in tmp/shots for a person to
// look at; at 320 px (400 % zoom, WCAG 1.4.10) the bench views must not scroll sideways.
import { mkdir } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { axe, CHROMIUM, haveChromium, newPage, openBench, openView, VIEWS } from './harness';
import type { AxeFinding, Bench } from './harness';

vi.setConfig({ testTimeout: 180_000 });
const SHOTS = process.env.DIPLEDGER_SHOTS === '1';
const REFLOW_VIEWS = ['register', 'meter', 'record', 'record-meter', 'use'];

describe.skipIf(!haveChromium)(
  `WCAG 2.1 A/AA on every view${haveChromium ? '' : ` (skipped: ${CHROMIUM} missing)`}`,
  () => {
    let bench: Bench;
    const summary: string[] = [];
    beforeAll(async () => {
      bench = await openBench();
    }, 300_000);
    afterAll(async () => {
      if (summary.length) console.log(`axe findings per view:\n${summary.join('\n')}`);
      await bench?.close();
    });

    for (const scheme of ['light', 'dark'] as const) {
      it(`no violations in the ${scheme} scheme`, async () => {
        const { context, page, problems } = await newPage(bench, { scheme });
        const found: Record<string, AxeFinding[]> = {};
        for (const view of VIEWS) {
          const opened = await openView(page, bench, view).then(
            () => '',
            (e: unknown) => (e instanceof Error ? e.message.split('\n')[0]! : String(e)),
          );
          const findings: AxeFinding[] = opened
            ? [{ id: 'view-not-drawn', impact: null, help: opened, nodes: [] }]
            : await axe(page);
          summary.push(
            `${scheme} ${view.name}: ${findings.length} rules, ${findings.reduce((n, f) => n + f.nodes.length, 0)} nodes${findings.length ? ` (${findings.map((f) => `${f.id}×${f.nodes.length}`).join(', ')})` : ''}`,
          );
          if (findings.length) found[view.name] = findings;
        }
        await context.close();
        expect(problems).toEqual([]);
        expect(found).toEqual({});
      });
    }

    it('reflows at 320 CSS px: the bench views do not scroll sideways', async () => {
      const overflow: Record<string, number> = {};
      for (const scheme of ['light', 'dark'] as const) {
        const { context, page } = await newPage(bench, { scheme, width: 320 });
        for (const view of VIEWS) {
          await openView(page, bench, view);
          const px = await page.evaluate(
            () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
          );
          if (REFLOW_VIEWS.includes(view.name) && px > 0) overflow[`${scheme} ${view.name}`] = px;
        }
        await context.close();
      }
      expect(overflow).toEqual({});
    });

    it.runIf(SHOTS)('screenshots every view at 1440, 1024 and 320 px in both schemes', async () => {
      const dir = path.resolve('tmp', 'shots');
      await mkdir(dir, { recursive: true });
      let count = 0;
      for (const scheme of ['light', 'dark'] as const) {
        for (const width of [1440, 1024, 320]) {
          const { context, page } = await newPage(bench, { scheme, width });
          for (const view of VIEWS) {
            await openView(page, bench, view);
            await page.screenshot({
              path: path.join(dir, `${view.name}-${width}-${scheme}.png`),
              fullPage: true,
            });
            count += 1;
          }
          await context.close();
        }
      }
      expect(count).toBe(VIEWS.length * 6);
    });
  },
);
