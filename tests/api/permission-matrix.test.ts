/**
 * Every cell of the permission matrix (shared/permissions/matrix.ts) against the real HTTP API:
 * each role × dataset action × access phase, and each role × project action. The matrix is the
 * specification; this test would fail if a route forgot to authorise or a rule drifted.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ACCESS_PHASES, type AccessPhase } from '@shared/domain/dataset-state'
import {
  DATASET_ACTIONS,
  PROJECT_ACTIONS,
  type DatasetAction,
  type ProjectAction,
} from '@shared/permissions/actions'
import {
  DATASET_MATRIX,
  MATRIX_ROLES,
  PROJECT_MATRIX,
  type MatrixRole,
} from '@shared/permissions/matrix'
import { SHARE_CAPABILITIES } from '@shared/domain/roles'
import type { IUser } from '@server/modules/users/user.entity'
import { ReviewerLink } from '@server/modules/reviewer-links/reviewer-link.entity'
import { REVIEW_COOKIE } from '@server/modules/reviewer-links/reviewer-access'
import { signLinkIds } from '@server/modules/reviewer-links/reviewer-link-token'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildReadyFile,
  buildShare,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { buildJournal, buildManuscript, buildReviewerLink } from '../fixtures/review-builders'

let t: TestApp
let projectId: number
const tokens = new Map<MatrixRole, string | null>()
let collaborator: IUser
let journalId: number

const DAY = 86_400_000
const future = (days: number) => new Date(Date.UTC(2100, 0, 1) + days * DAY)
const futureDay = new Date(Date.now() + 30 * DAY).toISOString().slice(0, 10)

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  const owner = await buildMember(em)
  const member = await buildMember(em)
  collaborator = await buildUser(em, { organization: null })
  projectId = (
    await buildProject(em, [
      { user: owner, role: 'owner' },
      { user: member, role: 'member' },
    ])
  ).id
  tokens.set('admin', await tokenFor(em, await buildUser(em, { siteRole: 'admin' })))
  tokens.set('steward', await tokenFor(em, await buildUser(em, { siteRole: 'steward' })))
  const editor = await buildUser(em, { siteRole: 'editor' })
  journalId = (await buildJournal(em, [editor])).id
  tokens.set('editor', await tokenFor(em, editor))
  tokens.set('reviewer', null)
  tokens.set('owner', await tokenFor(em, owner))
  tokens.set('member', await tokenFor(em, member))
  tokens.set('collaborator', await tokenFor(em, collaborator))
  tokens.set('outsider', await tokenFor(em, await buildMember(em)))
  tokens.set('public', null)
})
afterAll(() => t.close())

/**
 * A fresh dataset in the given phase; the collaborator gets a share with every capability, the
 * editor's journal a manuscript it is attached to, and the reviewer a live link to it.
 */
async function datasetIn(phase: AccessPhase) {
  const em = t.em()
  const state = phase === 'embargoed' || phase === 'released' ? 'approved' : phase
  const dataset = await buildDataset(em, projectId, {
    state,
    embargoUntil: phase === 'embargoed' ? future(1) : null,
  })
  // A validated file, so that submitting is a matter of permission.
  await buildReadyFile(em, dataset.id)
  await buildShare(em, dataset.id, projectId, collaborator, [...SHARE_CAPABILITIES])
  await buildManuscript(em, journalId, [dataset.id])
  const { cookie } = await buildReviewerLink(em, t.config.sessionSecrets[0]!, dataset.id)
  cookies.set(dataset.id, cookie)
  return dataset
}
const cookies = new Map<number, string>()

/** Sends the probe as the role: a bearer token, the reviewer's cookie, or nothing. */
function as(role: MatrixRole, req: request.Test, datasetId?: number) {
  const token = tokens.get(role)
  if (token) return req.set(bearer(token))
  if (role === 'reviewer' && datasetId !== undefined)
    return req.set('Cookie', cookies.get(datasetId)!)
  return req
}

let probeCounter = 0
/** One HTTP request that exercises the action, as the client would send it. */
function probe(action: DatasetAction, id: number, phase: AccessPhase) {
  const path = `/api/datasets/${id}`
  switch (action) {
    case 'read':
      return request(t.app).get(path)
    case 'preview':
      return request(t.app).get(`${path}/comments`)
    case 'annotate':
      return request(t.app).post(`${path}/comments`).send({ body: 'Looks like a ring' })
    case 'download':
      return request(t.app).get(`${path}/manifest.txt`)
    case 'edit':
      return request(t.app).patch(path).send({ title: 'Edited title' })
    case 'delete':
      return request(t.app).delete(path)
    case 'submit':
      return request(t.app).post(`${path}/submit`)
    case 'curate':
      return request(t.app)
        .post(`${path}/review`)
        .send(
          phase === 'embargoed' || phase === 'released'
            ? { decision: 'withdraw', comment: 'Faulty drift correction' }
            : { decision: 'approve' },
        )
    case 'embargo':
      return request(t.app)
        .put(`${path}/embargo`)
        .send({ until: futureDay, reason: 'Manuscript in review' })
    case 'share':
      return request(t.app)
        .post(`${path}/shares`)
        .send({ email: `guest-${probeCounter++}@elsewhere.test`, capabilities: ['preview'] })
    case 'reviewer_link':
      return request(t.app)
        .post(`${path}/reviewer-links`)
        .send({ expiresAt: new Date(Date.now() + 7 * DAY).toISOString(), anonymous: false })
  }
}

const NEEDS_SIGN_IN: DatasetAction[] = [
  'annotate',
  'edit',
  'delete',
  'submit',
  'curate',
  'embargo',
  'share',
  'reviewer_link',
]

function expectedStatus(
  role: MatrixRole,
  action: DatasetAction,
  phase: AccessPhase,
): number | 'ok' {
  if (DATASET_MATRIX[role][action].includes(phase)) return 'ok'
  if ((role === 'public' || role === 'reviewer') && NEEDS_SIGN_IN.includes(action)) return 401
  return DATASET_MATRIX[role].read.includes(phase) ? 403 : 404
}

describe.each(MATRIX_ROLES)('dataset actions as %s', (role) => {
  it.each(ACCESS_PHASES)('in phase %s, every action answers as the matrix says', async (phase) => {
    const got: string[] = []
    const want: string[] = []
    for (const action of DATASET_ACTIONS) {
      const dataset = await datasetIn(phase)
      const res = await as(role, probe(action, dataset.id, phase), dataset.id)
      const expected = expectedStatus(role, action, phase)
      const ok = res.status >= 200 && res.status < 300
      got.push(`${action}: ${ok ? 'ok' : res.status}`)
      want.push(`${action}: ${expected}`)
    }
    expect(got).toEqual(want)
  })
})

describe.each(MATRIX_ROLES)('list narrowing as %s', (role) => {
  it('the list holds exactly the datasets this role may read, filtered in the database', async () => {
    const ids = new Map<number, AccessPhase>()
    for (const phase of ACCESS_PHASES) ids.set((await datasetIn(phase)).id, phase)
    // A reviewer holds the links of every dataset just made (one browser, several links).
    const reviewerCookie = await cookieForAll([...ids.keys()])
    const req = request(t.app).get(`/api/datasets?projectId=${projectId}&limit=200`)
    const res = await (role === 'reviewer' ? req.set('Cookie', reviewerCookie) : as(role, req))
    expect(res.status).toBe(200)
    const listed = new Set<number>(res.body.items.map((d: { id: number }) => d.id))
    const seen = [...ids].filter(([id]) => listed.has(id)).map(([, phase]) => phase)
    expect(seen).toEqual(ACCESS_PHASES.filter((p) => DATASET_MATRIX[role].read.includes(p)))
  })
})

/** One cookie naming the links of all these datasets, as a browser that opened each would hold. */
async function cookieForAll(datasetIds: number[]) {
  const em = t.em()
  const links = await em.find(ReviewerLink, { dataset: { $in: datasetIds } })
  return `${REVIEW_COOKIE}=${signLinkIds(
    t.config.sessionSecrets[0]!,
    links.map((l) => l.id),
  )}`
}

function projectProbe(action: ProjectAction) {
  switch (action) {
    case 'read':
      return request(t.app).get(`/api/projects/${projectId}`)
    case 'create_dataset':
      return request(t.app).post('/api/datasets').send({ projectId, title: 'Probe dataset' })
    case 'manage_members':
      return request(t.app)
        .post(`/api/projects/${projectId}/members`)
        .send({ email: `new-${probeCounter++}@lab.test`, role: 'member' })
  }
}

describe.each(MATRIX_ROLES)('project actions as %s', (role) => {
  it('every project action answers as the matrix says', async () => {
    const got: string[] = []
    const want: string[] = []
    for (const action of PROJECT_ACTIONS) {
      const res = await as(role, projectProbe(action))
      got.push(`${action}: ${res.status >= 200 && res.status < 300 ? 'ok' : 'denied'}`)
      want.push(`${action}: ${PROJECT_MATRIX[role][action] ? 'ok' : 'denied'}`)
      if (!PROJECT_MATRIX[role][action])
        expect(res.status, `${role} ${action}`).toBeOneOf([400, 401, 403, 404])
    }
    expect(got).toEqual(want)
  })
})

describe('a share grants only the capabilities it names', () => {
  it('a read-only share lets the collaborator read but not preview, annotate or download', async () => {
    const em = t.em()
    const person = await buildUser(em)
    const token = await tokenFor(em, person)
    const dataset = await buildDataset(em, projectId, {
      state: 'approved',
      embargoUntil: future(5),
    })
    await buildShare(em, dataset.id, projectId, person, [])
    const path = `/api/datasets/${dataset.id}`
    expect((await request(t.app).get(path).set(bearer(token))).status).toBe(200)
    expect((await request(t.app).get(`${path}/comments`).set(bearer(token))).status).toBe(403)
    expect(
      (await request(t.app).post(`${path}/comments`).set(bearer(token)).send({ body: 'hi' }))
        .status,
    ).toBe(403)
    expect((await request(t.app).get(`${path}/manifest.txt`).set(bearer(token))).status).toBe(403)
  })
})

/**
 * The cells that matter most, written out by hand rather than read from the matrix the abilities
 * are built from: a wrong cell in shared/permissions/matrix.ts would pass the sweep above (it
 * checks the API against the same matrix) but fails here. Sources: PRODUCT.md (roles, a dataset's
 * life: embargoed files stay closed, withdrawn data keep a tombstone page) and DOMAIN.md §4
 * (embargo: metadata public, files closed).
 */
const HAND_WRITTEN: [MatrixRole, DatasetAction, AccessPhase, number | 'ok'][] = [
  // Embargoed files stay closed to everyone outside the project, the public included.
  ['public', 'download', 'embargoed', 403],
  ['public', 'preview', 'embargoed', 403],
  ['outsider', 'download', 'embargoed', 403],
  // …except the editors of the manuscript it is attached to (an unrelated editor is an outsider:
  // tests/api/manuscripts.test.ts).
  ['editor', 'download', 'embargoed', 'ok'],
  ['public', 'read', 'embargoed', 'ok'],
  ['collaborator', 'download', 'embargoed', 'ok'],
  ['member', 'download', 'embargoed', 'ok'],
  // Drafts and submissions are invisible to outsiders (404: existence does not leak).
  ['public', 'read', 'draft', 404],
  ['outsider', 'read', 'draft', 404],
  ['outsider', 'read', 'submitted', 404],
  // Journal editors, for a dataset attached to a manuscript of their journal: never a draft;
  // they see, preview and download what reviewers see, and hand out the links.
  ['editor', 'read', 'draft', 404],
  ['editor', 'read', 'submitted', 'ok'],
  ['editor', 'download', 'submitted', 'ok'],
  ['editor', 'preview', 'embargoed', 'ok'],
  ['editor', 'reviewer_link', 'submitted', 'ok'],
  ['editor', 'reviewer_link', 'draft', 404],
  ['editor', 'edit', 'submitted', 403],
  ['editor', 'curate', 'submitted', 403],
  ['editor', 'download', 'withdrawn', 403],
  // A reviewer link: view, preview and download of a submitted or later dataset, nothing else.
  ['reviewer', 'read', 'submitted', 'ok'],
  ['reviewer', 'preview', 'submitted', 'ok'],
  ['reviewer', 'download', 'embargoed', 'ok'],
  ['reviewer', 'read', 'draft', 404],
  ['reviewer', 'download', 'draft', 404],
  ['reviewer', 'download', 'withdrawn', 403],
  ['reviewer', 'annotate', 'submitted', 401],
  ['reviewer', 'edit', 'submitted', 401],
  ['reviewer', 'reviewer_link', 'submitted', 401],
  // Links are made by the project's owners, not by its other members, stewards or collaborators.
  ['owner', 'reviewer_link', 'submitted', 'ok'],
  ['owner', 'reviewer_link', 'embargoed', 'ok'],
  ['owner', 'reviewer_link', 'draft', 403],
  ['member', 'reviewer_link', 'submitted', 403],
  ['steward', 'reviewer_link', 'submitted', 403],
  ['collaborator', 'reviewer_link', 'embargoed', 403],
  // Withdrawn: a tombstone page for all, downloads only for the project and the stewards.
  ['public', 'read', 'withdrawn', 'ok'],
  ['public', 'download', 'withdrawn', 403],
  ['collaborator', 'download', 'withdrawn', 403],
  ['owner', 'download', 'withdrawn', 'ok'],
  ['steward', 'download', 'withdrawn', 'ok'],
  ['collaborator', 'annotate', 'withdrawn', 403],
  // Released: open to all; annotating needs an account and a relation.
  ['public', 'download', 'released', 'ok'],
  ['public', 'annotate', 'released', 401],
  ['outsider', 'annotate', 'released', 403],
  // What a collaborator's share can and cannot do.
  ['collaborator', 'annotate', 'draft', 'ok'],
  ['collaborator', 'edit', 'draft', 403],
  ['collaborator', 'share', 'draft', 403],
  ['collaborator', 'delete', 'draft', 403],
  // Depositors edit only drafts and datasets sent back; stewards curate but never edit.
  ['member', 'edit', 'submitted', 403],
  ['member', 'edit', 'embargoed', 403],
  ['member', 'edit', 'changes_requested', 'ok'],
  ['member', 'delete', 'submitted', 403],
  ['member', 'curate', 'submitted', 403],
  ['steward', 'edit', 'draft', 403],
  ['steward', 'curate', 'submitted', 'ok'],
]

describe('the cells that matter most, written out by hand', () => {
  it.each(HAND_WRITTEN)('%s / %s / %s → %s', async (role, action, phase, expected) => {
    const dataset = await datasetIn(phase)
    const res = await as(role, probe(action, dataset.id, phase), dataset.id)
    const ok = res.status >= 200 && res.status < 300
    expect(ok ? 'ok' : res.status).toBe(expected)
  })
})
