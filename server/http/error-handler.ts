import type { ErrorRequestHandler, RequestHandler } from 'express'
import {
  NotFoundError as OrmNotFoundError,
  UniqueConstraintViolationException,
} from '@mikro-orm/core'
import { ZodError } from 'zod'
import { PROBLEM_CONTENT_TYPE, type Problem } from '@shared/api/problem'
import { HttpError } from '../errors/http-error'
import type { Logger } from '../logger'
import { zodFieldErrors } from './validate'

interface BodyParserError {
  type?: string
  status?: number
}

function toProblem(err: unknown): Problem {
  if (err instanceof HttpError) {
    return {
      type: err.type,
      title: err.title,
      status: err.status,
      detail: err.detail,
      errors: err.errors,
    }
  }
  if (err instanceof ZodError) {
    return {
      type: '/problems/validation',
      title: 'Invalid input',
      status: 400,
      errors: zodFieldErrors(err),
    }
  }
  if (err instanceof OrmNotFoundError) {
    return {
      type: '/problems/not-found',
      title: 'Not found',
      status: 404,
      detail: 'No such resource.',
    }
  }
  if (err instanceof UniqueConstraintViolationException) {
    return {
      type: '/problems/conflict',
      title: 'Conflict',
      status: 409,
      detail: 'That already exists.',
    }
  }
  const parser = err as BodyParserError
  if (parser?.type === 'entity.parse.failed') {
    return {
      type: '/problems/bad-request',
      title: 'Bad request',
      status: 400,
      detail: 'The body is not valid JSON.',
    }
  }
  if (parser?.type === 'entity.too.large') {
    return {
      type: '/problems/too-large',
      title: 'Too large',
      status: 413,
      detail: 'The request body is too large.',
    }
  }
  return {
    type: 'about:blank',
    title: 'Internal error',
    status: 500,
    detail: 'Something went wrong on our side.',
  }
}

/** The one place errors become responses: application/problem+json (RFC 9457). Last in createApp. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err, req, res, _next) => {
    const problem = toProblem(err)
    if (problem.status >= 500) logger.error({ err, url: req.originalUrl }, 'request failed')
    if (res.headersSent) return res.end()
    res
      .status(problem.status)
      .type(PROBLEM_CONTENT_TYPE)
      .send(JSON.stringify({ ...problem, instance: req.originalUrl }))
  }
}

/** Unknown API routes answer with a problem too, not the client's index.html. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(
    new HttpError(
      404,
      'Not found',
      `No API route ${req.method} ${req.path}.`,
      '/problems/not-found',
    ),
  )
}
