import type { RequestHandler } from 'express'
import { ForbiddenError } from '../errors/http-error'

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

/**
 * Cross-site request forgery guard for cookie-authenticated writes, on top of SameSite cookies:
 * the browser must say the request comes from our own origin: Origin (Referer as a fallback), or
 * Sec-Fetch-Site, which page scripts cannot set. Token-authenticated requests carry no ambient
 * credentials and need no check.
 */
export function sameOriginWrites(publicOrigin: string): RequestHandler {
  return (req, _res, next) => {
    if (SAFE.has(req.method) || req.authMethod !== 'session') return next()
    const origin = req.get('origin') ?? originOf(req.get('referer'))
    const fromOurPage =
      origin === publicOrigin ||
      ((origin === undefined || origin === 'null') && req.get('sec-fetch-site') === 'same-origin')
    if (!fromOurPage) {
      throw new ForbiddenError(
        'This request did not come from a Stipple page, so it was refused (cross-site request protection).',
      )
    }
    next()
  }
}

function originOf(url: string | undefined): string | undefined {
  if (!url) return undefined
  try {
    return new URL(url).origin
  } catch {
    return undefined
  }
}
