/** The server's answer carried by a tus-js-client error (its DetailedError), read by duck typing. */
interface ResponseLike {
  getStatus(): number
  getBody(): string
}

export type RefusalKind = 'duplicate' | 'refused' | 'interrupted'

export interface UploadRefusal {
  kind: RefusalKind
  /** HTTP status, 0 when no answer came. */
  status: number
  /** What happened, in words for the depositor. */
  message: string
  /** For a duplicate: the file already in the dataset. */
  existingFileId: number | null
}

const DUPLICATE_TYPE = '/problems/duplicate-file'

const FALLBACK: Record<number, string> = {
  400: 'The server did not accept this upload.',
  401: 'You are signed out. Sign in again, then choose the file again to continue.',
  403: 'You may not add files to this dataset: only its depositors can, while it is a draft.',
  404: 'The dataset or this upload no longer exists.',
  413: 'The file is larger than the server accepts.',
}

function responseOf(error: unknown): ResponseLike | null {
  if (typeof error !== 'object' || error === null || !('originalResponse' in error)) return null
  const res: unknown = error.originalResponse
  if (typeof res !== 'object' || res === null) return null
  return 'getStatus' in res && 'getBody' in res ? (res as ResponseLike) : null
}

function problemOf(body: string): Record<string, unknown> | null {
  try {
    const parsed: unknown = JSON.parse(body)
    return typeof parsed === 'object' && parsed !== null
      ? (parsed as Record<string, unknown>)
      : null
  } catch {
    return null
  }
}

const text = (v: unknown) => (typeof v === 'string' && v.trim() ? v.trim() : null)

/**
 * Why an upload stopped, from the error tus-js-client reported. A 4xx answer is a refusal (its
 * problem+json `detail` is shown as the server wrote it); anything else is an interruption the
 * depositor can resume once the connection is back.
 */
export function refusalOf(error: unknown): UploadRefusal {
  const res = responseOf(error)
  const status = res?.getStatus() ?? 0
  if (status < 400 || status >= 500) {
    return {
      kind: 'interrupted',
      status,
      message:
        status >= 500
          ? `The server failed (${status}). Resume to continue from the last byte it stored.`
          : 'The connection was lost. Resume to continue from the last byte the server stored.',
      existingFileId: null,
    }
  }
  const body = res?.getBody() ?? ''
  const problem = problemOf(body)
  const detail = text(problem?.detail) ?? text(problem?.title)
  const plain = problem ? null : text(body)
  const duplicate = problem?.type === DUPLICATE_TYPE
  return {
    kind: duplicate ? 'duplicate' : 'refused',
    status,
    message: detail ?? FALLBACK[status] ?? plain ?? `The server refused the upload (${status}).`,
    existingFileId:
      duplicate && typeof problem?.existingFileId === 'number' ? problem.existingFileId : null,
  }
}
