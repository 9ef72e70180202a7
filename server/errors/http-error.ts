import type { FieldError } from '@shared/api/problem'

/** An error that becomes a problem+json response. `type` is a stable URI-reference per kind. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    readonly detail?: string,
    readonly type: string = 'about:blank',
    readonly errors?: FieldError[],
  ) {
    super(detail ?? title)
  }
}

export class BadRequestError extends HttpError {
  constructor(detail: string, errors?: FieldError[]) {
    super(400, 'Bad request', detail, '/problems/bad-request', errors)
  }
}

export class ValidationError extends HttpError {
  constructor(errors: FieldError[], detail = 'Some fields are missing or invalid.') {
    super(400, 'Invalid input', detail, '/problems/validation', errors)
  }
}

export class UnauthorizedError extends HttpError {
  constructor(detail = 'Sign in, or send a personal access token as "Authorization: Bearer …".') {
    super(401, 'Not signed in', detail, '/problems/unauthorized')
  }
}

export class ForbiddenError extends HttpError {
  constructor(detail = 'You are not allowed to do this.') {
    super(403, 'Not allowed', detail, '/problems/forbidden')
  }
}

export class NotFoundError extends HttpError {
  constructor(what = 'resource', id?: string | number) {
    super(
      404,
      'Not found',
      id === undefined ? `No such ${what}.` : `No ${what} "${id}".`,
      '/problems/not-found',
    )
  }
}

export class ConflictError extends HttpError {
  constructor(detail: string, errors?: FieldError[]) {
    super(409, 'Conflict', detail, '/problems/conflict', errors)
  }
}

export class PayloadTooLargeError extends HttpError {
  constructor(detail: string) {
    super(413, 'Too large', detail, '/problems/too-large')
  }
}

/** The server could not do it now, through no fault of the request; asking again may work. */
export class ServiceUnavailableError extends HttpError {
  constructor(detail: string) {
    super(503, 'Try again', detail, '/problems/unavailable')
  }
}
