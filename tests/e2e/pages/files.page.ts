import type { Page } from 'playwright-core'
import { pickOption } from './select-option'

/** The Files tab of a dataset page: uploads, the file list, and the report and mapping dialogs. */
export class FilesPage {
  constructor(private readonly page: Page) {}

  async open() {
    await this.page.getByRole('tab', { name: 'Files' }).click()
  }

  async upload(name: string, content: string) {
    await this.page.getByTestId('file-input').setInputFiles({
      name,
      mimeType: 'text/csv',
      buffer: Buffer.from(content, 'utf8'),
    })
  }

  async uploadBytes(name: string, buffer: Buffer) {
    await this.page.getByTestId('file-input').setInputFiles({
      name,
      mimeType: 'application/octet-stream',
      buffer,
    })
  }

  row(name: string) {
    return this.page.locator(`[data-testid="files-table"] tr[data-file="${name}"]`)
  }

  /** The status a file's chip shows (`processing`, `needs_mapping`, `ready`, `rejected`). */
  async status(name: string): Promise<string | null> {
    const chip = this.row(name).locator('[data-status]')
    return (await chip.count()) ? chip.getAttribute('data-status') : null
  }

  async openReport(name: string) {
    await this.page.getByRole('button', { name: `Details of ${name}` }).click()
    return this.page.getByTestId('file-report')
  }

  async closeDialog() {
    await this.page.getByRole('dialog').getByRole('button', { name: 'Close' }).click()
  }

  async openMapping(name: string) {
    await this.row(name).getByRole('button', { name: 'Map columns' }).click()
    await this.page.getByTestId('mapping-table').waitFor()
  }

  /**
   * Picks a column's role in the mapping dialog. The menu draws only the options in view and
   * opens at the current role, so Home moves it to the first option, then it scrolls down until
   * the wanted one shows; pickOption checks the pick took.
   */
  async mapColumn(column: string, role: string) {
    const select = this.page.locator('.v-select', {
      has: this.page.getByLabel(`Role of ${column}`, { exact: true }),
    })
    await pickOption(this.page, select, role, async (option) => {
      await this.page.keyboard.press('Home')
      for (let i = 0; i < 10; i++) {
        if (
          await option.waitFor({ timeout: 500 }).then(
            () => true,
            () => false,
          )
        )
          return
        await this.page.locator('.v-list--navigable').hover()
        await this.page.mouse.wheel(0, 150)
      }
    })
  }

  async saveMapping() {
    await this.page.getByRole('button', { name: 'Save and read the table' }).click()
  }
}
