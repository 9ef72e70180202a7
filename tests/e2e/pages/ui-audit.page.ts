import type { Page } from 'playwright-core'

/**
 * The boxes whose text must fit: table cells, the scrolling wrapper of a table (a table wider
 * than its card scrolls there instead of overflowing a cell), cards and dialog bodies.
 */
const FITTING = 'td, th, .v-table__wrapper, .v-card, .v-card-text'

/**
 * Checks a page for what the eye catches and a unit test cannot: text that overflows its box, and
 * select options or selections that show a schema identifier instead of words.
 */
export class UiAudit {
  constructor(private readonly page: Page) {}

  /** Waits until nothing is loading: no skeleton, no running progress bar, then a moment's rest. */
  async settled() {
    await this.page.waitForFunction(
      () =>
        ![...document.querySelectorAll('.v-skeleton-loader, .v-progress-linear--active')].some(
          (e) =>
            e.getBoundingClientRect().height > 0 &&
            (e.matches('.v-skeleton-loader') ||
              e.querySelector('.v-progress-linear__indeterminate')),
        ),
      null,
      { timeout: 15_000 },
    )
    await this.page.waitForTimeout(150)
  }

  /** Visible cells and dialog bodies whose content is wider than they are (1 px of rounding allowed). */
  overflowing(): Promise<string[]> {
    return this.page.evaluate((selector) => {
      const out: string[] = []
      for (const el of document.querySelectorAll<HTMLElement>(selector)) {
        if (!el.offsetParent && getComputedStyle(el).position !== 'fixed') continue
        if (el.scrollWidth > el.clientWidth + 1) {
          const text = (el.textContent ?? '').trim().replace(/\s+/g, ' ').slice(0, 60)
          out.push(`${el.tagName.toLowerCase()} (${el.scrollWidth} > ${el.clientWidth}): ${text}`)
        }
      }
      return out
    }, FITTING)
  }

  /** The texts of the selections shown in selects and of the options of an open menu. */
  choiceTexts(): Promise<string[]> {
    return this.page
      .locator('.v-select__selection-text, .v-overlay--active [role="option"] .v-list-item-title')
      .allTextContents()
      .then((texts) => texts.map((t) => t.trim()).filter(Boolean))
  }

  /**
   * Opens every select of the page in turn (each section of the form open) and collects the
   * words of their options. Read-only selects do not open and give none.
   */
  async optionTexts(): Promise<string[]> {
    const texts: string[] = []
    const selects = this.page.locator('.v-select:not(.v-input--readonly) .v-field')
    const count = await selects.count()
    for (let i = 0; i < count; i++) {
      const field = selects.nth(i)
      if (!(await field.isVisible())) continue
      await field.scrollIntoViewIfNeeded()
      await field.click()
      const menu = this.page.locator('.v-overlay--active [role="listbox"]')
      if (
        await menu.waitFor({ timeout: 2_000 }).then(
          () => true,
          () => false,
        )
      ) {
        texts.push(...(await this.choiceTexts()))
      }
      await this.page.keyboard.press('Escape')
      await menu.waitFor({ state: 'hidden', timeout: 2_000 }).catch(() => undefined)
    }
    return texts
  }
}
