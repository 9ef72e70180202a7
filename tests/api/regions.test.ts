/**
 * Regions of interest and their threads through the API: who may draw, read, change and delete;
 * geometry refused in words (crossings, off the table, too many vertices); Markdown rendered
 * inert; mentions that reach only people with access; the edit window on an injected clock;
 * resolve and reopen; the rate limit; and the live event stream, delivered and refused.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { Membership } from '@server/modules/projects/project.entity'
import { regionSchema, type RegionDto } from '@shared/schemas/region.schema'
import { commentSchema, type CommentDto } from '@shared/schemas/comment.schema'
import { bearer, buildUser, tokenFor } from '../fixtures/builders'
import { settledFile } from '../fixtures/job-runner'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'
import { mailTo } from '../fixtures/test-app'

let app: SharedDraftApp
let fileId: number
let now = new Date('2026-12-04T10:00:00Z')
const emails: Record<string, string> = {}

beforeAll(async () => {
  app = await startSharedDraftApp(
    {
      annotator: ['preview', 'annotate'],
      second: ['preview', 'annotate'],
      previewer: ['preview'],
      reader: [],
    },
    { clock: () => now, env: { RATE_LIMIT_COMMENTS: '1000' } },
  )
  // An owner of the dataset's project, who may change what others drew.
  const em = app.t.em()
  const owner = await buildUser(em)
  const d = await em.findOneOrFail(Dataset, { id: app.dataset.id })
  em.create(Membership, { project: d.project, user: owner.id, role: 'owner' })
  await em.flush()
  app.tokens.owner = await tokenFor(em, owner)
  for (const [who, token] of Object.entries(app.tokens)) {
    emails[who] = (await request(app.t.app).get('/api/me').set(bearer(token))).body.user.email
  }
  const { localizations } = simulateLocalizations({
    seed: 5,
    fieldNm: 4000,
    emitters: 400,
    frames: 200,
    structure: { kind: 'rings' },
  })
  fileId = await app.upload('rings.csv', Buffer.from(localizationsToCsv(localizations)))
  expect((await settledFile(app.t, fileId, 60_000)).status).toBe('ready')
}, 90_000)
afterAll(() => app.close())

const regionsPath = () => `/api/datasets/${app.dataset.accession}/files/${fileId}/regions`
const commentsPath = () => `/api/datasets/${app.dataset.accession}/comments`
const as = (who: string) => bearer(app.tokens[who]!)
const rectangle = (x0: number, y0: number, x1: number, y1: number) => ({
  type: 'Polygon' as const,
  coordinates: [
    [
      [x0, y0],
      [x1, y0],
      [x1, y1],
      [x0, y1],
      [x0, y0],
    ],
  ],
})
const draw = (who: string, body: object) =>
  request(app.t.app).post(regionsPath()).set(as(who)).send(body)
const say = (who: string, body: object) =>
  request(app.t.app).post(commentsPath()).set(as(who)).send(body)

describe('regions of interest', () => {
  let region: RegionDto

  it('lets a collaborator with the annotate right draw a region, stored in sample nm', async () => {
    const res = await draw('annotator', {
      label: 'Ring near the corner',
      geometry: rectangle(500, 600, 900, 1000),
      colour: '#3366cc',
      shape: 'rectangle',
    })
    expect(res.status).toBe(201)
    region = regionSchema.parse(res.body)
    expect(region.geometry).toEqual(rectangle(500, 600, 900, 1000))
    expect(region).toMatchObject({
      label: 'Ring near the corner',
      colour: '#3366cc',
      shape: 'rectangle',
      canChange: true,
    })
    expect(region.author?.id).toBeGreaterThan(0)
  })

  it('stores every kind of shape: ellipse, point and a line with its width', async () => {
    for (const geometry of [
      { type: 'Ellipse', center: [2000, 2000], radii: [300, 120], rotation: 30 },
      { type: 'Point', coordinates: [1500, 1500] },
      {
        type: 'LineString',
        coordinates: [
          [1000, 1000],
          [3000, 1200],
        ],
        width: 150,
      },
    ]) {
      const res = await draw('annotator', { label: geometry.type, geometry })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body.geometry).toMatchObject(geometry)
    }
    const list = await request(app.t.app).get(regionsPath()).set(as('previewer'))
    expect(list.body.items.map((r: RegionDto) => r.shape)).toEqual([
      'rectangle',
      'ellipse',
      'point',
      'line',
    ])
  })

  it('reads with the preview right, draws only with the annotate right, hides from outsiders', async () => {
    const list = await request(app.t.app).get(regionsPath()).set(as('previewer'))
    expect(list.status).toBe(200)
    expect(list.body.items[0].canChange).toBe(false)
    expect((await draw('previewer', { label: 'x', geometry: rectangle(0, 0, 1, 1) })).status).toBe(
      403,
    )
    expect((await request(app.t.app).get(regionsPath()).set(as('reader'))).status).toBe(403)
    expect((await request(app.t.app).get(regionsPath()).set(as('outsider'))).status).toBe(404)
    expect((await request(app.t.app).get(regionsPath())).status).toBe(404)
  })

  it('refuses crossing outlines, regions off the table and endless outlines with a clear 400', async () => {
    const bowTie = {
      type: 'Polygon',
      coordinates: [
        [
          [500, 500],
          [900, 900],
          [900, 500],
          [500, 900],
          [500, 500],
        ],
      ],
    }
    const crossing = await draw('annotator', { label: 'bow tie', geometry: bowTie })
    expect(crossing.status).toBe(400)
    expect(crossing.body.errors[0]).toMatchObject({ pointer: '#/geometry' })
    expect(crossing.body.detail).toMatch(/crosses itself/)

    const away = await draw('annotator', {
      label: 'far',
      geometry: rectangle(1e6, 1e6, 1.1e6, 1.1e6),
    })
    expect(away.status).toBe(400)
    expect(away.body.detail).toMatch(/outside the table/)

    const ring: number[][] = []
    for (let i = 0; i < 20_000; i++) {
      const t = (2 * Math.PI * i) / 20_000
      ring.push([2000 + 500 * Math.cos(t), 2000 + 500 * Math.sin(t)])
    }
    ring.push(ring[0]!)
    const endless = await draw('annotator', {
      label: 'too fine',
      geometry: { type: 'Polygon', coordinates: [ring] },
    })
    expect(endless.status).toBe(400)
    expect(endless.body.errors[0].pointer).toBe('#/geometry/coordinates/0')

    const mismatch = await draw('annotator', {
      label: 'x',
      geometry: { type: 'Point', coordinates: [1, 1] },
      shape: 'rectangle',
    })
    expect(mismatch.status).toBe(400)
    expect(mismatch.body.errors[0].pointer).toBe('#/shape')
  })

  it('lets its author and an owner change or delete a region, nobody else', async () => {
    const path = `/api/regions/${region.id}`
    expect(
      (await request(app.t.app).patch(path).set(as('second')).send({ label: 'mine now' })).status,
    ).toBe(403)
    expect((await request(app.t.app).delete(path).set(as('member'))).status).toBe(403)
    expect((await request(app.t.app).delete(path).set(as('outsider'))).status).toBe(404)
    const renamed = await request(app.t.app)
      .patch(path)
      .set(as('annotator'))
      .send({ label: 'Ring, lower left', geometry: rectangle(500, 600, 950, 1000) })
    expect(renamed.status).toBe(200)
    expect(renamed.body.geometry.coordinates[0][1]).toEqual([950, 600])
    const byOwner = await request(app.t.app)
      .patch(path)
      .set(as('owner'))
      .send({ colour: '#00aa00' })
    expect(byOwner.status).toBe(200)
    expect(byOwner.body.canChange).toBe(true)
    const spare = await draw('second', { label: 'spare', geometry: rectangle(100, 100, 300, 300) })
    expect(
      (await request(app.t.app).delete(`/api/regions/${spare.body.id}`).set(as('owner'))).status,
    ).toBe(204)
    expect(
      (await request(app.t.app).delete(`/api/regions/${spare.body.id}`).set(as('owner'))).status,
    ).toBe(404)
  })

  describe('threads', () => {
    it('renders Markdown and leaves script, handlers and javascript: links inert', async () => {
      const body =
        '**Dense** ring <script>alert(1)</script> <img src=x onerror="alert(2)"> [click](javascript:alert(3)) <a href="javascript:alert(4)">x</a>'
      const res = await say('annotator', { body, regionId: region.id })
      expect(res.status).toBe(201)
      const comment = commentSchema.parse(res.body)
      expect(comment.body).toBe(body)
      expect(comment.bodyHtml).toContain('<strong>Dense</strong>')
      // Only the Markdown's own tags are elements; everything typed as HTML is text.
      const tags = [...comment.bodyHtml.matchAll(/<\/?([a-z0-9]+)[^>]*>/gi)].map((m) => m[0])
      expect(tags).toEqual(['<p>', '<strong>', '</strong>', '</p>'])
      expect(comment.bodyHtml).toContain('&lt;script&gt;')
      expect(comment.regionId).toBe(region.id)

      const links = await say('annotator', {
        body: '[ok](https://ok.test/a) [bad](javascript:alert(1)) [data](data:text/html,x) [v](vbscript:x)',
      })
      const anchors = [...links.body.bodyHtml.matchAll(/<a [^>]*>/g)].map(
        (m: RegExpMatchArray) => m[0],
      )
      expect(anchors).toEqual([
        '<a href="https://ok.test/a" rel="noopener noreferrer nofollow" target="_blank">',
      ])
    })

    it('refuses a region label with markup only as text: the label is stored as typed, never as HTML', async () => {
      const res = await draw('annotator', {
        label: '<b>bold</b>',
        geometry: rectangle(10, 10, 200, 200),
      })
      expect(res.status).toBe(201)
      expect(res.body.label).toBe('<b>bold</b>')
    })

    it('mails people with access who are mentioned, and nobody else, with the same answer', async () => {
      const res = await say('annotator', {
        body: `@${emails.previewer} and @${emails.reader} and @nobody-${Date.now()}@nowhere.test look here`,
      })
      expect(res.status).toBe(201)
      const mail = await mailTo(app.t.mail, emails.previewer!)
      expect(mail.subject).toMatch(/mentioned you/)
      await new Promise((r) => setTimeout(r, 300))
      expect(app.t.mail.messages.some((m) => m.to.includes(emails.reader!))).toBe(false)
      expect(app.t.mail.messages.some((m) => m.to.join().includes('nowhere.test'))).toBe(false)
      // The answer carries no list of who was reached.
      expect(Object.keys(res.body).sort()).toEqual(Object.keys(commentSchema.shape).sort())

      const mine = await request(app.t.app).get('/api/me/mentions').set(as('previewer'))
      expect(mine.body.items.map((m: { comment: CommentDto }) => m.comment.id)).toContain(
        res.body.id,
      )
      const theirs = await request(app.t.app).get('/api/me/mentions').set(as('reader'))
      expect(theirs.body.items).toEqual([])
    })

    it('lets the author edit within the window, marked edited, and not after', async () => {
      const posted = await say('second', { body: 'first thought' })
      const path = `/api/comments/${posted.body.id}`
      expect(posted.body.editableUntil).toBe(new Date(now.getTime() + 15 * 60_000).toISOString())
      expect(
        (await request(app.t.app).patch(path).set(as('annotator')).send({ body: 'x' })).status,
      ).toBe(403)
      now = new Date(now.getTime() + 10 * 60_000)
      const edited = await request(app.t.app)
        .patch(path)
        .set(as('second'))
        .send({ body: 'better _thought_' })
      expect(edited.status).toBe(200)
      expect(edited.body.editedAt).toBe(now.toISOString())
      expect(edited.body.bodyHtml).toContain('<em>thought</em>')
      now = new Date(now.getTime() + 6 * 60_000)
      const late = await request(app.t.app).patch(path).set(as('second')).send({ body: 'too late' })
      expect(late.status).toBe(409)
      expect(late.body.detail).toMatch(/15 minutes/)
    })

    it('resolves and reopens a thread through its first comment, replies join the thread', async () => {
      const root = await say('annotator', { body: 'Is this drift?', regionId: region.id })
      const reply = await say('second', { body: 'No, a real ring.', replyTo: root.body.id })
      expect(reply.status).toBe(201)
      expect(reply.body.regionId).toBe(region.id)
      const resolvedReply = await request(app.t.app)
        .post(`/api/comments/${reply.body.id}/resolve`)
        .set(as('second'))
      expect(resolvedReply.status).toBe(400)
      const resolved = await request(app.t.app)
        .post(`/api/comments/${root.body.id}/resolve`)
        .set(as('second'))
      expect(resolved.body.resolvedAt).toBe(now.toISOString())
      expect(
        (
          await request(app.t.app)
            .post(`/api/comments/${root.body.id}/resolve`)
            .set(as('previewer'))
        ).status,
      ).toBe(403)
      const reopened = await request(app.t.app)
        .post(`/api/comments/${root.body.id}/reopen`)
        .set(as('annotator'))
      expect(reopened.body.resolvedAt).toBeNull()
      const thread = await request(app.t.app)
        .get(`${commentsPath()}?regionId=${region.id}`)
        .set(as('previewer'))
      expect(thread.body.items.map((c: CommentDto) => c.id)).toEqual(
        expect.arrayContaining([root.body.id, reply.body.id]),
      )
    })
  })

  describe('the event stream', () => {
    it('is refused without the preview right (403) and to those who cannot see the dataset (404)', async () => {
      const path = `/api/datasets/${app.dataset.accession}/events`
      expect((await request(app.t.app).get(path).set(as('reader'))).status).toBe(403)
      expect((await request(app.t.app).get(path).set(as('outsider'))).status).toBe(404)
      expect((await request(app.t.app).get(path)).status).toBe(404)
    })

    it('delivers a new comment and a new region to an open page', async () => {
      const abort = new AbortController()
      const res = await fetch(`${app.live.url}/api/datasets/${app.dataset.accession}/events`, {
        headers: as('previewer'),
        signal: abort.signal,
      })
      expect(res.status).toBe(200)
      expect(res.headers.get('content-type')).toMatch(/text\/event-stream/)
      const reader = res.body!.getReader()
      const decoder = new TextDecoder()
      let text = ''
      const until = async (pattern: RegExp) => {
        while (!pattern.test(text)) {
          const { value, done } = await reader.read()
          if (done) throw new Error(`stream ended: ${text}`)
          text += decoder.decode(value)
        }
      }
      await until(/retry:/)
      const posted = await say('annotator', { body: 'Live *now*' })
      await until(/event: comment\.created\ndata: .*\n\n/)
      const data = JSON.parse(/event: comment\.created\ndata: (.*)\n/.exec(text)![1]!)
      expect(data).toMatchObject({ id: posted.body.id, bodyHtml: '<p>Live <em>now</em></p>\n' })
      expect(data.editableUntil).toBeNull() // presented to the previewer, not the author
      await draw('annotator', { label: 'Live region', geometry: rectangle(1000, 1000, 1200, 1200) })
      await until(/event: region\.created\ndata: .*Live region.*\n\n/)
      abort.abort()
    })
  })

  describe('under an embargo', () => {
    it('closes regions to the public until the embargo ends, and never lets them draw', async () => {
      const em = app.t.em()
      const d = await em.findOneOrFail(Dataset, { id: app.dataset.id })
      d.state = 'approved'
      d.embargoUntil = new Date(now.getTime() + 30 * 86_400_000)
      await em.flush()
      expect((await request(app.t.app).get(regionsPath())).status).toBe(403)
      expect((await request(app.t.app).get(regionsPath()).set(as('previewer'))).status).toBe(200)
      d.embargoUntil = new Date(now.getTime() - 86_400_000)
      await em.flush()
      expect((await request(app.t.app).get(regionsPath())).status).toBe(200)
      expect((await draw('outsider', { label: 'x', geometry: rectangle(0, 0, 9, 9) })).status).toBe(
        403,
      )
    })
  })
})

describe('the comment rate limit', () => {
  it('answers 429 once one account posts more than the limit in a minute', async () => {
    const small = await startSharedDraftApp({}, { env: { RATE_LIMIT_COMMENTS: '5' } })
    try {
      const post = () =>
        request(small.t.app)
          .post(`/api/datasets/${small.dataset.accession}/comments`)
          .set(bearer(small.tokens.member!))
          .send({ body: 'again' })
      const statuses: number[] = []
      for (let i = 0; i < 7; i++) statuses.push((await post()).status)
      expect(statuses).toEqual([201, 201, 201, 201, 201, 429, 429])
      const refused = await post()
      expect(refused.headers['content-type']).toMatch(/problem\+json/)
    } finally {
      await small.close()
    }
  })
})
