import type { Page } from 'playwright-core'

/** The describe page of a dataset: the generated metadata form and its side panel. */
export class MetadataFormPage {
  constructor(private readonly page: Page) {}

  /** Opens a section's panel unless it is open already. */
  async openSection(title: string) {
    const header = this.page.locator('.v-expansion-panel-title', { hasText: title })
    if ((await header.getAttribute('aria-expanded')) !== 'true') await header.click()
  }

  field(label: string) {
    return this.page.getByLabel(label, { exact: false }).first()
  }

  async fill(label: string, value: string) {
    await this.field(label).fill(value)
  }

  async choose(label: string, option: string) {
    await this.page
      .locator('.v-select', { has: this.page.getByLabel(label) })
      .locator('.v-field')
      .click()
    await this.page.getByRole('option', { name: option, exact: true }).click()
  }

  /** The completeness in percent, as the meter shows it. */
  async score(): Promise<number> {
    const text = (await this.page.getByTestId('completeness-score').textContent()) ?? ''
    return Number(/(\d+)\s*%/.exec(text)?.[1] ?? NaN)
  }

  async saveStatus(): Promise<string> {
    return (await this.page.getByTestId('save-status').textContent())?.trim() ?? ''
  }
}
