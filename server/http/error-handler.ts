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

/** The body parser's refusals, by its error type, in words. */
const BODY_PROBLEMS: Record<string, Omit<Problem, 'type'>> = {
  'entity.parse.failed': {
    title: 'Bad request',
    status: 400,
    detail: 'The body is not valid JSON.',
  },
  'entity.too.large': { title: 'Too large', status: 413, detail: 'The request body is too large.' },
  'encoding.unsupported': {
    title: 'Unsupported content encoding',
    status: 415,
    detail: 'Send the body uncompressed, or compressed with gzip, deflate or br.',
  },
  'charset.unsupported': {
    title: 'Unsupported charset',
    status: 415,
    detail: 'Send JSON bodies in UTF-8.',
  },
  'stream.encoding.set': {
    title: 'Bad request',
    status: 400,
    detail: 'The body could not be read.',
  },
  'request.size.invalid': {
    title: 'Bad request',
    status: 400,
    detail: 'The body is shorter or longer than its Content-Length says.',
  },
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
  const known = parser?.type ? BODY_PROBLEMS[parser.type] : undefined
  if (known) return { type: '/problems/bad-request', ...known }
  // Any other refusal of the body parser (http-errors with a 4xx status) is the client's: say so
  // in our words, never in the library's.
  if (typeof parser?.status === 'number' && parser.status >= 400 && parser.status < 500) {
    return {
      type: '/problems/bad-request',
      title: 'Bad request',
      status: parser.status,
      detail: 'The request body could not be read.',
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
