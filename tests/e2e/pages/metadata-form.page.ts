import type { Page } from 'playwright-core'
import { pickOption } from './select-option'

/** The describe page of a dataset: the generated metadata form and its side panel. */
export class MetadataFormPage {
  constructor(private readonly page: Page) {}

  /** Opens a section's panel unless it is open already, and waits until it has finished opening. */
  async openSection(title: string) {
    const header = this.page.locator('.v-expansion-panel-title', { hasText: title })
    if ((await header.getAttribute('aria-expanded')) !== 'true') await header.click()
    // The panel grows over a few frames (its height set inline until then); a click aimed at
    // something inside it before it has settled can land beside its target.
    await this.page.waitForFunction(() =>
      Array.from(document.querySelectorAll<HTMLElement>('.v-expansion-panel-text')).every(
        (panel) => panel.style.height === '',
      ),
    )
  }

  /**
   * Adds an entry to a list field ("Add labelling") and waits for its card. Should the form still
   * move under the pointer (a save settling, a message appearing), a click after which no new
   * card shows within 3 s is made again.
   */
  async addEntry(noun: string) {
    const entries = this.page.getByRole('button', { name: new RegExp(`^Remove ${noun} \\d+$`) })
    const before = await entries.count()
    for (let attempt = 1; ; attempt++) {
      await this.page.getByRole('button', { name: `Add ${noun}`, exact: true }).click()
      try {
        await entries.nth(before).waitFor({ timeout: 3000 })
        return
      } catch (error) {
        if (attempt === 3) throw error
      }
    }
  }

  field(label: string) {
    return this.page.getByLabel(label, { exact: false }).first()
  }

  async fill(label: string, value: string) {
    await this.field(label).fill(value)
  }

  async choose(label: string, option: string) {
    const select = this.page.locator('.v-select', { has: this.page.getByLabel(label) })
    await pickOption(this.page, select, option)
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
