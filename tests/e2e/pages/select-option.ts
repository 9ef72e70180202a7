import type { Locator, Page } from 'playwright-core'

const exactly = (text: string) =>
  new RegExp(`^\\s*${text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\s*$`)

/**
 * Picks an option of a select as a person does (opens it by its field, clicks the option) and
 * waits until the field shows it. On a busy machine the menu may still be moving when the click
 * comes and the click lands beside the option, so a pick that did not take is made again.
 * `reveal` brings an option into view that the menu has not drawn yet.
 */
export async function pickOption(
  page: Page,
  select: Locator,
  option: string,
  reveal?: (option: Locator) => Promise<void>,
): Promise<void> {
  const item = page.getByRole('option', { name: option, exact: true })
  const shown = select.locator('.v-select__selection-text', { hasText: exactly(option) })
  for (let attempt = 1; attempt <= 3; attempt++) {
    await select.locator('.v-field').click()
    if (reveal) await reveal(item)
    await item.click({ timeout: 5000 }).catch(() => undefined)
    const taken = await shown
      .first()
      .waitFor({ timeout: 2000 })
      .then(
        () => true,
        () => false,
      )
    if (taken) return
    await page.keyboard.press('Escape')
  }
  throw new Error(`"${option}" could not be picked`)
}
