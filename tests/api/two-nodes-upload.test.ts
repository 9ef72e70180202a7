/**
 * Two app nodes of the cluster profile (see two-nodes.test.ts): an upload begun on node A goes on
 * on node B after A is killed with SIGKILL in the middle of a PATCH, and the file stored at the end
 * has the source's SHA-256. Node A's upload lock goes with its database connection; the bytes
 * it received must be in the shared bucket for B to go on from them, and the file is registered
 * once, from the bucket.
 */
import { createHash, randomBytes } from 'node:crypto'
import { readdirSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  apiOf,
  createUpload,
  patchUpload,
  startNodeCluster,
  waitFor,
  type NodeCluster,
} from '../fixtures/node-cluster'

let cluster: NodeCluster

beforeAll(async () => {
  cluster = await startNodeCluster()
}, 180_000)

afterAll(async () => {
  await cluster?.stop()
})

describe('an upload across two app nodes', () => {
  it('goes on with an upload on node B after node A is killed mid-upload, and stores the same SHA-256', async () => {
    const { a, b, accession, depositorToken } = cluster
    const data = randomBytes(12 * 1024 * 1024)
    const half = 6 * 1024 * 1024
    const tus = { 'tus-resumable': '1.0.0', authorization: `Bearer ${depositorToken}` }
    const path = await createUpload(a.url, depositorToken, accession, {
      name: 'both-nodes.bin',
      size: data.length,
    })

    // Node A takes the first half and then dies in the middle of the second PATCH, holding the
    // upload's lock: no shutdown code runs, the lock goes with its database connection.
    const first = await patchUpload(`${a.url}${path}`, depositorToken, 0, data.subarray(0, half))
    expect(first.status).toBe(204)
    const stalled = httpRequest(`${a.url}${path}`, {
      method: 'PATCH',
      agent: false,
      headers: {
        ...tus,
        'upload-offset': String(half),
        'content-type': 'application/offset+octet-stream',
        'content-length': String(data.length - half),
      },
    })
    stalled.on('error', () => undefined)
    stalled.write(data.subarray(half, half + 1024 * 1024))
    await new Promise((r) => setTimeout(r, 500))
    await a.kill()

    // Node B knows the upload only if its record and bytes are in the shared bucket.
    let answered = 0
    const head = await waitFor(
      'node B to answer for the upload',
      async () => {
        const res = await fetch(`${b.url}${path}`, { method: 'HEAD', headers: tus })
        answered = res.status
        return res.status === 200 ? res : undefined
      },
      15_000,
    ).catch((err: Error) => {
      throw new Error(`${err.message} (its last answer: ${answered})`)
    })
    const offset = Number(head.headers.get('upload-offset'))
    expect(offset).toBeGreaterThanOrEqual(half)
    expect(offset).toBeLessThan(data.length)
    const rest = await patchUpload(`${b.url}${path}`, depositorToken, offset, data.subarray(offset))
    expect(rest.status, `${await rest.text()}\n--- node B ---\n${b.output}`).toBe(204)
    const fileId = rest.headers.get('stipple-file-id')
    const files = (await (
      await apiOf(depositorToken)(b, `/api/datasets/${accession}/files`)
    ).json()) as { items: { id: number; sha256: string; size: number }[] }
    expect(files.items.find((f) => String(f.id) === fileId)).toMatchObject({
      size: data.length,
      sha256: createHash('sha256').update(data).digest('hex'),
    })
    // Registered once, and the bytes are in the bucket, not on either node's disk.
    const rows = await cluster.db.query(`select id from dataset_file where name = 'both-nodes.bin'`)
    expect(rows.rowCount).toBe(1)
    for (const node of [a, b])
      for (const dir of ['uploads', 'files'])
        expect(readdirSync(join(node.dataDir, dir), { recursive: true })).toEqual([])
  }, 60_000)
})
