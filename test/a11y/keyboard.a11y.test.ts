// The window from the keyboard alone in Chromium, on the demo lab: the skip link is the first
// Tab stop and lands in the main region; moving to another view puts focus on its heading inside
// <main>; after an action focus stays on the control or moves to its result (a refused record to
// the first faulty field, a recorded check to the new check's heading, a signature to the list
// of signatures), and each result is said in the polite live region. What is checked is WCAG
// 2.1 (2.4.1, 2.4.3, 3.3.1, 4.1.3) as common practice reads it.
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { Page } from 'playwright-core';
import { RecordCheckPage } from '../e2e/pages/RecordCheckPage';
import { CHROMIUM, haveChromium, newPage, openBench, openView } from './harness';
import type { Bench } from './harness';

vi.setConfig({ testTimeout: 180_000 });
/** Demo passphrase (test data, not a lab's). */
const PASS = 'alba-bench-passphrase';

/** What has focus: its tag, its text and whether it sits inside <main>. */
const focused = (page: Page) =>
  page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    return {
      tag: el?.tagName.toLowerCase() ?? '',
      text: (el?.innerText ?? '').trim(),
      inMain: Boolean(el?.closest('main')),
      invalid: el?.getAttribute('aria-invalid') ?? null,
      describedBy: (el?.getAttribute('aria-describedby') ?? '')
        .split(' ')
        .filter(Boolean)
        .map((id) => document.getElementById(id)?.textContent ?? '')
        .join(' '),
    };
  });
const announced = (page: Page) => page.getByTestId('announcer').innerText();

describe.skipIf(!haveChromium)(
  `the window from the keyboard${haveChromium ? '' : ` (skipped: ${CHROMIUM} missing)`}`,
  () => {
    let bench: Bench;
    let page: Page;
    beforeAll(async () => {
      bench = await openBench();
      await bench.lab.api.enrolSigner({ name: 'Alba Quennell', passphrase: PASS });
      ({ page } = await newPage(bench));
    }, 300_000);
    afterAll(async () => {
      await bench?.close();
    });

    it('makes the skip link the first Tab stop of every view, landing on the view heading', async () => {
      for (const hash of ['#/register', '#/meter/WG-202', '#/use', '#/settings']) {
        await page.goto(`${bench.url}${hash}`);
        await page.locator('main h1').waitFor();
        await page.keyboard.press('Tab');
        const first = await focused(page);
        expect(`${first.tag}: ${first.text}`, hash).toBe('a: Skip to main content');
        expect(await page.locator('.skip-link').isVisible()).toBe(true);
        await page.keyboard.press('Enter');
        expect(await focused(page), hash).toMatchObject({ tag: 'h1', inMain: true });
        expect(page.url()).toContain(hash);
      }
    });

    it('moves focus to the new view’s heading after following a link of the navigation bar', async () => {
      await openView(page, bench, { hash: '#/register', ready: 'table' });
      await page
        .getByRole('navigation', { name: 'Views' })
        .getByRole('link', { name: 'Lab standards' })
        .focus();
      await page.keyboard.press('Enter');
      await expect.poll(async () => (await focused(page)).text).toBe('Lab standards');
      expect(await focused(page)).toMatchObject({ tag: 'h1', inMain: true });
    });

    it('keeps focus on Clear filters once the filters are cleared, and says so', async () => {
      await openView(page, bench, { hash: '#/register', ready: 'table' });
      await page.getByRole('searchbox').or(page.getByLabel(/^Find/)).first().fill('WG');
      const clear = page.getByRole('button', { name: 'Clear filters' });
      await clear.focus();
      await page.keyboard.press('Enter');
      await expect.poll(() => announced(page)).toContain('Filters cleared');
      expect((await focused(page)).text).toBe('Clear filters');
      expect(await clear.getAttribute('aria-disabled')).toBe('true');
    });

    it('keeps focus on Ask in fit for use and announces the answer; a refusal marks the field', async () => {
      await openView(page, bench, { hash: '#/use', ready: 'form' });
      const field = page.getByLabel('Frequency, with its unit');
      await field.fill('9.375 GHz');
      await page.getByRole('button', { name: 'Ask' }).focus();
      await page.keyboard.press('Enter');
      await expect.poll(() => announced(page)).toMatch(/meters? cover 9\.375/);
      expect((await focused(page)).text).toBe('Ask');
      await field.fill('nine');
      await page.getByRole('button', { name: 'Ask' }).press('Enter');
      await expect.poll(async () => (await focused(page)).invalid).toBe('true');
      expect((await focused(page)).tag).toBe('input');
      expect((await focused(page)).describedBy.length).toBeGreaterThan(0);
    });

    it('focuses the first faulty field of a refused record, then on recording moves to the check and says so', async () => {
      await openView(page, bench, { hash: '#/record/WG-201', ready: 'table' });
      const form = new RecordCheckPage(page);
      await form.recordButton.focus();
      await page.keyboard.press('Enter');
      await page.locator('.problems').waitFor();
      await expect.poll(async () => (await focused(page)).invalid).toBe('true');
      const first = await focused(page);
      expect(first.tag).toBe('select');
      expect(first.describedBy).toMatch(/performer/i);

      await form.performer('Alba Quennell');
      await form.useStandard('STD-01');
      await form.conditions('21.6', '1008.4', '46');
      const plan = await form.references();
      for (const [i, ref] of plan.entries()) {
        const f = Number.parseFloat(ref);
        const up = [(f + 0.0004).toFixed(4), (f + 0.0006).toFixed(4)];
        const down = [(f + 0.0008).toFixed(4), (f + 0.0006).toFixed(4)];
        await form.typePoint(i, up, down, '4.1');
      }
      await form.recordButton.focus();
      await page.keyboard.press('Enter');
      await page.waitForURL(/#\/check\/\d+$/);
      const checkId = /#\/check\/(\d+)$/.exec(page.url())?.[1];
      await expect.poll(async () => (await focused(page)).text).toMatch(new RegExp(`^Check ${checkId} of`));
      expect(await focused(page)).toMatchObject({ tag: 'h1', inMain: true });
      expect(await announced(page)).toBe(`Check ${checkId} recorded for WG-201. Sign it on its page.`);

      // Signing: a missing passphrase marks it; a signature is said and focus moves to the list.
      await page.getByLabel('Signer').selectOption('Alba Quennell');
      const sign = page.getByRole('button', { name: /^Sign as/ });
      await sign.focus();
      await page.keyboard.press('Enter');
      await expect.poll(async () => (await focused(page)).invalid).toBe('true');
      expect((await focused(page)).tag).toBe('input');
      await page.keyboard.type(PASS);
      await sign.focus();
      await page.keyboard.press('Enter');
      await expect
        .poll(() => announced(page), { timeout: 30_000 })
        .toMatch(new RegExp(`^Check ${checkId} signed as performed by Alba Quennell`));
      expect(await focused(page)).toMatchObject({ tag: 'h2', text: 'Signatures' });
    });
  },
);
