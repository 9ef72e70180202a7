/**
 * Two app nodes of the cluster profile: two real server processes (server/main.ts), each with its
 * own temporary folder and port, on one PostgreSQL database and one S3 bucket, behind a switch
 * that plays the load balancer (both nodes have its address as PUBLIC_URL). What one node starts,
 * the other must be able to finish; what must happen once happens once. (The upload that moves
 * from a killed node to the other is in two-nodes-upload.test.ts.)
 */
import { request as httpRequest, type IncomingMessage } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { BrowserSession, parseForm } from '../fixtures/browser-fetch'
import { UPLOAD_LOCK_NAMESPACE } from '@server/coordination/pg-upload-locker'
import {
  apiOf,
  createUpload,
  DEPOSITOR,
  startNodeCluster,
  waitFor,
  type NodeCluster,
} from '../fixtures/node-cluster'

const SIGN_IN_LIMIT = 8
let cluster: NodeCluster

beforeAll(async () => {
  cluster = await startNodeCluster({ RATE_LIMIT_SIGN_IN: String(SIGN_IN_LIMIT) })
}, 180_000)

afterAll(async () => {
  await cluster?.stop()
})

describe('two app nodes on one database and one bucket', () => {
  const api = (...args: Parameters<ReturnType<typeof apiOf>>) =>
    apiOf(cluster.depositorToken)(...args)
  const admin = (...args: Parameters<ReturnType<typeof apiOf>>) =>
    apiOf(cluster.adminToken)(...args)

  it('completes on node B a sign-in started on node A', async () => {
    const { a, b, entry } = cluster
    const browser = new BrowserSession()
    entry.target = a
    const { res: formPage, url } = await browser.follow(
      `${entry.url}/auth/login?returnTo=/datasets`,
    )
    expect(formPage.status).toBe(200)
    const form = parseForm(await formPage.text(), url)

    entry.target = b
    const { url: landed } = await browser.follow(form.action, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ login: DEPOSITOR.login, password: DEPOSITOR.password }),
    })
    expect(landed.pathname).toBe('/datasets')
    for (const node of [a, b]) {
      entry.target = node
      const me = (await (await browser.request(`${entry.url}/api/me`)).json()) as {
        user: { email: string } | null
      }
      expect(me.user?.email).toBe(DEPOSITOR.login)
    }
  })

  it('counts the sign-in rate limit once for both nodes', async () => {
    const { a, b, db } = cluster
    // The sign-in above counted too; start this window afresh.
    await db.query(`delete from coordination_rate_limit`)
    const statuses: number[] = []
    for (let i = 0; i < 2 * SIGN_IN_LIMIT; i++) {
      const node = i % 2 ? b : a
      statuses.push((await fetch(`${node.url}/auth/login`, { redirect: 'manual' })).status)
    }
    // Counted per node, twice the limit would pass.
    expect(statuses.slice(0, SIGN_IN_LIMIT).every((s) => s !== 429)).toBe(true)
    expect(statuses.slice(SIGN_IN_LIMIT).every((s) => s === 429)).toBe(true)
  })

  it('delivers a comment posted on node A to an event stream open on node B', async () => {
    const { a, b, accession, depositorToken } = cluster
    let text = ''
    const stream = await new Promise<IncomingMessage>((resolve, reject) =>
      httpRequest(`${b.url}/api/datasets/${accession}/events`, {
        agent: false,
        headers: { authorization: `Bearer ${depositorToken}` },
      })
        .on('response', resolve)
        .on('error', reject)
        .end(),
    )
    expect(stream.statusCode).toBe(200)
    stream.setEncoding('utf8')
    stream.on('data', (chunk: string) => (text += chunk))
    await waitFor('the stream to open', () => (text.includes('retry:') ? true : undefined))
    const posted = await api(a, `/api/datasets/${accession}/comments`, {
      method: 'POST',
      body: JSON.stringify({ body: 'Heard on the other node' }),
    })
    expect(posted.status).toBe(201)
    await waitFor('the comment on node B', () =>
      text.includes('Heard on the other node') ? true : undefined,
    )
    expect(text).toMatch(/event: comment\.created\ndata: .*Heard on the other node/)
    stream.destroy()
  })

  it('releases an embargo that ends while both nodes run exactly once, and mails it once', async () => {
    const { a, b, db } = cluster
    // An approved dataset whose embargo ends a moment from now; the next minute's tick of the
    // schedule runs on both nodes at the same second.
    const { rows } = await db.query<{ id: number; accession: string }>(
      `update dataset set embargo_until = now() + interval '2 seconds'
        where id = (select id from dataset where state = 'approved' order by id limit 1)
        returning id, accession`,
    )
    const released = rows[0]!
    const subject = `${released.accession} is now public: its embargo ended`
    const caught = async () => {
      const lists = await Promise.all(
        [a, b].map(async (node) => {
          const res = await admin(node, '/api/dev/mail')
          return ((await res.json()) as { items: { to: string[]; subject: string }[] }).items
        }),
      )
      return lists.flat().filter((m) => m.subject === subject)
    }
    const mails = await waitFor(
      'the release mail',
      async () => {
        const found = await caught()
        return found.length ? found : undefined
      },
      80_000,
    )
    // The mail goes out right after the release is recorded; give a second node time to err.
    await new Promise((r) => setTimeout(r, 3000))
    const all = await caught()
    expect(all).toHaveLength(mails.length)
    const recipients = all.flatMap((m) => m.to)
    expect(recipients.length).toBeGreaterThan(0)
    expect(new Set(recipients).size).toBe(recipients.length)
    const notices = await db.query(
      `select 1 from embargo_notice where dataset_id = $1 and kind = 'release'`,
      [released.id],
    )
    expect(notices.rowCount).toBe(1)
    const audits = await db.query(
      `select 1 from audit_event where action = 'dataset.release' and target_id = $1`,
      [released.accession],
    )
    expect(audits.rowCount).toBe(1)
  }, 100_000)

  // Last: node A does not come back.
  it('frees the upload lock node A held when A is killed in the middle of a PATCH', async () => {
    const { a, b, db, accession, depositorToken } = cluster
    const size = 4 * 1024 * 1024
    const path = await createUpload(a.url, depositorToken, accession, { name: 'held.bin', size })
    const uploadLocks = async () =>
      Number(
        (
          await db.query<{ n: string }>(
            `select count(*) as n from pg_locks
              where locktype = 'advisory' and classid = $1 and granted`,
            [UPLOAD_LOCK_NAMESPACE],
          )
        ).rows[0]!.n,
      )
    const stalled = httpRequest(`${a.url}${path}`, {
      method: 'PATCH',
      agent: false,
      headers: {
        'tus-resumable': '1.0.0',
        authorization: `Bearer ${depositorToken}`,
        'upload-offset': '0',
        'content-type': 'application/offset+octet-stream',
        'content-length': String(size),
      },
    })
    stalled.on('error', () => undefined)
    stalled.write(Buffer.alloc(1024 * 1024, 1))
    await waitFor('node A to hold the lock', async () =>
      (await uploadLocks()) === 1 ? true : undefined,
    )
    await a.kill()
    // No shutdown code ran: the database ended A's connection, and its locks with it.
    await waitFor('the lock to go with A', async () =>
      (await uploadLocks()) === 0 ? true : undefined,
    )
    expect((await fetch(`${b.url}/api/health`)).status).toBe(200)
  })
})
