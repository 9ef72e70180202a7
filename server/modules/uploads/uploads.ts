import type { IncomingMessage } from 'node:http'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { Server, Upload, type Locker } from '@tus/server'
import type { ErrorRequestHandler, Request, RequestHandler } from 'express'
import type { Orm } from '../../db'
import type { AppConfig } from '../../config'
import type { Logger } from '../../logger'
import type { LocalStorage } from '../../storage/local-storage'
import { audit } from '../audit/audit.service'
import { DatasetFile } from '../files/dataset-file.entity'
import { registerUpload, storageKeyFor } from '../files/file-registry.service'
import { handleWithNodeBody } from './node-body'
import { uploadBytesOf } from './upload-bytes'
import { createUploadDatastore, type HashingUploadStore } from './upload-datastore'
import { refuse } from './upload-errors'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'
import {
  checkQuota,
  targetRefusal,
  uploaderAbility,
  uploadName,
  uploadTarget,
} from './upload-policy'
import { UploadReservation } from './upload-reservation.entity'
import { isDependencyUnavailable } from './upload-unavailable'

export const UPLOADS_PATH = '/api/uploads'

/**
 * The answer while the database or the bucket cannot be reached: 503, which tus clients retry.
 * A HEAD gets 423 instead: tus-js-client (the reference client, and ours) takes any other failed
 * HEAD as "this upload is gone" and starts the file again from its first byte as a new upload;
 * 423 is the one failure it retries, resuming from the offset the next HEAD gives.
 */
function unavailable(method: string) {
  return refuse(
    method === 'HEAD' ? 423 : 503,
    'Try again',
    'The storage or the database is not reachable at the moment; the upload can resume when it is back.',
  )
}

/** tus hooks get a web Request; ours (with user and abilities) rides along as the Node request. */
function expressRequest(req: globalThis.Request): Request {
  const node = (req as unknown as { runtime?: { node?: { req?: IncomingMessage } } }).runtime?.node
    ?.req
  if (!node) throw refuse(500, 'Upload failed', 'The upload request lost its context.')
  return node as Request
}

export interface Uploads {
  handler: RequestHandler
  /** Mounted after the handler: a request the database could not authenticate may retry too. */
  unavailable: ErrorRequestHandler
  store: HashingUploadStore
  /** Deletes unfinished uploads older than the expiry, freeing their space and quota. */
  expire(): Promise<number>
  /** Completes registrations a crash interrupted (finished uploads not yet registered). */
  reconcile(): Promise<number>
  close(): Promise<void>
}

/**
 * Resumable uploads (tus 1.0.0 with creation, termination and expiration) at /api/uploads. Every
 * request is authorised against the target dataset's abilities; a finished upload becomes a
 * dataset file in the same request (registerUpload), and its heavy processing is queued.
 */
export function createUploads(deps: {
  orm: Orm
  config: AppConfig
  logger: Logger
  storage: LocalStorage
  onRegistered?: () => void
  /** Where upload locks live; tus's in-process MemoryLocker unless several processes serve HTTP. */
  locker?: Locker
}): Uploads {
  const { orm, config, storage } = deps
  // Files under DATA_DIR/uploads, or (S3 profile) the bucket, where any node can go on with them.
  const store = createUploadDatastore({
    storage: config.storage,
    uploadsDir: storage.uploadsDir,
    expiryMs: config.uploads.expiryMs,
  })
  const bytes = uploadBytesOf(storage)
  const em = () => orm.em.fork() as EntityManager
  // The reservation is made before the store creates the upload (the quota must refuse first);
  // a creation the store could not make (the bucket away) must not hold quota until expiry.
  const create = store.create.bind(store)
  store.create = async (upload) => {
    try {
      return await create(upload)
    } catch (err) {
      await em()
        .nativeDelete(UploadReservation, { uploadId: upload.id })
        .catch(() => undefined)
      throw err
    }
  }

  /** Drops an upload's bytes, its tus record and its quota reservation. */
  async function discard(id: string) {
    store.forget(id)
    await store.remove(id).catch(() => undefined)
    await em().nativeDelete(UploadReservation, { uploadId: id })
  }

  /**
   * Every request on an existing upload: it must be the requester's, and its dataset must still
   * take files from them (`edit`, which ends at submission). An upload whose dataset is gone or
   * left the editable states can never be registered: its bytes go at once.
   */
  async function authorisedUpload(req: Request, id: string): Promise<Upload> {
    // Only "no such upload" is one; the store being away is not (503, passed on).
    const upload = await store.getUpload(id).catch((err: { status_code?: number }) => {
      if (err.status_code === 404) return null
      throw err
    })
    if (!upload || Number(upload.metadata?.userId) !== req.user?.id)
      throw refuse(404, 'Not found', 'No such upload of yours.')
    const refusal = await targetRefusal(em(), req.ability, Number(upload.metadata?.datasetId))
    if (refusal) {
      await discard(id)
      throw refusal
    }
    return upload
  }

  const tus = new Server({
    path: UPLOADS_PATH,
    datastore: store,
    locker: deps.locker,
    relativeLocation: true,
    respectForwardedHeaders: config.trustProxy > 0,
    maxSize: config.uploads.maxBytes,
    // Errors that are not refusals of ours or tus's own (a database or disk fault) are logged and
    // answered in words; their message may hold SQL or paths and never reaches the client. The
    // database or the bucket being away is a 503 (the store's own included): clients retry it.
    onResponseError: (req, err) => {
      const status = (err as { status_code?: number }).status_code
      if (status === 503 || (!status && isDependencyUnavailable(err))) {
        deps.logger.info({ err }, 'upload paused: storage or database unreachable')
        return unavailable(req.method)
      }
      if (status) return undefined
      deps.logger.error({ err }, 'upload request failed')
      return refuse(500, 'Upload failed', 'The server could not store this upload; try again.')
    },
    onIncomingRequest: async (req, id) => {
      if (req.method === 'POST' || req.method === 'OPTIONS') return
      await authorisedUpload(expressRequest(req), id)
    },
    onUploadCreate: async (req, upload) => {
      const r = expressRequest(req)
      const m = em()
      const dataset = await uploadTarget(m, r, upload.metadata?.dataset)
      const filename = uploadName(upload.metadata?.filename)
      if (upload.size === undefined)
        throw refuse(
          400,
          'Unknown size',
          'Declare the file size when the upload starts (Upload-Length).',
        )
      await checkQuota(m, config, dataset, upload.size)
      m.create(UploadReservation, {
        uploadId: upload.id,
        project: dataset.project,
        dataset: dataset.id,
        user: r.user!.id,
        fileName: filename,
        size: upload.size,
      })
      await m.flush()
      return {
        metadata: {
          ...upload.metadata,
          filename,
          datasetId: String(dataset.id),
          userId: String(r.user!.id),
        },
      }
    },
    onUploadFinish: async (req, upload) => {
      const r = expressRequest(req)
      // The dataset may have been submitted or deleted while the last bytes arrived.
      const refusal = await targetRefusal(em(), r.ability, Number(upload.metadata?.datasetId))
      if (refusal) {
        await discard(upload.id)
        throw refusal
      }
      const { sha256, size } = await store.finish(upload.id)
      const file = await registerUpload(em(), storage, {
        upload,
        sha256,
        size,
        userId: r.user!.id,
        ip: r.ip ?? null,
      }).catch(async (err: unknown) => {
        // Refused, the upload is over. A fault (database, disk) keeps the tus record, so the
        // start-up repair registers the bytes later: nothing received is lost.
        if ((err as { status_code?: number }).status_code) await store.dropRecord(upload.id)
        throw err
      })
      await store.dropRecord(upload.id)
      deps.onRegistered?.()
      // A creation-with-upload POST reads the upload once more after this hook, to decide on
      // Upload-Expires; the record is gone by then, so the store answers from memory until the
      // response is out.
      store.finished.remember(new Upload({ ...upload, offset: size }))
      r.res?.once('close', () => store.finished.forget(upload.id))
      return {
        headers: { 'Stipple-File-Id': file.id, 'Stipple-File-Name': encodeURIComponent(file.name) },
      }
    },
  })

  // Cancelling (tus termination) frees the reservation too.
  tus.on('POST_TERMINATE', (_req, _res, id: string) => {
    store.forget(id)
    void em().nativeDelete(UploadReservation, { uploadId: id })
  })

  const handle = handleWithNodeBody(tus)

  return {
    store,
    unavailable: (err, req, res, next) => {
      if (!isDependencyUnavailable(err) || res.headersSent) return next(err)
      deps.logger.info({ err }, 'upload paused: storage or database unreachable')
      const { status_code, body } = unavailable(req.method)
      res.status(status_code).type(PROBLEM_CONTENT_TYPE).set('tus-resumable', '1.0.0').send(body)
    },
    handler: (req, res) => {
      // The tus server ends responses with res.end(callback); express-session's wrapper of res.end
      // takes (chunk, encoding) and would write the callback as data. Hand it a bare end() instead.
      const end = res.end.bind(res) as (...args: unknown[]) => typeof res
      res.end = ((...args: unknown[]) => {
        const [first] = args
        if (typeof first !== 'function') return end(...args)
        res.once('finish', first as () => void)
        return end()
      }) as typeof res.end
      void handle(req, res)
    },
    async expire() {
      const removed = await store.deleteExpired()
      const cutoff = new Date(Date.now() - config.uploads.expiryMs)
      const m = em()
      const stale = await m.find(UploadReservation, { createdAt: { $lt: cutoff } })
      for (const s of stale)
        audit(m, null, {
          action: 'upload.expire',
          targetType: 'Dataset',
          targetId: s.dataset,
          details: { file: s.fileName },
        })
      await m.nativeDelete(UploadReservation, { createdAt: { $lt: cutoff } })
      await m.flush()
      return removed
    },
    close: () => store.close(),
    async reconcile() {
      let done = 0
      for await (const id of store.recordIds()) {
        // The record, not getUpload() alone: once the bytes were moved the tus file is gone.
        const record = await store.record(id)
        const upload = record ? await store.getUpload(id).catch(() => record) : null
        const datasetId = Number(upload?.metadata?.datasetId)
        const userId = Number(upload?.metadata?.userId)
        if (!upload || !datasetId || !userId) continue
        const key = storageKeyFor(datasetId, id)
        // Not known whether the bytes were moved (the bucket did not answer): left for next time.
        const moved = await bytes.isMoved(key).catch(() => null)
        if (moved === null || (!moved && upload.offset !== upload.size)) continue
        try {
          // Registered already (the crash came after the commit): only the tus record is left.
          if (await em().count(DatasetFile, { storageKey: key })) {
            await store.dropRecord(id)
            continue
          }
          // The same rule as a live request: the dataset must still take files from its uploader.
          const refusal = await targetRefusal(em(), await uploaderAbility(em(), userId), datasetId)
          if (refusal) {
            await discard(id)
            await bytes.dropOriginal(key)
            continue
          }
          const { sha256, size } = moved ? await bytes.hashOriginal(key) : await store.finish(id)
          await registerUpload(em(), storage, {
            upload: { ...upload, size } as Upload,
            sha256,
            size,
            userId,
            ip: null,
            alreadyMoved: moved,
          })
          done++
        } catch (err) {
          deps.logger.error({ err, upload: id }, 'could not complete an interrupted upload')
        }
        await store.dropRecord(id).catch((err: unknown) => {
          deps.logger.error({ err, upload: id }, "could not drop an interrupted upload's record")
        })
      }
      if (done) deps.onRegistered?.()
      return done
    },
  }
}
