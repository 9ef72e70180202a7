import type { RequestHandler } from 'express'
import { ValidationError } from '../errors/http-error'

/**
 * Refuses a URL whose path or query holds a NUL character (`%00`), before any route reads an id,
 * an accession or a search term from it. Bodies are checked where they are parsed (validate.ts).
 */
export const refuseNulInUrl: RequestHandler = (req, _res, next) => {
  if (!/%00|\u0000/i.test(req.url)) return next()
  next(
    new ValidationError(
      [{ pointer: '#/url', detail: 'The address may not contain the NUL character (%00).' }],
      'The address contains a NUL character.',
    ),
  )
}
