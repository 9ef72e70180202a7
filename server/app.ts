import { existsSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import express, { type Express } from 'express'
import session from 'express-session'
import type Provider from 'oidc-provider'
import type { Locker } from '@tus/server'
import swaggerUi from 'swagger-ui-express'
import { AcceptedTokens, authenticate, requireUser } from './http/authenticate'
import { sameOriginWrites } from './http/csrf'
import { apiNotFound, errorHandler } from './http/error-handler'
import { refuseNulInUrl } from './http/nul-guard'
import { failedTokenLimit } from './http/rate-limit'
import { requestContext } from './http/request-context'
import { securityHeaders } from './http/security-headers'
import { auditRouter } from './modules/audit/audit.routes'
import { adminUsersRouter } from './modules/users/admin-users.routes'
import { AccessVersionReader } from './modules/common/access-version'
import { sqliteFileOf } from './db'
import { authRouter } from './modules/auth/auth.routes'
import type { RelyingParty } from './modules/auth/relying-party'
import { datasetsRouter } from './modules/datasets/datasets.routes'
import { landingRouter } from './modules/landing/landing.routes'
import { searchRouter } from './modules/search/search.routes'
import { curationQueueRouter } from './modules/curation/curation.routes'
import { collaborationRouter } from './modules/regions/collaboration.routes'
import type { DemoAccount } from './modules/idp/accounts'
import { interactionRouter } from './modules/idp/interaction.routes'
import type { Mailbox } from './modules/mail/mail-catcher'
import { caughtMailRouter } from './modules/mail/mail.routes'
import { projectsRouter } from './modules/projects/projects.routes'
import { OrmSessionStore } from './modules/sessions/session-store'
import { meRouter } from './modules/users/me.routes'
import { instrumentProfilesRouter } from './modules/metadata/instrument-profiles.routes'
import { metadataRouter } from './modules/metadata/metadata.routes'
import { buildOpenApiDocument } from './openapi/document'
import type { AppConfig } from './config'
import { clockOf, type AppDeps } from './services'
import type { LocalStorage } from './storage/local-storage'
import { openNodeStorage } from './storage/object-storage'
import { PreviewService } from './modules/preview/preview.service'
import { PreviewTables } from './modules/preview/preview-tables'
import { ReadConnection } from './modules/common/read-connection'
import { TilePool } from './modules/preview/tile-pool'
import { createUploads, UPLOADS_PATH } from './modules/uploads/uploads'
import { reviewerLinkAccess } from './modules/reviewer-links/reviewer-access'
import { reviewerEntryRouter } from './modules/reviewer-links/reviewer-entry.routes'
import { linkCheckRouter } from './modules/link-check/link-check.routes'
import { manuscriptsRouter } from './modules/manuscripts/manuscripts.routes'

export interface CreateAppOptions extends Omit<AppDeps, 'storage'> {
  storage?: LocalStorage
  relyingParty: RelyingParty
  /** The stand-in identity provider, mounted at /oidc and /idp when no real one is configured. */
  localIdp?: { provider: Provider; accounts: DemoAccount[] }
  /** Demo mode: where the caught-mail page reads from. */
  mailbox?: Mailbox
  /** Upload locks shared by all HTTP workers (server/cluster); in-process when omitted. */
  uploadLocker?: Locker
  /** The built client (vite build); omitted in API tests. */
  clientDir?: string
}

const asset = (path: string) => fileURLToPath(new URL(path, import.meta.url))
export const SESSION_COOKIE = 'stipple.sid'

/** Secure whenever users reach Stipple over https, whatever the hop from the proxy looks like. */
export const sessionCookieOptions = (config: AppConfig) =>
  ({
    httpOnly: true,
    sameSite: 'lax',
    secure: config.secureCookies ? true : 'auto',
    maxAge: 8 * 3600_000,
  }) as const

/** Builds the whole HTTP application; it never listens (server/main.ts does). */
export function createApp(appOptions: CreateAppOptions): Express {
  const storage = appOptions.storage ?? openNodeStorage(appOptions.config)
  const tilePool = new TilePool()
  const readConnection = new ReadConnection(appOptions.orm)
  const options: AppDeps & CreateAppOptions = {
    ...appOptions,
    storage,
    previews: new PreviewService(storage, tilePool, new PreviewTables(readConnection)),
    reads: readConnection,
  }
  const { orm, config } = options
  const app = express()
  app.disable('x-powered-by')
  // Hashing every JSON body for a weak ETag costs more than it saves on an API of changing lists.
  app.set('etag', false)
  app.set('trust proxy', config.trustProxy)

  const issuerOrigin = config.oidc.issuer ? new URL(config.oidc.issuer).origin : config.publicUrl
  app.use(securityHeaders({ issuerOrigin, https: config.publicUrl.startsWith('https://') }))
  app.use(requestContext(orm))
  app.use(refuseNulInUrl)

  // The identity provider parses its own bodies; no global body parser sits before it.
  if (options.localIdp) {
    app.use('/oidc', options.localIdp.provider.callback())
    app.use(
      '/idp',
      interactionRouter(
        options.localIdp.provider,
        options.localIdp.accounts,
        config.rateLimitSignIn,
      ),
    )
  }
  app.use('/server-assets', express.static(asset('./http/assets'), { maxAge: '1h' }))
  app.use(
    '/server-assets/fonts',
    express.static(asset('../node_modules/@fontsource/lato/files'), { maxAge: '7d' }),
  )

  const sessions = session({
    name: SESSION_COOKIE,
    secret: config.sessionSecrets,
    store: new OrmSessionStore(orm),
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: sessionCookieOptions(config),
  })
  // Scripts and workstations authenticate with a bearer token and never carry a session; an API
  // request without the session cookie has none to load, and no API route starts one (sign-in
  // does, under /auth), so neither pays for the session machinery.
  app.use((req, res, next) =>
    req.path.startsWith('/api/') &&
    (req.headers.authorization || !req.headers.cookie?.includes(SESSION_COOKIE))
      ? next()
      : sessions(req, res, next),
  )
  const accessVersion = new AccessVersionReader(sqliteFileOf(orm), () => orm.em.fork())
  app.locals.close = () => {
    accessVersion.close()
    readConnection.close()
    void tilePool.close()
  }
  const acceptedTokens = new AcceptedTokens()
  app.use(failedTokenLimit(config.rateLimitSignIn, acceptedTokens))
  app.use(authenticate(accessVersion, acceptedTokens, clockOf(options)))
  app.use(reviewerLinkAccess(options))
  app.use(sameOriginWrites(new URL(config.publicUrl).origin))

  // tus reads the raw request stream, so uploads are mounted before any body parser.
  const uploads = createUploads({
    ...options,
    locker: options.uploadLocker,
    onRegistered: () => options.jobs?.notify(),
  })
  app.locals.uploads = uploads
  app.all(`${UPLOADS_PATH}{/*rest}`, requireUser, uploads.handler)
  app.use(UPLOADS_PATH, uploads.unavailable)

  const api = express.Router()
  const json = express.json({ limit: '1mb' })
  // Reads carry no body; skipping the parser there keeps the hot list route short.
  api.use((req, res, next) =>
    req.method === 'GET' || req.method === 'HEAD' ? next() : json(req, res, next),
  )
  // The busiest routes (the list, tiles, downloads) are under /datasets: matched first.
  api.use('/datasets', datasetsRouter(options))
  api.get('/health', (_req, res) => {
    res.json({ status: 'ok' })
  })
  const openapi = buildOpenApiDocument(config.publicUrl)
  api.get('/openapi.json', (_req, res) => {
    res.json(openapi)
  })
  api.use('/docs', swaggerUi.serve, swaggerUi.setup(openapi, { customSiteTitle: 'Stipple API' }))
  api.use(collaborationRouter(options))
  api.use('/me', meRouter(options))
  api.use('/projects', projectsRouter(options))
  api.use('/audit', auditRouter())
  api.use('/search', searchRouter())
  api.use('/users', adminUsersRouter())
  api.use('/curation', curationQueueRouter())
  api.use(manuscriptsRouter(options))
  api.use('/link-check', linkCheckRouter(options))
  api.use('/instrument-profiles', instrumentProfilesRouter())
  api.use(metadataRouter())
  if (config.demo && options.mailbox) api.use('/dev/mail', caughtMailRouter(options.mailbox))
  api.use(apiNotFound)
  app.use('/api', api)
  // After /api: every layer before it is one more test on each API request.
  app.use('/auth', authRouter(options, options.relyingParty))
  app.use('/r', reviewerEntryRouter(options))
  app.use('/d', landingRouter(options))

  if (options.clientDir && existsSync(options.clientDir)) {
    const clientDir = options.clientDir
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }))
    // The client routes in the browser: every other GET gets its page.
    app.get('/{*path}', (_req, res) => {
      res.set('cache-control', 'no-cache').sendFile('index.html', { root: clientDir })
    })
  }

  app.use(errorHandler(options.logger))
  return app
}
