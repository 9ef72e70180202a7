import type { Page } from 'playwright-core'

/** The stand-in identity provider's login form, reached from the app's "Sign in" button. */
export class SignInPage {
  constructor(private readonly page: Page) {}

  async signIn(email: string, password: string) {
    await this.page.getByRole('button', { name: 'Sign in' }).first().click()
    await this.page.waitForURL(/\/idp\/interaction\//)
    await this.page.fill('input[name="login"]', email)
    await this.page.fill('input[name="password"]', password)
    await this.page.getByRole('button', { name: 'Sign in' }).click()
  }
}
