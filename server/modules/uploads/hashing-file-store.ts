import { createWriteStream } from 'node:fs'
import { open, stat } from 'node:fs/promises'
import type http from 'node:http'
import { Transform, type Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { FileStore } from '@tus/file-store'
import { ERRORS } from '@tus/server'
import { HashThread } from './hash-thread'

const IO_CHUNK = 4 * 1024 * 1024

/**
 * The tus file store, hashing every byte as it is written, so the SHA-256 of a finished upload is
 * known without reading the file again. The running hashes live in a thread of their own (so the
 * hash overlaps network and disk work); after a restart, or when another process took part of the
 * upload, an upload's hash is rebuilt once from the bytes already on disk.
 */
export class HashingFileStore extends FileStore {
  private readonly hashes = new HashThread()
  /** How far each running hash has got. */
  private readonly hashedTo = new Map<string, number>()

  private resolvePath(id: string): string {
    return `${this.directory}/${id}`
  }

  private async hashFrom(id: string, offset: number): Promise<void> {
    if (this.hashedTo.get(id) === offset) return
    await this.hashes.rehash(id, this.resolvePath(id), offset)
    this.hashedTo.set(id, offset)
  }

  override async write(readable: http.IncomingMessage | Readable, id: string, offset: number): Promise<number> {
    await this.hashFrom(id, offset)
    const hashes = this.hashes
    let received = 0
    const tee = new Transform({
      transform(chunk: Buffer, _encoding, callback) {
        received += chunk.length
        hashes.update(id, chunk).then(() => callback(null, chunk), callback)
      },
    })
    const out = createWriteStream(this.resolvePath(id), { flags: 'r+', start: offset, highWaterMark: IO_CHUNK })
    try {
      await pipeline(readable, tee, out)
      hashes.flush(id)
    } catch {
      // What reached the disk may be less than what was hashed: rebuild from the file next time.
      this.hashedTo.delete(id)
      void hashes.drop(id)
      throw ERRORS.FILE_WRITE_ERROR
    }
    this.hashedTo.set(id, offset + received)
    return offset + received
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
    await this.hashFrom(id, size)
    this.hashedTo.delete(id)
    const sha256 = await this.hashes.digest(id)
    if (!sha256) throw new Error(`No running hash for upload ${id}`)
    return { sha256, size }
  }

  forget(id: string): void {
    this.hashedTo.delete(id)
    void this.hashes.drop(id)
  }

  close(): Promise<void> {
    return this.hashes.close()
  }
}
