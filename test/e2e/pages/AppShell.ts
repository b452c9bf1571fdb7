// Page object for the window's navigation bar: moving between views as a user does.
import type { Locator, Page } from 'playwright-core';

export type ViewName =
  'Register' | 'Record a check' | 'Fit for use' | 'Lab standards' | 'Documents' | 'Settings';

export class AppShell {
  readonly nav: Locator;
  readonly heading: Locator;

  constructor(readonly page: Page) {
    this.nav = page.getByRole('navigation', { name: 'Views' });
    this.heading = page.getByRole('heading', { level: 1 });
  }

  async go(view: ViewName): Promise<void> {
    await this.nav.getByRole('link', { name: view, exact: true }).click();
  }

  async current(): Promise<string> {
    return (await this.nav.locator('a[aria-current="page"]').innerText()).trim();
  }

  /** Horizontal overflow of the page, px: a clipped table or chart shows up here. */
  async sidewaysOverflow(): Promise<number> {
    return this.page.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
  }
}
