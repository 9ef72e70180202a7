import { createHash, type Hash } from 'node:crypto'
import { createReadStream, createWriteStream } from 'node:fs'
import { open, stat } from 'node:fs/promises'
import type http from 'node:http'
import { Transform, type Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { FileStore } from '@tus/file-store'
import { ERRORS } from '@tus/server'

interface HashState {
  hash: Hash
  offset: number
}

const IO_CHUNK = 4 * 1024 * 1024

/**
 * The tus file store, hashing every byte as it is written, so the SHA-256 of a finished upload is
 * known without reading the file again. The running hash lives in memory; after a restart (or when
 * another process took part of the upload) it is rebuilt once from the bytes already on disk.
 */
export class HashingFileStore extends FileStore {
  private readonly states = new Map<string, HashState>()

  private async stateAt(id: string, offset: number): Promise<HashState> {
    const known = this.states.get(id)
    if (known && known.offset === offset) return known
    const hash = createHash('sha256')
    if (offset > 0) {
      await pipeline(createReadStream(this.resolvePath(id), { start: 0, end: offset - 1, highWaterMark: IO_CHUNK }), async function* (source) {
        for await (const chunk of source as AsyncIterable<Buffer>) hash.update(chunk)
      })
    }
    const state = { hash, offset }
    this.states.set(id, state)
    return state
  }

  private resolvePath(id: string): string {
    return `${this.directory}/${id}`
  }

  override async write(readable: http.IncomingMessage | Readable, id: string, offset: number): Promise<number> {
    const state = await this.stateAt(id, offset)
    let received = 0
    const tee = new Transform({
      transform(chunk: Buffer, _encoding, callback) {
        state.hash.update(chunk)
        received += chunk.length
        callback(null, chunk)
      },
    })
    const out = createWriteStream(this.resolvePath(id), { flags: 'r+', start: offset, highWaterMark: IO_CHUNK })
    try {
      await pipeline(readable, tee, out)
    } catch {
      // What reached the disk may be less than what was hashed: rebuild from the file next time.
      this.states.delete(id)
      throw ERRORS.FILE_WRITE_ERROR
    }
    state.offset = offset + received
    return state.offset
  }

  /**
   * The SHA-256 (hex) and size of a finished upload; hashes the file if the running state is gone.
   * The bytes are flushed to the disk first, so a registered file survives a power cut too.
   */
  async finish(id: string): Promise<{ sha256: string; size: number }> {
    const handle = await open(this.resolvePath(id), 'r+')
    try {
      await handle.datasync()
    } finally {
      await handle.close()
    }
    const { size } = await stat(this.resolvePath(id))
    const state = await this.stateAt(id, size)
    this.states.delete(id)
    return { sha256: state.hash.digest('hex'), size }
  }

  forget(id: string): void {
    this.states.delete(id)
  }
}
