import type { IncomingMessage, ServerResponse } from 'node:http'
import { PassThrough, Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import {
  type CancellationContext,
  ERRORS,
  type Server,
  StreamLimiter,
  type Upload,
} from '@tus/server'
import { NodeRequest, sendNodeResponse } from 'srvx/node'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'

/**
 * tus (2.x) handles a web Request: the Node request body becomes a web ReadableStream
 * (Readable.toWeb) and, to be written, a Node stream again (Readable.fromWeb). For an upload of
 * gigabytes those two conversions cost more CPU than hashing the bytes, on a machine where the
 * client, the server and the hash share two cores. Here the Node request itself stands in as the
 * body and the PATCH and POST handlers write it straight to the store; everything else (headers,
 * offsets, locking, hooks, responses) is tus's own.
 */
export function handleWithNodeBody(tus: Server) {
  // This path emits no POST_RECEIVE progress events; nothing here listens for them.
  for (const handler of [tus.handlers.PATCH, tus.handlers.POST]) {
    Object.assign(handler, {
      writeToStore: (
        body: Readable | null,
        upload: Upload,
        maxFileSize: number,
        context: CancellationContext,
      ): Promise<number> =>
        writeNodeBody(handler.store, body ?? Readable.from([]), upload, maxFileSize, context),
    })
  }
  // As Server.handle does, with the Node request as the body (read only when a handler asks).
  return async (req: IncomingMessage, res: ServerResponse): Promise<void> => {
    const request = new NodeRequest({ req, res })
    Object.defineProperty(request, 'body', {
      get: () => (req.method === 'GET' || req.method === 'HEAD' ? null : req),
    })
    const response = await (tus as unknown as { handler(r: Request): Promise<Response> }).handler(
      request as unknown as Request,
    )
    await sendNodeResponse(res, response.status >= 400 ? await asProblem(response) : response)
  }
}

/**
 * Error answers as application/problem+json, like the rest of the API: our refusals already have
 * a problem body; tus's own (a wrong offset, a missing header) are plain text and get wrapped.
 */
async function asProblem(response: Response): Promise<Response> {
  const text = await response.text()
  const headers = new Headers(response.headers)
  headers.set('content-type', PROBLEM_CONTENT_TYPE)
  const body = text.startsWith('{')
    ? text
    : JSON.stringify({
        type: '/problems/upload',
        title: 'Upload refused',
        status: response.status,
        detail: text.trim(),
      })
  headers.delete('content-length')
  return new Response(body, { status: response.status, headers })
}

/**
 * tus's BaseHandler.writeToStore with the Node request as the source. As there, the request is
 * piped through a proxy, so a failed write or an over-size body ends the write without destroying
 * the request (the client then reads a proper answer instead of a dropped connection).
 */
async function writeNodeBody(
  store: Server['datastore'],
  source: Readable,
  upload: Upload,
  maxFileSize: number,
  context: CancellationContext,
): Promise<number> {
  if (context.signal.aborted) throw ERRORS.ABORTED
  const proxy = new PassThrough({ highWaterMark: 1 << 20 })
  let sourceError: unknown
  const onSourceError = (error: unknown) => {
    sourceError = error
    source.unpipe(proxy)
    if (!context.signal.aborted) proxy.destroy(error as Error)
  }
  source.on('error', onSourceError)
  const onAbort = () => {
    source.unpipe(proxy)
    if (!proxy.destroyed) proxy.end()
  }
  context.signal.addEventListener('abort', onAbort, { once: true })
  try {
    return await pipeline(source.pipe(proxy), new StreamLimiter(maxFileSize), (limited) =>
      store.write(limited as Readable, upload.id, upload.offset),
    )
  } catch (error) {
    source.unpipe(proxy)
    const aborted = error instanceof Error && error.name === 'AbortError'
    throw (sourceError !== undefined && error === sourceError) || aborted ? ERRORS.ABORTED : error
  } finally {
    source.off('error', onSourceError)
    context.signal.removeEventListener('abort', onAbort)
  }
}
