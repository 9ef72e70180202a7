import { open, readdir, stat } from 'node:fs/promises'
import type http from 'node:http'
import type { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { FileStore } from '@tus/file-store'
import { ERRORS, type Upload } from '@tus/server'
import { FinishedUploads } from './finished-uploads'
import { UploadWriterThread } from './upload-writer-thread'

/**
 * The tus file store, hashing every byte as it is written, so the SHA-256 of a finished upload is
 * known without reading the file again. Writing and hashing happen in a thread of their own (so
 * they overlap the network work of the request thread); after a restart, or when another process
 * took part of the upload, an upload's hash is rebuilt once from the bytes already on disk.
 */
export class HashingFileStore extends FileStore {
  private readonly hashes = new UploadWriterThread()
  /** How far each running hash has got. */
  private readonly hashedTo = new Map<string, number>()
  readonly finished = new FinishedUploads()

  constructor(options: ConstructorParameters<typeof FileStore>[0]) {
    super(options)
    // Quota and registration need the size up front, so a deferred length is refused (400);
    // the OPTIONS answer must not offer it either.
    this.extensions = this.extensions.filter((e) => e !== 'creation-defer-length')
  }

  private resolvePath(id: string): string {
    return `${this.directory}/${id}`
  }

  private async hashFrom(id: string, offset: number): Promise<void> {
    if (this.hashedTo.get(id) === offset) return
    await this.hashes.rehash(id, this.resolvePath(id), offset)
    this.hashedTo.set(id, offset)
  }

  override async write(
    readable: http.IncomingMessage | Readable,
    id: string,
    offset: number,
  ): Promise<number> {
    await this.hashFrom(id, offset)
    const writer = this.hashes.writer(id, this.resolvePath(id), offset)
    try {
      await pipeline(readable, writer)
    } catch {
      // When only the request broke off, what reached the disk is hashed too (the thread does
      // both, in order), so the running hash is good for a resumption from there. After a failed
      // disk write it is rebuilt from the file next time.
      if (writer.failed) this.hashedTo.delete(id)
      else this.hashedTo.set(id, offset + writer.written)
      throw ERRORS.FILE_WRITE_ERROR
    }
    this.hashedTo.set(id, offset + writer.written)
    return offset + writer.written
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

  override getUpload(id: string): Promise<Upload> {
    return this.finished.read(id, () => super.getUpload(id))
  }

  forget(id: string): void {
    this.hashedTo.delete(id)
    void this.hashes.drop(id)
  }

  dropRecord(id: string): Promise<void> {
    return this.configstore.delete(id)
  }

  record(id: string): Promise<Upload | undefined> {
    return this.configstore.get(id).catch(() => undefined)
  }

  async *recordIds(): AsyncIterable<string> {
    for (const name of await readdir(this.directory))
      if (name.endsWith('.json')) yield name.slice(0, -'.json'.length)
  }

  close(): Promise<void> {
    return this.hashes.shutdown()
  }
}
