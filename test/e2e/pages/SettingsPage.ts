// Page object for the settings' people and keys: giving a person a signing key.
import type { Locator, Page } from 'playwright-core';

export class SettingsPage {
  readonly people: Locator;

  constructor(readonly page: Page) {
    this.people = page.getByTestId('people');
  }

  person(name: string): Locator {
    return this.people.locator(`tr[data-person="${name}"]`);
  }

  async giveKey(name: string, passphrase: string): Promise<void> {
    const form = this.page.getByRole('form', { name: 'Give a signing key' });
    await form.getByLabel('Person').selectOption(name);
    await form.getByLabel(/^Passphrase \(at least/).fill(passphrase);
    await form.getByLabel('Passphrase again').fill(passphrase);
    await form.getByRole('button', { name: 'Make the signing key' }).click();
    await form
      .getByRole('status')
      .filter({ hasText: `${name} can sign` })
      .waitFor();
  }
}
