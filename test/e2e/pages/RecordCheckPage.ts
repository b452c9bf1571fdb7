// Page object for recording a check: the steps of the form as a technician goes through them,
// typing readings from the keyboard (Enter moves to the next box).
import type { Locator, Page } from 'playwright-core';

export class RecordCheckPage {
  readonly heading: Locator;
  readonly draftStatus: Locator;
  readonly pointRows: Locator;
  readonly recordButton: Locator;
  readonly review: Locator;
  readonly problems: Locator;

  constructor(readonly page: Page) {
    this.heading = page.getByRole('heading', { level: 1 });
    this.draftStatus = page.getByTestId('draft-status');
    this.pointRows = page.locator('table.entry tbody tr[data-point]');
    this.recordButton = page.getByRole('button', { name: 'Record the check' });
    this.review = page.getByTestId('review');
    this.problems = page.locator('.problems');
  }

  async chooseMeter(assetId: string): Promise<void> {
    const select = this.page.getByLabel('Meter', { exact: true });
    const value = await select.locator('option', { hasText: assetId }).getAttribute('value');
    await select.selectOption(value ?? assetId);
    await this.page.getByTestId('meter-brief').waitFor();
  }

  async performer(name: string): Promise<void> {
    await this.page.getByLabel('Performed by').selectOption(name);
  }

  standard(assetId: string): Locator {
    return this.page.locator(`[data-standard="${assetId}"]`);
  }

  async useStandard(assetId: string): Promise<void> {
    await this.standard(assetId).getByRole('checkbox').check();
  }

  async conditions(temperatureC: string, pressureHpa: string, humidityPct: string): Promise<void> {
    await this.page.getByLabel('Temperature / °C').fill(temperatureC);
    await this.page.getByLabel('Pressure / hPa').fill(pressureHpa);
    await this.page.getByLabel('Relative humidity / %RH').fill(humidityPct);
  }

  async references(): Promise<string[]> {
    return this.pointRows
      .locator('input.ref-input')
      .evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value));
  }

  /** Types one point's readings from the keyboard: ups, downs, then the dip depth, Enter between. */
  async typePoint(index: number, up: string[], down: string[], dipDb = ''): Promise<void> {
    await this.pointRows.nth(index).locator('input.reading').first().click();
    for (const v of [...up, ...down, dipDb]) {
      await this.page.keyboard.type(v);
      await this.page.keyboard.press('Enter');
    }
  }

  readingBoxes(index: number): Locator {
    return this.pointRows.nth(index).locator('input.reading');
  }

  async readingValues(index: number): Promise<string[]> {
    return this.readingBoxes(index).evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value));
  }

  liveVerdict(index: number): Locator {
    return this.pointRows.nth(index).getByTestId('live-verdict');
  }

  liveError(index: number): Locator {
    return this.pointRows.nth(index).getByTestId('live-error');
  }
}
