// Page object for the register: what a user sees and does there (search, filters, sorting,
// scrolling a long register), so tests read as steps and survive markup changes in one place.
import type { Locator, Page } from 'playwright-core';

export interface RegisterFilterChoice {
  state?: 'any' | 'in-service' | 'quarantined' | 'withdrawn';
  due?: 'any' | 'overdue' | 'soon' | 'later' | 'none';
  construction?: 'any' | 'coaxial' | 'waveguide';
  /** With its unit, as typed: "9.3 GHz". */
  frequency?: string;
  flaggedOnly?: boolean;
}

export class RegisterPage {
  readonly heading: Locator;
  readonly search: Locator;
  readonly rows: Locator;
  readonly summary: Locator;
  readonly cautions: Locator;
  readonly emptyMessage: Locator;
  readonly table: Locator;
  readonly scroller: Locator;
  readonly frequency: Locator;
  readonly frequencyProblem: Locator;
  readonly clearButton: Locator;

  constructor(readonly page: Page) {
    this.heading = page.getByRole('heading', { level: 1 });
    this.search = page.getByLabel('Find a meter');
    this.rows = page.locator('table.register tbody tr[data-asset-id]');
    this.summary = page.getByTestId('register-count');
    this.cautions = page.getByRole('complementary', { name: 'Cautions' });
    this.emptyMessage = page.locator('table.register td.empty');
    this.table = page.locator('table.register');
    this.scroller = page.getByTestId('register-scroll');
    this.frequency = page.getByLabel('Covers frequency');
    this.frequencyProblem = page.locator('.filter-problem');
    this.clearButton = page.getByRole('button', { name: 'Clear filters' });
  }

  async open(url: string): Promise<void> {
    await this.page.goto(url);
    await this.rows.first().waitFor();
  }

  /** Asset ids of the rows mounted now, top to bottom (a long register mounts only a window). */
  async assetIds(): Promise<string[]> {
    return this.rows.evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-asset-id') ?? ''));
  }

  /** Positions of the mounted rows in the whole list (aria-rowindex; the header row is 1). */
  async rowIndexes(): Promise<number[]> {
    return this.rows.evaluateAll((trs) => trs.map((tr) => Number(tr.getAttribute('aria-rowindex'))));
  }

  row(assetId: string): Locator {
    return this.page.locator(`table.register tbody tr[data-asset-id="${assetId}"]`);
  }

  private async columnIndex(column: string): Promise<number> {
    const headers = await this.page.locator('table.register thead th').allInnerTexts();
    const index = headers.findIndex((h) => h.trim().toLowerCase() === column.toLowerCase());
    if (index < 0) throw new Error(`no column "${column}" in ${headers.join(' | ')}`);
    return index;
  }

  /** A column heading found by its visible text (the sort arrow is drawn by CSS, not text). */
  async header(column: string): Promise<Locator> {
    return this.page.locator('table.register thead th').nth(await this.columnIndex(column));
  }

  /** Cell text of one meter under a column heading, as shown. */
  async cell(assetId: string, column: string): Promise<string> {
    const index = await this.columnIndex(column);
    return (await this.row(assetId).locator('th, td').nth(index).innerText()).trim();
  }

  async alignment(assetId: string, column: string): Promise<string> {
    const index = await this.columnIndex(column);
    return this.row(assetId)
      .locator('th, td')
      .nth(index)
      .evaluate((el) => getComputedStyle(el).textAlign);
  }

  async filter(text: string): Promise<void> {
    await this.search.fill(text);
  }

  /** Sets the named filters, leaving the others as they are. */
  async filterBy(choice: RegisterFilterChoice): Promise<void> {
    if (choice.state) await this.page.getByLabel('State', { exact: true }).selectOption(choice.state);
    if (choice.due) await this.page.getByLabel('Due', { exact: true }).selectOption(choice.due);
    if (choice.construction)
      await this.page.getByLabel('Construction', { exact: true }).selectOption(choice.construction);
    if (choice.frequency !== undefined) await this.frequency.fill(choice.frequency);
    if (choice.flaggedOnly !== undefined)
      await this.page.getByLabel(/Only meters with a drift or health flag/).setChecked(choice.flaggedOnly);
  }

  async clearFilters(): Promise<void> {
    await this.clearButton.click();
  }

  /** Sorts by a column from the keyboard, as a user without a mouse would. */
  async sortBy(column: string): Promise<void> {
    await (await this.header(column)).getByRole('button').focus();
    await this.page.keyboard.press('Enter');
  }

  async sortOf(column: string): Promise<string | null> {
    return (await this.header(column)).getAttribute('aria-sort');
  }

  /** Scrolls the register's own frame to a fraction of its height (0 top, 1 bottom). */
  async scrollTo(fraction: number): Promise<void> {
    await this.scroller.evaluate((el, f) => {
      el.scrollTop = f * (el.scrollHeight - el.clientHeight);
    }, fraction);
  }
}
