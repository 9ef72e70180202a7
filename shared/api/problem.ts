/** An error body, `application/problem+json` (RFC 9457). */
export interface Problem {
  type: string
  title: string
  status: number
  detail?: string
  instance?: string
  /** Validation failures, one per field; `pointer` is a JSON Pointer into the request body. */
  errors?: FieldError[]
}

export interface FieldError {
  pointer: string
  detail: string
}

export const PROBLEM_CONTENT_TYPE = 'application/problem+json'

/** The field name a pointer such as `#/title` or `#/authors/0/orcid` refers to. */
export function pointerToPath(pointer: string): string {
  return pointer.replace(/^#\/?/, '').split('/').join('.')
}
