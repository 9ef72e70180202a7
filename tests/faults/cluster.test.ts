/**
 * Stipple with several HTTP worker processes (WEB_CONCURRENCY=2): the real server/main.ts, its
 * primary and workers as separate processes. Every request here opens a new connection, and
 * node:cluster hands new connections to the workers in turn, so consecutive requests land on
 * different processes. Whatever must hold for the whole server (sign-in state, upload locks, rate
 * limits, queued jobs, caught mail) is checked across that split, and so is a worker's death.
 */
import { execFile } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { request as httpRequest, type IncomingMessage } from 'node:http'
import { mkdtempSync, readdirSync, readFileSync, readlinkSync, rmSync } from 'node:fs'
import { connect, createServer, type Socket } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import { Agent, fetch as undiciFetch } from 'undici'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { BrowserSession, parseForm } from '../fixtures/browser-fetch'
import { freePort, ServerProcess } from '../fixtures/server-process'

const run = promisify(execFile)
const SIGN_IN_LIMIT = 8
const DEPOSITOR = { login: 'kasimir.feld@harrowgate.example', password: 'demo-depositor-pass' }
const ADMIN = 'imre.castellan@quillon.example'
const COLLABORATOR = 'priya.vantongeren@elsewhere.example'

// One request per connection: the connection closes after its answer.
const oneShot = new Agent({ maxRequestsPerClient: 1 })
const freshFetch = ((input: string | URL, init?: RequestInit) =>
  undiciFetch(input, { ...(init as object), dispatcher: oneShot })) as unknown as typeof fetch

let dir: string
let server: ServerProcess
let depositorToken: string
let adminToken: string
let accession: string

async function tokenFor(email: string) {
  const { stdout } = await run(
    process.execPath,
    ['--import', 'tsx', 'server/cli/admin.ts', 'token', 'create', email],
    { env: { ...process.env, DATA_DIR: join(dir, 'data') } },
  )
  return stdout.trim().split('\n').at(-1)!
}

const api = async (path: string, token: string, init: RequestInit = {}) => {
  const headers = new Headers(init.headers)
  headers.set('authorization', `Bearer ${token}`)
  if (init.body) headers.set('content-type', 'application/json')
  return freshFetch(`${server.url}${path}`, { ...init, headers })
}

/** The primary's children, read from /proc (Linux). */
function workerPids(): number[] {
  const pid = server.child!.pid!
  return readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8')
    .split(' ')
    .filter(Boolean)
    .map(Number)
}

/**
 * Which worker holds the server's end of a connection from local port `clientPort`: the socket's
 * inode from /proc/net/tcp, looked up among each worker's open files (Linux).
 */
function workerServing(clientPort: number): number | undefined {
  const hex = (n: number) => n.toString(16).toUpperCase().padStart(4, '0')
  const inode = ['/proc/net/tcp', '/proc/net/tcp6']
    .flatMap((table) => readFileSync(table, 'utf8').split('\n').slice(1))
    .map((line) => line.trim().split(/\s+/))
    .find(
      (f) => f[1]?.endsWith(`:${hex(server.port)}`) && f[2]?.endsWith(`:${hex(clientPort)}`),
    )?.[9]
  if (!inode) return undefined
  return workerPids().find((pid) =>
    readdirSync(`/proc/${pid}/fd`).some((fd) => {
      try {
        return readlinkSync(`/proc/${pid}/fd/${fd}`) === `socket:[${inode}]`
      } catch {
        return false
      }
    }),
  )
}

/** A connection that a worker other than `otherThan` serves (new ones until one is). */
async function connectionAvoiding(otherThan: number): Promise<{ socket: Socket; pid: number }> {
  for (let i = 0; i < 10; i++) {
    const socket = connect(server.port, '127.0.0.1')
    await new Promise((r) => socket.once('connect', r))
    const pid = await waitFor('the connection to reach a worker', () =>
      workerServing(socket.localPort!),
    )
    if (pid !== otherThan) return { socket, pid }
    socket.destroy()
  }
  throw new Error('every connection went to the same worker')
}

async function waitFor<T>(what: string, probe: () => Promise<T | undefined> | T | undefined) {
  const end = Date.now() + 30_000
  for (;;) {
    const value = await probe()
    if (value !== undefined) return value
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 100))
  }
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'stipple-cluster-'))
  server = new ServerProcess(await freePort(), {
    DATA_DIR: join(dir, 'data'),
    DEMO: 'true',
    WEB_CONCURRENCY: '2',
    RATE_LIMIT_SIGN_IN: String(SIGN_IN_LIMIT),
  })
  await server.start()
  depositorToken = await tokenFor(DEPOSITOR.login)
  adminToken = await tokenFor(ADMIN)
  const projects = (await (await api('/api/projects', depositorToken)).json()) as {
    items: { id: number }[]
  }
  const created = await api('/api/datasets', depositorToken, {
    method: 'POST',
    body: JSON.stringify({
      projectId: projects.items[0]!.id,
      title: 'Cluster check',
      description: 'Made by the multi-process test.',
    }),
  })
  expect(created.status).toBe(201)
  accession = ((await created.json()) as { accession: string }).accession
}, 120_000)

afterAll(async () => {
  await server?.stop()
  rmSync(dir, { recursive: true, force: true })
})

describe('Stipple with two HTTP worker processes', () => {
  it('runs a primary and two workers', () => {
    expect(workerPids()).toHaveLength(2)
  })

  it('signs in through the local provider with every hop on a new connection', async () => {
    const jar = new BrowserSession(freshFetch)
    const { res: formPage, url } = await jar.follow(`${server.url}/auth/login?returnTo=/datasets`)
    expect(formPage.status).toBe(200)
    const form = parseForm(await formPage.text(), url)
    const { url: landed } = await jar.follow(form.action, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ login: DEPOSITOR.login, password: DEPOSITOR.password }),
    })
    expect(landed.pathname).toBe('/datasets')
    // Both workers know the session: it lives in the database, not in a process.
    for (let i = 0; i < 4; i++) {
      const me = (await (await jar.request(`${server.url}/api/me`)).json()) as {
        user: { email: string } | null
      }
      expect(me.user?.email).toBe(DEPOSITOR.login)
    }
  })

  it('keeps one upload locked across workers: a second request takes it over, the first writes no more', async () => {
    const data = randomBytes(3 * 1024 * 1024)
    const half = 1024 * 1024
    const meta = (v: string) => Buffer.from(v).toString('base64')
    const tus = { 'tus-resumable': '1.0.0', authorization: `Bearer ${depositorToken}` }
    const created = await freshFetch(`${server.url}/api/uploads`, {
      method: 'POST',
      headers: {
        ...tus,
        'upload-length': String(data.length),
        'upload-metadata': `dataset ${meta(accession)},filename ${meta('locked.bin')}`,
      },
    })
    expect(created.status).toBe(201)
    const location = new URL(created.headers.get('location')!, server.url)

    // A: a PATCH that sends the first MiB and then stalls, holding the upload's lock.
    let answered: IncomingMessage | null = null
    const first = httpRequest(location, {
      method: 'PATCH',
      agent: false,
      headers: {
        ...tus,
        'upload-offset': '0',
        'content-type': 'application/offset+octet-stream',
        'content-length': String(data.length),
      },
    })
    first.on('response', (res) => ((answered = res), res.resume()))
    first.on('error', () => undefined) // the server may cut it off
    first.write(data.subarray(0, half))
    const socketA = await new Promise<Socket>((r) => first.once('socket', r))
    if (socketA.connecting) await new Promise((r) => socketA.once('connect', r))
    const workerA = await waitFor('A to reach a worker', () => workerServing(socketA.localPort!))
    await new Promise((r) => setTimeout(r, 300))

    // B, on the other worker: HEAD has to take the lock, so A is asked to let go first.
    const { socket: socketB, pid: workerB } = await connectionAvoiding(workerA)
    expect(workerB).not.toBe(workerA)
    const head = await new Promise<IncomingMessage>((resolve, reject) =>
      httpRequest(location, { method: 'HEAD', headers: tus, createConnection: () => socketB })
        .on('response', resolve)
        .on('error', reject)
        .end(),
    )
    socketB.destroy()
    expect(head.statusCode).toBe(200)
    const offset = Number(head.headers['upload-offset'])
    expect(offset).toBe(half)
    await waitFor('the first PATCH to be answered', () => answered ?? undefined)

    // A's late bytes must not reach the file: B finishes the upload from the offset it was given.
    first.write(Buffer.alloc(half, 0xff))
    const rest = await freshFetch(location, {
      method: 'PATCH',
      headers: {
        ...tus,
        'upload-offset': String(offset),
        'content-type': 'application/offset+octet-stream',
      },
      body: data.subarray(offset),
    })
    // A rare 500 here was seen once; its answer and the server's log then say why.
    expect(rest.status, `${await rest.text()}\n--- server output ---\n${server.output}`).toBe(204)
    first.destroy()
    const fileId = rest.headers.get('stipple-file-id')
    const files = (await (
      await api(`/api/datasets/${accession}/files`, depositorToken)
    ).json()) as {
      items: { id: number; sha256: string; size: number }[]
    }
    const file = files.items.find((f) => String(f.id) === fileId)
    expect(file).toMatchObject({
      size: data.length,
      sha256: createHash('sha256').update(data).digest('hex'),
    })
  })

  it('runs a queued job in the primary, started by an upload on a worker', async () => {
    const table = 'frame,x [nm],y [nm],photons\n1,100.5,200.25,1500\n2,110,210,1400\n'
    const meta = (v: string) => Buffer.from(v).toString('base64')
    const res = await freshFetch(`${server.url}/api/uploads`, {
      method: 'POST',
      headers: {
        'tus-resumable': '1.0.0',
        authorization: `Bearer ${depositorToken}`,
        'upload-length': String(table.length),
        'upload-metadata': `dataset ${meta(accession)},filename ${meta('spots.csv')}`,
        'content-type': 'application/offset+octet-stream',
      },
      body: table,
    })
    expect(res.status).toBe(201)
    const id = res.headers.get('stipple-file-id')
    const file = await waitFor('the table to be processed', async () => {
      const files = (await (
        await api(`/api/datasets/${accession}/files`, depositorToken)
      ).json()) as { items: { id: number; status: string; kind: string }[] }
      const f = files.items.find((x) => String(x.id) === id)
      return f && f.status !== 'processing' ? f : undefined
    })
    expect(file).toMatchObject({ kind: 'localization_table', status: 'ready' })
  })

  it('sends mail through the primary’s catcher and shows it on every worker', async () => {
    const shared = await api(`/api/datasets/${accession}/shares`, depositorToken, {
      method: 'POST',
      body: JSON.stringify({ email: COLLABORATOR, capabilities: ['preview'] }),
    })
    expect(shared.status).toBe(201)
    for (let i = 0; i < 2; i++) {
      const mail = await waitFor('the share mail', async () => {
        const body = (await (await api('/api/dev/mail', adminToken)).json()) as {
          items: { to: string[]; subject: string }[]
        }
        return body.items.find((m) => m.to.includes(COLLABORATOR))
      })
      expect(mail.subject).toBeTruthy()
    }
  })

  it('counts the sign-in rate limit once for the whole server, not per worker', async () => {
    // The sign-in above used two of this minute's SIGN_IN_LIMIT (/auth/login and /auth/callback
    // share one limit). Counted per worker, twice the limit would pass.
    const statuses: number[] = []
    for (let i = 0; i < 2 * SIGN_IN_LIMIT; i++)
      statuses.push((await freshFetch(`${server.url}/auth/login`, { redirect: 'manual' })).status)
    expect(statuses.filter((s) => s !== 429)).toHaveLength(SIGN_IN_LIMIT - 2)
    expect(statuses.slice(SIGN_IN_LIMIT - 2).every((s) => s === 429)).toBe(true)
  })

  it('delivers a new comment to event streams open on every worker', async () => {
    type Stream = { text: string; pid: number; close(): void }
    const openStream = () =>
      new Promise<Stream>((resolve, reject) => {
        const req = httpRequest(
          `${server.url}/api/datasets/${accession}/events`,
          { agent: false, headers: { authorization: `Bearer ${depositorToken}` } },
          (res: IncomingMessage) => {
            expect(res.statusCode).toBe(200)
            const stream: Stream = { text: '', pid: 0, close: () => req.destroy() }
            res.setEncoding('utf8')
            res.on('data', (chunk: string) => (stream.text += chunk))
            void waitFor('the stream to reach a worker', () =>
              workerServing(res.socket.localPort!),
            ).then((pid) => resolve(Object.assign(stream, { pid })), reject)
          },
        )
        req.on('error', reject)
        req.end()
      })
    const streams: Stream[] = [await openStream()]
    while (streams.length < 6 && new Set(streams.map((s) => s.pid)).size < 2)
      streams.push(await openStream())
    expect(new Set(streams.map((s) => s.pid)).size).toBe(2)
    const posted = await api(`/api/datasets/${accession}/comments`, depositorToken, {
      method: 'POST',
      body: JSON.stringify({ body: 'Heard on every worker' }),
    })
    expect(posted.status).toBe(201)
    for (const stream of streams)
      await waitFor('the comment on every stream', () =>
        stream.text.includes('Heard on every worker') ? true : undefined,
      )
    for (const stream of streams) stream.close()
  })

  it('replaces a worker that dies, and the other answers meanwhile', async () => {
    const [victim, survivor] = workerPids()
    process.kill(victim!, 'SIGKILL')
    // Once the primary has reaped it, no new connection goes to the dead worker.
    await waitFor('the primary to notice', () =>
      workerPids().includes(victim!) ? undefined : true,
    )
    for (let i = 0; i < 6; i++)
      expect((await freshFetch(`${server.url}/api/health`)).status).toBe(200)
    const pids = await waitFor('a replacement worker', () => {
      const now = workerPids()
      return now.length === 2 ? now : undefined
    })
    expect(pids).toContain(survivor)
    expect(pids).not.toContain(victim)
    await waitFor('the replacement to answer', async () => {
      const answers = await Promise.all(
        [0, 1, 2, 3].map(() => freshFetch(`${server.url}/api/health`).then((r) => r.status)),
      )
      return answers.every((s) => s === 200) ? true : undefined
    })
  })

  it('stops cleanly on SIGTERM: primary and workers exit', async () => {
    const pids = workerPids()
    const exit = new Promise<number | null>((resolve) => server.child!.once('exit', resolve))
    server.child!.kill('SIGTERM')
    expect(await exit).toBe(0)
    for (const pid of pids) expect(() => process.kill(pid, 0)).toThrow()
  })
})

describe('a multi-process Stipple that cannot start', () => {
  it('exits with a clear error when its port is taken', async () => {
    const taken = createServer()
    const port = await freePort()
    await new Promise<void>((r) => taken.listen(port, '127.0.0.1', r))
    const blocked = new ServerProcess(port, {
      DATA_DIR: join(dir, 'blocked'),
      DEMO: 'false',
      WEB_CONCURRENCY: '2',
    })
    try {
      await expect(blocked.start()).rejects.toThrow(/EADDRINUSE[\s\S]*could not start/)
    } finally {
      taken.close()
    }
  })
})
