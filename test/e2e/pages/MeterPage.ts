// Page object for a meter's page: its facts, maximum input power, chart, checks and state change.
import type { Locator, Page } from 'playwright-core';

export class MeterPage {
  readonly heading: Locator;
  readonly powerLimit: Locator;
  readonly state: Locator;
  readonly due: Locator;
  readonly chart: Locator;
  readonly trendChart: Locator;
  readonly healthChart: Locator;
  readonly checkRows: Locator;
  readonly recordButton: Locator;

  constructor(readonly page: Page) {
    this.heading = page.getByRole('heading', { level: 1 });
    this.powerLimit = page.getByRole('complementary', { name: 'Maximum input power' });
    this.state = page.getByTestId('meter-state');
    this.due = page.getByTestId('meter-due');
    this.chart = page.locator('figure.chart[aria-label="Error against frequency"]');
    this.trendChart = page.locator('figure.chart[aria-label="Error against time"]');
    this.healthChart = page.locator('figure.chart[aria-label="Dip depth and loaded Q against time"]');
    this.checkRows = page.locator('table.checks tbody tr[data-check-id]');
    this.recordButton = page.getByRole('link', { name: /^Record a check of / });
  }

  async open(baseUrl: string, assetId: string): Promise<void> {
    await this.page.goto(`${baseUrl}#/meter/${encodeURIComponent(assetId)}`);
    await this.powerLimit.waitFor();
  }

  async waitForChart(): Promise<void> {
    await this.chart.locator('.recharts-wrapper > svg.recharts-surface').waitFor();
  }

  /** The axis titles and legend as drawn, to check units are on the chart. */
  async chartText(): Promise<string> {
    return this.chart.innerText();
  }

  async errorBarCount(): Promise<number> {
    return this.chart.locator('.recharts-errorBar').count();
  }

  /** Height on screen of the tallest U bar, px. */
  /** Height of the tallest U bar once the chart has settled (two equal reads 100 ms apart). */
  async tallestErrorBarPx(): Promise<number> {
    const read = () =>
      this.chart
        .locator('.recharts-errorBar')
        .evaluateAll((els) => Math.max(0, ...els.map((el) => el.getBoundingClientRect().height)));
    let last = await read();
    for (let i = 0; i < 30; i++) {
      await this.chart.page().waitForTimeout(100);
      const now = await read();
      if (now === last) return now;
      last = now;
    }
    return last;
  }

  /** Waits for the drift and health charts to be drawn. */
  async waitForHistoryCharts(): Promise<void> {
    await this.trendChart.locator('.recharts-wrapper > svg.recharts-surface').waitFor();
    await this.healthChart.locator('.recharts-wrapper > svg.recharts-surface').waitFor();
  }

  async checkDates(): Promise<string[]> {
    return this.checkRows.evaluateAll((rows) => rows.map((r) => r.getAttribute('data-date') ?? ''));
  }

  /** Cell texts of the newest check row. */
  async newestCheck(): Promise<string[]> {
    return this.checkRows.first().locator('th, td').allInnerTexts();
  }

  async changeState(action: 'Quarantine' | 'Withdraw' | 'Return to service', target: string, reason: string) {
    await this.page.getByRole('radio', { name: target }).check();
    await this.page.getByLabel('Reason (kept in the audit trail)').fill(reason);
    await this.page.getByRole('button', { name: action }).click();
  }
}
