import type { Upload } from '@tus/server'

/**
 * Uploads registered in the request still being answered: their tus record is gone, but a
 * creation-with-upload POST reads the upload once more after the finish hook (to decide on
 * Upload-Expires), so the store answers from memory until the response is out.
 */
export class FinishedUploads {
  private readonly byId = new Map<string, Upload>()

  remember(upload: Upload): void {
    this.byId.set(upload.id, upload)
  }

  forget(id: string): void {
    this.byId.delete(id)
  }

  /** The store's own answer, or the remembered upload when the store no longer knows it. */
  async read(id: string, fromStore: () => Promise<Upload>): Promise<Upload> {
    try {
      return await fromStore()
    } catch (err) {
      const done = this.byId.get(id)
      if (done) return done
      throw err
    }
  }
}
