import type { AddressInfo } from 'node:net'
import type { Server } from 'node:http'
import express, { type Request, type Response } from 'express'

/**
 * A local stand-in for the DataCite REST API (https://support.datacite.org/docs/api), enough for
 * demo mode and tests: `POST /dois` and `PUT /dois/:doi` with a JSON:API body and basic auth,
 * `GET /dois/:doi`. It checks the properties DataCite requires of a findable DOI (Metadata Schema
 * 4: identifier, creators, titles, publisher, publicationYear, resourceTypeGeneral, plus the
 * landing URL) and answers errors in DataCite's JSON:API shape. `down` makes it answer 503,
 * like a service in maintenance. Records live in memory.
 */
export interface FakeDataCite {
  url: string
  records: Map<string, Record<string, unknown>>
  down: boolean
  /** Every request body received, in order (tests read what was sent). */
  received: unknown[]
  stop(): Promise<void>
}

type Attributes = Record<string, unknown>
const isText = (v: unknown) => typeof v === 'string' && v.trim().length > 0

function missingFields(a: Attributes, prefix: string): { pointer: string; title: string }[] {
  const errors: { pointer: string; title: string }[] = []
  const need = (ok: boolean, field: string, title: string) => {
    if (!ok) errors.push({ pointer: `/data/attributes/${field}`, title })
  }
  const doi = String(a.doi ?? '')
  need(
    doi.startsWith(`${prefix}/`) && doi.length > prefix.length + 1,
    'doi',
    `DOI must start with the repository prefix ${prefix}/`,
  )
  const creators = a.creators as { name?: unknown }[] | undefined
  need(
    Array.isArray(creators) && creators.length > 0 && creators.every((c) => isText(c.name)),
    'creators',
    "Creators can't be blank",
  )
  const titles = a.titles as { title?: unknown }[] | undefined
  need(
    Array.isArray(titles) && titles.length > 0 && titles.every((t) => isText(t.title)),
    'titles',
    "Titles can't be blank",
  )
  const publisher = a.publisher as { name?: unknown } | string | undefined
  need(
    isText(publisher) || isText((publisher as { name?: unknown } | undefined)?.name),
    'publisher',
    "Publisher can't be blank",
  )
  const year = Number(a.publicationYear)
  need(
    Number.isInteger(year) && year >= 1000 && year <= 9999,
    'publicationYear',
    'Publication year must be a four-digit year',
  )
  const types = a.types as { resourceTypeGeneral?: unknown } | undefined
  need(isText(types?.resourceTypeGeneral), 'types', "Resource type general can't be blank")
  need(
    /^https?:\/\//.test(String(a.url ?? '')),
    'url',
    'A findable DOI needs the URL of its landing page',
  )
  return errors
}

export async function startFakeDataCite(options: {
  repositoryId: string
  password: string
  prefix: string
  port?: number
}): Promise<FakeDataCite> {
  const app = express()
  const state = { down: false }
  const records = new Map<string, Record<string, unknown>>()
  const received: unknown[] = []
  const expected = `Basic ${Buffer.from(`${options.repositoryId}:${options.password}`).toString('base64')}`
  const fail = (res: Response, status: number, errors: { pointer?: string; title: string }[]) =>
    res
      .status(status)
      .type('application/vnd.api+json')
      .send(
        JSON.stringify({
          errors: errors.map((e) => ({
            status: String(status),
            title: e.title,
            ...(e.pointer ? { source: e.pointer } : {}),
          })),
        }),
      )

  app.use(express.json({ type: ['application/vnd.api+json', 'application/json'], limit: '2mb' }))
  app.use((req, res, next) => {
    if (state.down) return fail(res, 503, [{ title: 'Service temporarily unavailable' }])
    if (req.headers.authorization !== expected)
      return fail(res, 401, [{ title: 'Bad credentials' }])
    next()
  })

  const save = (req: Request, res: Response, doiInPath: string | null) => {
    received.push(req.body)
    const data = (req.body as { data?: { type?: unknown; attributes?: Attributes } } | undefined)
      ?.data
    if (data?.type !== 'dois' || !data.attributes)
      return fail(res, 422, [
        { pointer: '/data', title: 'A JSON:API body of type "dois" is required' },
      ])
    const a: Attributes = { ...data.attributes, ...(doiInPath ? { doi: doiInPath } : {}) }
    const errors = missingFields(a, options.prefix)
    if (errors.length) return fail(res, 422, errors)
    const doi = String(a.doi).toLowerCase()
    if (!doiInPath && records.has(doi))
      return fail(res, 422, [
        { pointer: '/data/attributes/doi', title: 'This DOI has already been taken' },
      ])
    const doiState =
      a.event === 'publish' ? 'findable' : a.event === 'register' ? 'registered' : 'draft'
    const record = { ...a, doi, state: doiState }
    records.set(doi, record)
    res
      .status(doiInPath ? 200 : 201)
      .type('application/vnd.api+json')
      .send(JSON.stringify({ data: { id: doi, type: 'dois', attributes: record } }))
  }
  app.post('/dois', (req, res) => save(req, res, null))
  app.put('/dois/:prefix/:suffix', (req, res) =>
    save(req, res, `${req.params.prefix}/${req.params.suffix}`.toLowerCase()),
  )
  app.get('/dois/:prefix/:suffix', (req, res) => {
    const record = records.get(`${req.params.prefix}/${req.params.suffix}`.toLowerCase())
    if (!record)
      return fail(res, 404, [{ title: 'The resource you are looking for doesn’t exist.' }])
    res
      .type('application/vnd.api+json')
      .send(JSON.stringify({ data: { id: record.doi, type: 'dois', attributes: record } }))
  })

  const server: Server = await new Promise((resolve) => {
    const s = app.listen(options.port ?? 0, '127.0.0.1', () => resolve(s))
  })
  const { port } = server.address() as AddressInfo
  return {
    url: `http://127.0.0.1:${port}`,
    records,
    received,
    get down() {
      return state.down
    },
    set down(value: boolean) {
      state.down = value
    },
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  }
}
