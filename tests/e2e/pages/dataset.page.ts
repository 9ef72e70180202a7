import type { Page } from 'playwright-core'

/** A dataset's page: its status line, its tabs and the dialogs of its actions. */
export class DatasetPage {
  constructor(private readonly page: Page) {}

  async open(baseUrl: string, accession: string) {
    await this.page.goto(`${baseUrl}/datasets/${accession}`)
    await this.page
      .getByTestId('accession')
      .or(this.page.getByTestId('dataset-not-found'))
      .waitFor()
  }

  /** The next-step box's title and text, as one line. */
  async nextStep(): Promise<string> {
    const box = this.page.getByTestId('next-step')
    await box.waitFor()
    return ((await box.textContent()) ?? '').replace(/\s+/g, ' ').trim()
  }

  async tab(name: 'Overview' | 'Files' | 'Access and sharing') {
    await this.page.getByRole('tab', { name }).click()
  }

  /** Clicks an action of the toolbar and waits for its dialog. */
  async action(name: string) {
    await this.page
      .getByRole('toolbar', { name: 'Dataset actions' })
      .getByRole('button', { name })
      .click()
    return this.dialog()
  }

  dialog() {
    return this.page.locator('.v-overlay--active .v-card').first()
  }

  /** Closes the open dialog and waits until it has left the page (its closing transition too). */
  async closeDialog() {
    await this.page.keyboard.press('Escape')
    await this.page.locator('.v-dialog.v-overlay--active').waitFor({ state: 'detached' })
    // The overlay loses its active class at once; its content leaves after the transition.
    await this.page.waitForFunction(() =>
      [...document.querySelectorAll('[role="dialog"]')].every((d) => !d.checkVisibility()),
    )
  }
}
