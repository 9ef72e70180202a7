/**
 * The read side of the permission matrix through EVERY data route, not one probe per action:
 * file list, validation report, file content, zip, manifest, exports, metadata, comments, quality
 * (dataset and file), preview and tiles, for every role (the journal editor through a manuscript
 * of their journal, the reviewer through a link cookie) and every access phase of one dataset
 * holding a real ingested table. Each route's action is written here; its cell comes from the matrix.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ACCESS_PHASES, type AccessPhase } from '@shared/domain/dataset-state'
import { SHARE_CAPABILITIES } from '@shared/domain/roles'
import type { DatasetAction } from '@shared/permissions/actions'
import { DATASET_MATRIX, MATRIX_ROLES, type MatrixRole } from '@shared/permissions/matrix'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { QualityReport } from '@server/modules/quality/quality-report.entity'
import { bearer, buildMember, buildShare, buildUser, tokenFor } from '../fixtures/builders'
import { settledFile } from '../fixtures/job-runner'
import { buildJournal, buildManuscript, buildReviewerLink } from '../fixtures/review-builders'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp
let fileId: number
const credentials = new Map<MatrixRole, Record<string, string>>()

/** Each data route and the action that guards it (from each route's own authorise call). */
const ROUTES: [path: (f: number) => string, action: DatasetAction][] = [
  [() => '', 'read'],
  [() => '/metadata', 'read'],
  [() => '/files', 'read'],
  [() => '/export/datacite', 'read'],
  [() => '/export/jsonld', 'read'],
  [() => '/export/ome-xml', 'read'],
  [() => '/export/methods', 'read'],
  [(f) => `/files/${f}/validation`, 'preview'],
  [() => '/quality', 'preview'],
  [(f) => `/files/${f}/quality`, 'preview'],
  [(f) => `/files/${f}/preview`, 'preview'],
  [(f) => `/files/${f}/tiles/0/0/0.png`, 'preview'],
  [() => '/comments', 'preview'],
  [(f) => `/files/${f}/content`, 'download'],
  [() => '/archive.zip', 'download'],
  [() => '/manifest.txt', 'download'],
]

beforeAll(async () => {
  app = await startSharedDraftApp({})
  const { localizations } = simulateLocalizations({
    seed: 5,
    fieldNm: 3000,
    emitters: 500,
    frames: 200,
    structure: { kind: 'rings' },
  })
  fileId = await app.upload('rings.csv', Buffer.from(localizationsToCsv(localizations)))
  expect((await settledFile(app.t, fileId, 60_000)).status).toBe('ready')
  // The quality report follows the ingest as its own job.
  const until = Date.now() + 60_000
  while (!(await app.t.em().count(QualityReport, { file: fileId })) && Date.now() < until)
    await new Promise((r) => setTimeout(r, 100))

  const em = app.t.em()
  const dataset = app.dataset
  const owner = await buildMember(em)
  em.create('Membership', { project: dataset.project, user: owner.id, role: 'owner' })
  await em.flush()
  const collaborator = await buildUser(em)
  await buildShare(em, dataset.id, dataset.project, collaborator, [...SHARE_CAPABILITIES])
  const editor = await buildUser(em, { siteRole: 'editor' })
  const journal = await buildJournal(em, [editor])
  await buildManuscript(em, journal.id, [dataset.id])
  const { cookie } = await buildReviewerLink(em, app.t.config.sessionSecrets[0]!, dataset.id)
  const token = async (user: Parameters<typeof tokenFor>[1]) => bearer(await tokenFor(em, user))
  credentials.set('admin', await token(await buildUser(em, { siteRole: 'admin' })))
  credentials.set('steward', await token(await buildUser(em, { siteRole: 'steward' })))
  credentials.set('editor', await token(editor))
  credentials.set('owner', await token(owner))
  credentials.set('member', bearer(app.tokens.member!))
  credentials.set('collaborator', await token(collaborator))
  credentials.set('reviewer', { Cookie: cookie })
  credentials.set('outsider', bearer(app.tokens.outsider!))
  credentials.set('public', {})
}, 120_000)
afterAll(() => app.close())

async function enterPhase(phase: AccessPhase) {
  const state = phase === 'embargoed' || phase === 'released' ? 'approved' : phase
  const embargoUntil = phase === 'embargoed' ? new Date(Date.UTC(2100, 0, 1)) : null
  await app.t.em().nativeUpdate(Dataset, { id: app.dataset.id }, { state, embargoUntil })
}

describe.each(ACCESS_PHASES)('every data route in phase %s', (phase) => {
  it('answers each role as the matrix cell of the route’s action says', async () => {
    await enterPhase(phase)
    const got: string[] = []
    const want: string[] = []
    for (const role of MATRIX_ROLES) {
      for (const [path, action] of ROUTES) {
        const url = `/api/datasets/${app.dataset.accession}${path(fileId)}`
        const res = await request(app.t.app).get(url).set(credentials.get(role)!)
        const allowed = DATASET_MATRIX[role][action].includes(phase)
        const readable = DATASET_MATRIX[role].read.includes(phase)
        got.push(`${role} ${url}: ${res.status < 300 ? 'ok' : res.status}`)
        want.push(`${role} ${url}: ${allowed ? 'ok' : readable ? 403 : 404}`)
      }
    }
    expect(got).toEqual(want)
  }, 120_000)
})
