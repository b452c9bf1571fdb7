// Page object for one check's page: its verdict, signing with name and passphrase, and issuing
// its documents (the PDF is saved as the browser downloads it).
import type { Locator, Page } from 'playwright-core';

export class CheckPage {
  readonly heading: Locator;
  readonly state: Locator;
  readonly verdict: Locator;
  readonly signatures: Locator;
  readonly problems: Locator;

  constructor(readonly page: Page) {
    this.heading = page.getByRole('heading', { level: 1 });
    this.state = page.getByTestId('check-state');
    this.verdict = page.getByTestId('check-verdict');
    this.signatures = page.getByTestId('signatures');
    this.problems = page.locator('.problems');
  }

  async sign(person: string, passphrase: string, meaning: 'performed' | 'reviewed'): Promise<void> {
    const form = this.page.getByRole('form', { name: 'Sign this check' });
    await form.getByLabel('Signer').selectOption(person);
    await form.getByLabel('Passphrase').fill(passphrase);
    await form.getByRole('button', { name: `Sign as ${meaning}` }).click();
  }

  /** Issues a document and returns the saved PDF's path. */
  async issue(kind: 'certificate' | 'check-sheet', saveAs: string): Promise<string> {
    await this.page.getByRole('button', { name: `Issue the ${kind}` }).click();
    const link = this.page.getByTestId('issued').getByRole('link', { name: /^Save / });
    const [download] = await Promise.all([this.page.waitForEvent('download'), link.click()]);
    await download.saveAs(saveAs);
    return saveAs;
  }
}
