// Page object for issued documents: verifying a PDF by picking it as a user drops it.
import type { Locator, Page } from 'playwright-core';

export class DocumentsPage {
  readonly result: Locator;
  readonly issued: Locator;

  constructor(readonly page: Page) {
    this.result = page.getByTestId('verify-result');
    this.issued = page.getByTestId('documents');
  }

  async verify(file: string): Promise<string> {
    await this.page.getByLabel('PDF to verify').setInputFiles(file);
    await this.result.waitFor();
    return this.result.innerText();
  }
}
