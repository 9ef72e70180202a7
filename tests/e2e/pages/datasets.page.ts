import type { Page } from 'playwright-core'

export class DatasetsPage {
  constructor(private readonly page: Page) {}

  table() {
    return this.page.getByTestId('datasets-table')
  }

  async search(text: string) {
    await this.page.getByRole('textbox', { name: 'Search datasets' }).fill(text)
  }
}

export class DatasetCreatePage {
  constructor(private readonly page: Page) {}

  async create(fields: { title: string; description: string }) {
    await this.page.getByLabel('Title').fill(fields.title)
    await this.page.getByLabel('Description').fill(fields.description)
    await this.page.getByRole('button', { name: 'Create dataset' }).click()
  }
}
