// Writes upload bytes to their files and keeps each upload's running SHA-256, in a thread of its
// own: the request thread only gathers the network's small packets into blocks of a few MB in a
// pool of memory both threads share, and names the block to write. Messages are handled one at a
// time, in arrival order, so the bytes on disk are always a prefix of the upload and the hash
// covers exactly that prefix.
import { createHash } from 'node:crypto'
import { closeSync, createReadStream, openSync, write as writeAsync } from 'node:fs'
import { promisify } from 'node:util'
import { parentPort } from 'node:worker_threads'

/** Running state per upload id: its hash, and the file while a request is writing to it. */
const uploads = new Map()
/** The shared block pool (a SharedArrayBuffer), as the request thread last announced it. */
let pool = null

async function rehash(id, path, length) {
  const hash = createHash('sha256')
  if (length > 0) {
    for await (const chunk of createReadStream(path, {
      start: 0,
      end: length - 1,
      highWaterMark: 4 << 20,
    }))
      hash.update(chunk)
  }
  closeFile(id)
  uploads.set(id, { hash, fd: null })
}

function closeFile(id) {
  const upload = uploads.get(id)
  if (upload?.fd != null) closeSync(upload.fd)
  if (upload) upload.fd = null
}

const pwrite = promisify(writeAsync)

async function writeAll(fd, bytes, position) {
  for (let done = 0; done < bytes.length;)
    done += await pwrite(fd, bytes, done, bytes.length - done, position + done)
}

/** The block goes to disk (on libuv's I/O thread) while this thread hashes it. */
async function write(m) {
  const upload = uploads.get(m.id)
  if (!upload) throw new Error(`no running hash for upload ${m.id}`)
  if (upload.fd == null) upload.fd = openSync(m.path, 'r+')
  const bytes = new Uint8Array(pool, m.offset, m.length)
  const written = writeAll(upload.fd, bytes, m.position)
  upload.hash.update(bytes)
  await written
}

const handlers = {
  pool: (m) => {
    pool = m.buffer
  },
  rehash: (m) => rehash(m.id, m.path, m.length),
  write,
  close: (m) => closeFile(m.id),
  digest: (m) => {
    closeFile(m.id)
    const upload = uploads.get(m.id)
    uploads.delete(m.id)
    return { digest: upload ? upload.hash.digest('hex') : null }
  },
  drop: (m) => {
    closeFile(m.id)
    uploads.delete(m.id)
  },
}

let queue = Promise.resolve()
parentPort.on('message', (m) => {
  queue = queue.then(async () => {
    const bytes = m.op === 'write' ? m.length : undefined
    try {
      const reply = (await handlers[m.op](m)) ?? {}
      parentPort.postMessage({ seq: m.seq, bytes, ...reply })
    } catch (err) {
      // A failed write leaves the file and the hash out of step: the next request rehashes.
      closeFile(m.id)
      uploads.delete(m.id)
      parentPort.postMessage({ seq: m.seq, bytes, error: String(err?.message ?? err) })
    }
  })
})
