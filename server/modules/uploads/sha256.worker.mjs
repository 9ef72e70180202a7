// SHA-256 of uploads, computed in its own thread so hashing overlaps the network and disk work of
// the request thread. Messages for one upload arrive in order; each is acknowledged.
import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { parentPort } from 'node:worker_threads'

const hashes = new Map()

async function rehash(id, path, length) {
  const hash = createHash('sha256')
  if (length > 0) {
    for await (const chunk of createReadStream(path, { start: 0, end: length - 1, highWaterMark: 4 << 20 })) hash.update(chunk)
  }
  hashes.set(id, hash)
}

// One message at a time, in arrival order: updates must not overtake a rehash still reading.
let queue = Promise.resolve()
parentPort.on('message', (m) => {
  queue = queue.then(async () => {
    try {
      if (m.op === 'update') {
        hashes.get(m.id)?.update(new Uint8Array(m.data))
        parentPort.postMessage({ seq: m.seq, bytes: m.data.byteLength })
      } else if (m.op === 'rehash') {
        await rehash(m.id, m.path, m.length)
        parentPort.postMessage({ seq: m.seq })
      } else if (m.op === 'digest') {
        const hash = hashes.get(m.id)
        hashes.delete(m.id)
        parentPort.postMessage({ seq: m.seq, digest: hash ? hash.digest('hex') : null })
      } else if (m.op === 'drop') {
        hashes.delete(m.id)
        parentPort.postMessage({ seq: m.seq })
      }
    } catch (err) {
      parentPort.postMessage({ seq: m.seq, error: String(err?.message ?? err) })
    }
  })
})
