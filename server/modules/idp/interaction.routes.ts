import express, { Router, type Request, type Response } from 'express'
import type Provider from 'oidc-provider'
import { escapeHtml, renderPage } from '../../http/html-page'
import { checkPassword, type DemoAccount } from './accounts'
import { perMinuteLimit } from '../../http/rate-limit'

function loginPage(uid: string, options: { login?: string; error?: string; demo: boolean }) {
  const error = options.error
    ? `<p class="error" role="alert">${escapeHtml(options.error)}</p>`
    : ''
  const hint = options.demo
    ? '<p class="hint">Demo identity provider: use one of the demo sign-ins that <code>npm start</code> printed.</p>'
    : ''
  return renderPage({
    title: 'Sign in',
    body: `<h1>Sign in</h1><p>Institution sign-in for the Stipple consortium hub.</p>${error}
<form method="post" action="/idp/interaction/${escapeHtml(uid)}/login" autocomplete="on">
<label for="login">E-mail</label>
<input id="login" name="login" type="email" required autofocus autocomplete="username" value="${escapeHtml(options.login ?? '')}">
<label for="password">Password</label>
<input id="password" name="password" type="password" required autocomplete="current-password">
<button type="submit">Sign in</button>
</form>
<form method="get" action="/idp/interaction/${escapeHtml(uid)}/abort"><button class="secondary" type="submit">Cancel</button></form>${hint}`,
  })
}

function expiredPage(res: Response) {
  res
    .status(400)
    .type('html')
    .send(
      renderPage({
        title: 'Sign-in expired',
        body: '<h1>This sign-in page has expired</h1><p>It was used already, or it was left open too long. Start again from Stipple.</p><a class="button" href="/auth/login">Sign in again</a>',
      }),
    )
}

/** An interaction the provider no longer knows (used, expired, or from another browser). */
const isStale = (err: unknown) => (err as { name?: string })?.name === 'SessionNotFound'

/** The stand-in provider's own interaction pages: a login form, and cancel. */
export function interactionRouter(
  provider: Provider,
  accounts: DemoAccount[],
  signInLimit: number,
): Router {
  const router = Router()
  const byEmail = new Map(accounts.map((a) => [a.email, a]))
  const limiter = perMinuteLimit('idp-sign-in', signInLimit)
  const noStore = (_req: Request, res: Response, next: () => void) => {
    res.set('cache-control', 'no-store')
    next()
  }

  router.get('/interaction/:uid', noStore, async (req, res) => {
    const details = await provider.interactionDetails(req, res)
    if (details.prompt.name !== 'login') {
      // Consent is granted by loadExistingGrant; anything else finishes straight away.
      return provider.interactionFinished(req, res, {}, { mergeWithLastSubmission: true })
    }
    res.type('html').send(loginPage(details.uid, { demo: true }))
  })

  router.post(
    '/interaction/:uid/login',
    noStore,
    limiter,
    express.urlencoded({ extended: false, limit: '10kb' }),
    async (req, res) => {
      const details = await provider.interactionDetails(req, res)
      const login = String(req.body?.login ?? '')
        .trim()
        .toLowerCase()
      const password = String(req.body?.password ?? '')
      const account = byEmail.get(login)
      if (!account || !checkPassword(account, password)) {
        return res
          .status(401)
          .type('html')
          .send(
            loginPage(details.uid, {
              login,
              error: 'That e-mail and password do not match an account.',
              demo: true,
            }),
          )
      }
      await provider.interactionFinished(
        req,
        res,
        { login: { accountId: account.sub } },
        { mergeWithLastSubmission: false },
      )
    },
  )

  router.get('/interaction/:uid/abort', noStore, async (req, res) => {
    await provider.interactionFinished(
      req,
      res,
      { error: 'access_denied', error_description: 'The sign-in was cancelled.' },
      { mergeWithLastSubmission: false },
    )
  })

  router.use((err: unknown, _req: Request, res: Response, next: (e?: unknown) => void) =>
    isStale(err) ? expiredPage(res) : next(err),
  )

  return router
}
