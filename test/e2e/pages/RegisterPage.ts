// Page object for the register: what a user sees and does there, so tests read as steps and
// survive markup changes in one place.
import type { Locator, Page } from 'playwright-core';

export class RegisterPage {
  readonly heading: Locator;
  readonly search: Locator;
  readonly rows: Locator;
  readonly summary: Locator;
  readonly cautions: Locator;
  readonly emptyMessage: Locator;

  constructor(readonly page: Page) {
    this.heading = page.getByRole('heading', { level: 1 });
    this.search = page.getByLabel('Find a meter');
    this.rows = page.locator('table.register tbody tr[data-asset-id]');
    this.summary = page.locator('.summary');
    this.cautions = page.getByRole('complementary', { name: 'Cautions' });
    this.emptyMessage = page.locator('table.register td.empty');
  }

  async open(url: string): Promise<void> {
    await this.page.goto(url);
    await this.rows.first().waitFor();
  }

  async assetIds(): Promise<string[]> {
    return this.rows.evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-asset-id') ?? ''));
  }

  row(assetId: string): Locator {
    return this.page.locator(`table.register tbody tr[data-asset-id="${assetId}"]`);
  }

  /** Cell text of one meter under a column heading, as shown. */
  async cell(assetId: string, column: string): Promise<string> {
    const headers = await this.page.locator('table.register thead th').allInnerTexts();
    const index = headers.findIndex((h) => h.trim().toLowerCase() === column.toLowerCase());
    if (index < 0) throw new Error(`no column "${column}" in ${headers.join(' | ')}`);
    return (await this.row(assetId).locator('th, td').nth(index).innerText()).trim();
  }

  async alignment(assetId: string, column: string): Promise<string> {
    const headers = await this.page.locator('table.register thead th').allInnerTexts();
    const index = headers.findIndex((h) => h.trim().toLowerCase() === column.toLowerCase());
    return this.row(assetId)
      .locator('th, td')
      .nth(index)
      .evaluate((el) => getComputedStyle(el).textAlign);
  }

  async filter(text: string): Promise<void> {
    await this.search.fill(text);
  }
}
