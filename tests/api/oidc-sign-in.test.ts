/**
 * The whole OpenID Connect sign-in, headless: the real server with the stand-in provider on a
 * loopback port, walked with fetch and a cookie jar (authorization code + PKCE + state + nonce).
 */
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadConfig } from '@server/config'
import { startStipple, type RunningStipple } from '@server/start'
import { User } from '@server/modules/users/user.entity'
import { BrowserSession, parseForm } from '../fixtures/browser-fetch'
import { freePort } from '../fixtures/server-process'

const DEPOSITOR = { login: 'kasimir.feld@harrowgate.example', password: 'demo-depositor-pass' }

async function boot(env: Record<string, string> = {}) {
  const dataDir = mkdtempSync(join(tmpdir(), 'stipple-oidc-'))
  const config = loadConfig({
    NODE_ENV: 'test',
    DATA_DIR: dataDir,
    PORT: '0',
    HOST: '127.0.0.1',
    LOG_LEVEL: 'silent',
    RATE_LIMIT_SIGN_IN: '1000',
    ...env,
  })
  return { stipple: await startStipple(config), dataDir }
}

/** Walks from /auth/login to the provider's login form and submits it. */
async function signIn(
  s: RunningStipple,
  jar: BrowserSession,
  account = DEPOSITOR,
  returnTo = '/datasets',
) {
  const { res: formPage, url } = await jar.follow(
    `${s.url}/auth/login?returnTo=${encodeURIComponent(returnTo)}`,
  )
  expect(formPage.status).toBe(200)
  const html = await formPage.text()
  const form = parseForm(html, url)
  return jar.follow(form.action, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ login: account.login, password: account.password }),
  })
}

const me = async (s: RunningStipple, jar: BrowserSession) =>
  (await (await jar.request(`${s.url}/api/me`)).json()) as { user: { email: string } | null }

let s: RunningStipple
let dataDir: string
beforeAll(async () => {
  ;({ stipple: s, dataDir } = await boot())
})
afterAll(async () => {
  await s.stop()
  rmSync(dataDir, { recursive: true, force: true })
})

describe('signing in through the local OpenID provider', () => {
  it('shows our own login page with login and password fields', async () => {
    const jar = new BrowserSession()
    const { res, url, hops } = await jar.follow(`${s.url}/auth/login`)
    const html = await res.text()
    expect(url.pathname).toMatch(/^\/idp\/interaction\//)
    expect(hops[1]!.searchParams.get('code_challenge_method')).toBe('S256')
    expect(hops[1]!.searchParams.get('state')).toBeTruthy()
    expect(hops[1]!.searchParams.get('nonce')).toBeTruthy()
    expect(html).toContain('name="login"')
    expect(html).toContain('name="password"')
    expect(html).toContain('/server-assets/page.css')
    expect(html).not.toMatch(/<script>|<style>/)
  })

  it('completes the round trip, rotates the session id and returns where the user was going', async () => {
    const jar = new BrowserSession()
    await jar.follow(`${s.url}/auth/login`)
    const before = jar.cookie('stipple.sid')
    expect(before).toBeTruthy()
    const { url, hops } = await signIn(s, jar)
    expect(hops.some((h) => h.pathname === '/auth/callback')).toBe(true)
    expect(url.href).toBe(`${s.url}/datasets`)
    expect(jar.cookie('stipple.sid')).not.toBe(before)
    const body = await me(s, jar)
    expect(body.user?.email).toBe(DEPOSITOR.login)
  })

  it('finishes a sign-in that a server restart interrupted at the login form', async () => {
    // The provider keeps its interactions in SQLite; with the library's in-memory store the
    // login form would be dead after the restart.
    const port = await freePort()
    const first = await boot({ PORT: String(port), PUBLIC_URL: `http://127.0.0.1:${port}` })
    const jar = new BrowserSession()
    const { res: formPage, url } = await jar.follow(`${first.stipple.url}/auth/login`)
    const form = parseForm(await formPage.text(), url)
    await first.stipple.stop()
    const again = await startStipple(first.stipple.config)
    try {
      const { url: landed } = await jar.follow(form.action, {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams({ login: DEPOSITOR.login, password: DEPOSITOR.password }),
      })
      expect(landed.pathname).not.toMatch(/^\/(idp|oidc|auth)\//)
      expect((await me(again, jar)).user?.email).toBe(DEPOSITOR.login)
    } finally {
      await again.stop()
      rmSync(first.dataDir, { recursive: true, force: true })
    }
  }, 60_000) // two servers start and one stops

  it('sets the session cookie httpOnly and SameSite=Lax', async () => {
    const res = await fetch(`${s.url}/auth/login`, { redirect: 'manual' })
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith('stipple.sid='))
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
  })

  it('refuses a wrong password on the login page and creates no session', async () => {
    const jar = new BrowserSession()
    const { res } = await signIn(s, jar, { login: DEPOSITOR.login, password: 'not-the-password' })
    expect(res.status).toBe(401)
    expect(await res.text()).toContain('do not match')
    expect((await me(s, jar)).user).toBeNull()
  })

  it('answers a replayed callback with an error page and no session', async () => {
    const jar = new BrowserSession()
    const { hops } = await signIn(s, jar)
    const callback = hops.find((h) => h.pathname === '/auth/callback')!
    const thief = new BrowserSession()
    const res = await thief.request(callback)
    expect(res.status).toBe(400)
    expect(await res.text()).toContain('Sign-in could not be completed')
    expect((await me(s, thief)).user).toBeNull()
    const again = await jar.request(callback)
    expect(again.status).toBe(400)
  })

  it('rejects a callback whose state was tampered with', async () => {
    const jar = new BrowserSession()
    const { res: page, url } = await jar.follow(`${s.url}/auth/login`)
    const form = parseForm(await page.text(), url)
    let res = await jar.request(form.action, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ login: DEPOSITOR.login, password: DEPOSITOR.password }),
    })
    let next = new URL(res.headers.get('location')!, form.action)
    while (next.pathname !== '/auth/callback') {
      res = await jar.request(next)
      next = new URL(res.headers.get('location')!, next)
    }
    next.searchParams.set('state', 'forged-state')
    const answer = await jar.request(next)
    expect(answer.status).toBe(400)
    expect(await answer.text()).toMatch(/not accepted/)
    expect((await me(s, jar)).user).toBeNull()
  })

  it('signs out at Stipple and at the provider', async () => {
    const jar = new BrowserSession()
    await signIn(s, jar)
    const out = await jar.request(`${s.url}/auth/logout`, {
      method: 'POST',
      headers: { origin: s.url },
    })
    expect(out.status).toBe(303)
    const { res: confirm, url } = await jar.follow(out.headers.get('location')!)
    const form = parseForm(await confirm.text(), url)
    const done = await jar.follow(form.action, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ ...form.fields, logout: 'yes' }),
    })
    expect(done.url.href).toBe(`${s.url}/`)
    expect((await me(s, jar)).user).toBeNull()
    // The provider forgot us too: the next sign-in asks for the password again.
    const { url: again } = await jar.follow(`${s.url}/auth/login`)
    expect(again.pathname).toMatch(/^\/idp\/interaction\//)
  })

  it('refuses cookie-authenticated writes from another origin', async () => {
    const jar = new BrowserSession()
    await signIn(s, jar, {
      login: 'mireille.stroud@harrowgate.example',
      password: 'demo-owner-pass',
    })
    const body = JSON.stringify({ name: `Cross-site probe ${Date.now()}` })
    const json = { 'content-type': 'application/json' }
    expect(
      (await jar.request(`${s.url}/api/projects`, { method: 'POST', headers: json, body })).status,
    ).toBe(403)
    expect(
      (
        await jar.request(`${s.url}/api/projects`, {
          method: 'POST',
          headers: { ...json, origin: 'http://evil.test' },
          body,
        })
      ).status,
    ).toBe(403)
    expect(
      (
        await jar.request(`${s.url}/api/projects`, {
          method: 'POST',
          headers: { ...json, origin: 'null', 'sec-fetch-site': 'cross-site' },
          body,
        })
      ).status,
    ).toBe(403)
    expect(
      (
        await jar.request(`${s.url}/api/projects`, {
          method: 'POST',
          headers: { ...json, origin: s.url },
          body,
        })
      ).status,
    ).toBe(201)
    // A same-origin form post under a strict referrer policy carries `Origin: null`; Sec-Fetch-Site vouches for it.
    const again = JSON.stringify({ name: `Same-origin form ${Date.now()}` })
    expect(
      (
        await jar.request(`${s.url}/api/projects`, {
          method: 'POST',
          headers: { ...json, origin: 'null', 'sec-fetch-site': 'same-origin' },
          body: again,
        })
      ).status,
    ).toBe(201)
  })
})

describe('first sign-in and rate limits', () => {
  it('creates the user from the provider claims at first sign-in', async () => {
    const { stipple, dataDir: dir } = await boot({ DEMO: 'false' })
    try {
      expect(await stipple.orm.em.fork().count(User)).toBe(0)
      const jar = new BrowserSession()
      await signIn(stipple, jar, {
        login: 'tobias.wren@journal.example',
        password: 'demo-editor-pass',
      })
      const user = await stipple.orm.em
        .fork()
        .findOneOrFail(User, { email: 'tobias.wren@journal.example' })
      expect(user.name).toBe('Tobias Wren')
      expect(user.subject).toMatch(/^acct-[0-9a-f]{16}$/)
    } finally {
      await stipple.stop()
      rmSync(dir, { recursive: true, force: true })
    }
  })

  it('limits how often sign-in can be started', async () => {
    const { stipple, dataDir: dir } = await boot({ RATE_LIMIT_SIGN_IN: '3' })
    try {
      const codes = []
      for (let i = 0; i < 4; i++)
        codes.push((await fetch(`${stipple.url}/auth/login`, { redirect: 'manual' })).status)
      expect(codes).toEqual([302, 302, 302, 429])
    } finally {
      await stipple.stop()
      rmSync(dir, { recursive: true, force: true })
    }
  })
})

describe('stale sign-in pages', () => {
  it('answers an unknown or expired interaction with a page, not an error', async () => {
    const res = await fetch(`${s.url}/idp/interaction/no-such-interaction`)
    expect(res.status).toBe(400)
    expect(await res.text()).toContain('This sign-in page has expired')
  })
})
