import { Router, type Request, type Response } from 'express'
import * as oidc from 'openid-client'
import { requestEm as em } from '../../http/request-context'
import { escapeHtml, renderPage } from '../../http/html-page'
import type { AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { userFromClaims } from '../users/users.service'
import type { RelyingParty } from './relying-party'
import { perMinuteLimit } from '../../http/rate-limit'

/** Only paths on our own site may be a destination after sign-in (no open redirects). */
export function safeReturnTo(value: unknown): string {
  return typeof value === 'string' && /^\/(?![/\\])/.test(value) ? value : '/'
}

function signInError(res: Response, status: number, message: string) {
  res
    .status(status)
    .type('html')
    .send(
      renderPage({
        title: 'Sign-in failed',
        body: `<h1>Sign-in could not be completed</h1><p class="error">${escapeHtml(message)}</p>
<a class="button" href="/auth/login">Start again</a><a class="button secondary" href="/">Back to Stipple</a>`,
      }),
    )
}

const regenerate = (req: Request) =>
  new Promise<void>((ok, fail) => req.session.regenerate((e) => (e ? fail(e) : ok())))
const save = (req: Request) =>
  new Promise<void>((ok, fail) => req.session.save((e) => (e ? fail(e) : ok())))
const destroy = (req: Request) => new Promise<void>((ok) => req.session.destroy(() => ok()))

export function authRouter(deps: AppDeps, rp: RelyingParty): Router {
  const router = Router()
  const limiter = perMinuteLimit('auth-login', deps.config.rateLimitSignIn)

  router.get('/login', limiter, async (req, res) => {
    const config = await rp.configuration()
    const verifier = oidc.randomPKCECodeVerifier()
    const pending = {
      verifier,
      state: oidc.randomState(),
      nonce: oidc.randomNonce(),
      returnTo: safeReturnTo(req.query.returnTo),
    }
    req.session.pendingSignIn = pending
    await save(req)
    const url = oidc.buildAuthorizationUrl(config, {
      redirect_uri: rp.redirectUri,
      scope: 'openid email profile',
      code_challenge: await oidc.calculatePKCECodeChallenge(verifier),
      code_challenge_method: 'S256',
      state: pending.state,
      nonce: pending.nonce,
    })
    res.redirect(302, url.href)
  })

  router.get('/callback', limiter, async (req, res) => {
    const pending = req.session?.pendingSignIn
    if (!pending) {
      return signInError(
        res,
        400,
        'This sign-in response was already used, or it does not belong to this browser. Start the sign-in again.',
      )
    }
    // One use only: a replayed callback finds nothing pending.
    delete req.session.pendingSignIn
    await save(req)
    const config = await rp.configuration()
    let tokens: Awaited<ReturnType<typeof oidc.authorizationCodeGrant>>
    try {
      tokens = await oidc.authorizationCodeGrant(
        config,
        new URL(req.originalUrl, deps.config.publicUrl),
        {
          pkceCodeVerifier: pending.verifier,
          expectedState: pending.state,
          expectedNonce: pending.nonce,
          idTokenExpected: true,
        },
      )
    } catch (err) {
      const detail = err instanceof Error ? err.message : String(err)
      deps.logger.info({ detail }, 'sign-in rejected')
      return signInError(res, 400, `The identity provider's answer was not accepted (${detail}).`)
    }
    const claims = tokens.claims()!
    const info = await oidc.fetchUserInfo(config, tokens.access_token, claims.sub)
    const user = await userFromClaims(em(), {
      sub: claims.sub,
      email: typeof info.email === 'string' ? info.email : undefined,
      email_verified: typeof info.email_verified === 'boolean' ? info.email_verified : undefined,
      name: typeof info.name === 'string' ? info.name : undefined,
    })
    if (user.deactivatedAt)
      return signInError(
        res,
        403,
        'This account has been deactivated by a site admin. Ask an admin if you think this is a mistake.',
      )
    // A new session id at sign-in, so an id planted before it (session fixation) is worthless.
    await regenerate(req)
    req.session.userId = user.id
    req.session.idToken = tokens.id_token
    await save(req)
    audit(
      em(),
      { user, ip: req.ip },
      { action: 'user.sign_in', targetType: 'User', targetId: user.id },
    )
    await em().flush()
    res.redirect(302, pending.returnTo)
  })

  router.post('/logout', async (req, res) => {
    const idToken = req.session?.idToken
    if (req.user) {
      audit(em(), req, { action: 'user.sign_out', targetType: 'User', targetId: req.user.id })
      await em().flush()
    }
    await destroy(req)
    res.clearCookie('stipple.sid', { path: '/' })
    const config = await rp.configuration().catch(() => null)
    if (!config?.serverMetadata().end_session_endpoint) return res.redirect(303, '/')
    const url = oidc.buildEndSessionUrl(config, {
      post_logout_redirect_uri: rp.postLogoutRedirectUri,
      ...(idToken ? { id_token_hint: idToken } : {}),
    })
    res.redirect(303, url.href)
  })

  return router
}
