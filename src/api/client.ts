import { pointerToPath, type Problem } from '@shared/api/problem'

/** A failed API call, carrying the server's problem+json words so pages can show them. */
export class ApiError extends Error {
  readonly status: number
  readonly title: string
  readonly detail: string | undefined
  /** Validation messages keyed by field name (`title`, `members.0.email`…). */
  readonly fieldErrors: Record<string, string>

  constructor(problem: Pick<Problem, 'status' | 'title' | 'detail' | 'errors'>) {
    super(problem.detail ?? problem.title)
    this.name = 'ApiError'
    this.status = problem.status
    this.title = problem.title
    this.detail = problem.detail
    this.fieldErrors = {}
    for (const e of problem.errors ?? []) {
      const field = pointerToPath(e.pointer)
      // Keep the first message per field; one clear sentence reads better than a list.
      this.fieldErrors[field] ??= e.detail
    }
  }
}

export type QueryValue = string | number | boolean | null | undefined
export type Query = Record<string, QueryValue>

interface RequestOptions {
  query?: Query
  body?: unknown
  /** A body sent as it is (an XML document, say) instead of as JSON. */
  text?: { content: string; type: string }
  /** Read the answer as text rather than JSON. */
  asText?: boolean
}

function urlFor(path: string, query?: Query): string {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(query ?? {})) {
    if (value !== undefined && value !== null && value !== '') params.set(key, String(value))
  }
  const qs = params.toString()
  return qs ? `${path}?${qs}` : path
}

function isProblem(value: unknown): value is Problem {
  return typeof value === 'object' && value !== null && 'status' in value && 'title' in value
}

async function errorFrom(res: Response): Promise<ApiError> {
  const body: unknown = await res.json().catch(() => null)
  if (isProblem(body)) return new ApiError(body)
  return new ApiError({
    status: res.status,
    title: res.statusText || 'Request failed',
    detail: `The server answered ${res.status}.`,
  })
}

export async function request<T>(
  method: string,
  path: string,
  opts: RequestOptions = {},
): Promise<T> {
  const headers: Record<string, string> = {
    accept: opts.asText ? 'text/plain, application/problem+json' : 'application/json',
  }
  let body: string | undefined
  if (opts.text) {
    headers['content-type'] = opts.text.type
    body = opts.text.content
  } else if (opts.body !== undefined) {
    headers['content-type'] = 'application/json'
    body = JSON.stringify(opts.body)
  }
  let res: Response
  try {
    res = await fetch(urlFor(path, opts.query), {
      method,
      headers,
      credentials: 'same-origin',
      body,
    })
  } catch {
    throw new ApiError({
      status: 0,
      title: 'No connection',
      detail: 'Stipple could not be reached. Check your connection and try again.',
    })
  }
  if (!res.ok) throw await errorFrom(res)
  if (res.status === 204) return undefined as T
  return (opts.asText ? await res.text() : await res.json()) as T
}

export const api = {
  get: <T>(path: string, query?: Query) => request<T>('GET', path, { query }),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, { body: body ?? {} }),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, { body }),
  put: <T>(path: string, body: unknown) => request<T>('PUT', path, { body }),
  delete: (path: string) => request<void>('DELETE', path),
  getText: (path: string) => request<string>('GET', path, { asText: true }),
  postText: <T>(path: string, content: string, type: string) =>
    request<T>('POST', path, { text: { content, type } }),
}

/** The words to show for any error a page caught. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.detail ? error.detail : error.title
  if (error instanceof Error) return error.message
  return 'Something went wrong.'
}
