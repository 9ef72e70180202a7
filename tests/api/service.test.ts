import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sessionCookieOptions } from '@server/app'
import { ConfigError, loadConfig } from '@server/config'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
beforeAll(async () => {
  t = await createTestApp()
})
afterAll(() => t.close())

describe('service routes', () => {
  it('answers the health check', async () => {
    expect((await request(t.app).get('/api/health')).body).toEqual({ status: 'ok' })
  })

  it('describes the API in OpenAPI 3.1 with the shared schemas', async () => {
    const { body } = await request(t.app).get('/api/openapi.json')
    expect(body.openapi).toBe('3.1.0')
    for (const path of [
      '/api/datasets',
      '/api/datasets/{idOrAccession}',
      '/api/projects/{id}/members',
      '/api/datasets/{idOrAccession}/shares',
      '/api/me/tokens',
      '/api/datasets/{idOrAccession}/files/{fileId}/regions',
      '/api/regions/{id}/measurements',
      '/api/datasets/{idOrAccession}/files/{fileId}/regions/export',
    ]) {
      expect(Object.keys(body.paths)).toContain(path)
    }
    expect(body.components.schemas.CreateDataset.required).toEqual(
      expect.arrayContaining(['projectId', 'title']),
    )
    expect(body.components.schemas.Problem).toBeDefined()
    // Every measurement kind's answer is described, with the cluster list DBSCAN answers with.
    const measurement = body.paths['/api/regions/{id}/measurements'].get
    const kinds = measurement.parameters.find((p: { name: string }) => p.name === 'kind')
    expect(kinds.schema.enum).toEqual(['summary', 'dbscan', 'ripley', 'nn', 'profile'])
    const result = body.components.schemas.MeasurementResult
    expect(result.oneOf).toHaveLength(5)
    expect(JSON.stringify(result)).toContain('"clusters"')
    const docs = await request(t.app).get('/api/docs/')
    expect(docs.status).toBe(200)
    expect(docs.text).toContain('Stipple API')
  })

  it('answers unknown API routes with a problem, not a page', async () => {
    const res = await request(t.app).get('/api/nothing-here')
    expect(res.status).toBe(404)
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/)
  })
})

describe('security headers', () => {
  it('sends pages a Content-Security-Policy that allows no inline script', async () => {
    const res = await request(t.app).get('/api/docs/')
    expect(res.headers['content-type']).toMatch(/text\/html/)
    const csp = res.headers['content-security-policy'] as string
    const scriptSrc = csp.split(';').find((d) => d.trim().startsWith('script-src'))!
    expect(scriptSrc.trim()).toBe("script-src 'self'")
    expect(csp).toContain("object-src 'none'")
    expect(csp).toContain("frame-ancestors 'self'")
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN')
    expect(res.headers['x-powered-by']).toBeUndefined()
  })

  // OWASP REST Security Cheat Sheet, "Security headers": an API answer needs no document policy,
  // only one that forbids rendering, framing and sniffing it.
  it('sends API answers a policy under which nothing in them can run or be framed', async () => {
    for (const path of ['/api/health', '/api/nothing-here']) {
      const res = await request(t.app).get(path)
      expect(res.headers['content-security-policy']).toBe(
        "default-src 'none';frame-ancestors 'none'",
      )
      expect(res.headers['x-content-type-options']).toBe('nosniff')
      expect(res.headers['cross-origin-resource-policy']).toBe('same-origin')
      expect(res.headers['x-powered-by']).toBeUndefined()
    }
  })
})

/** A production environment with a real provider, mail server and https address. */
const production = (): Record<string, string> => ({
  NODE_ENV: 'production',
  DATA_DIR: t.config.dataDir,
  PUBLIC_URL: 'https://hub.example.org',
  OIDC_ISSUER: 'https://login.example.org/realms/lab',
  OIDC_CLIENT_ID: 'stipple',
  OIDC_CLIENT_SECRET: 'from-the-environment',
  SMTP_URL: 'smtp://mail.example.org:587',
})

describe('configuration', () => {
  it('refuses to start in production with demo settings', () => {
    const attempt = () => loadConfig({ NODE_ENV: 'production', DATA_DIR: t.config.dataDir })
    expect(attempt).toThrow(ConfigError)
    expect(attempt).toThrow(/OIDC_ISSUER/)
    expect(attempt).toThrow(/SMTP_URL/)
    expect(() =>
      loadConfig({ NODE_ENV: 'production', DEMO: 'true', DATA_DIR: t.config.dataDir }),
    ).toThrow(/DEMO must be false/)
  })

  it('starts in production with a real provider, mail server and https address', () => {
    const config = loadConfig({ ...production(), TRUST_PROXY: '1' })
    expect(config).toMatchObject({
      demo: false,
      secureCookies: true,
      oidc: { local: false, issuer: 'https://login.example.org/realms/lab' },
    })
  })

  it('in production over https, the session cookie is Secure, and a server that trusts no proxy refuses to start', () => {
    expect(() => loadConfig(production())).toThrow(/TRUST_PROXY must be at least 1/)
    for (const trust of ['1', '2'])
      expect(sessionCookieOptions(loadConfig({ ...production(), TRUST_PROXY: trust })).secure).toBe(
        true,
      )
    // Plain http in development: Secure only when the request itself came over https.
    expect(sessionCookieOptions(t.config).secure).toBe('auto')
  })

  it('explains a malformed environment', () => {
    expect(() => loadConfig({ PORT: 'eighty', DATA_DIR: t.config.dataDir })).toThrow(/PORT/)
  })
})
