import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto'
import { hashToken } from '../tokens/token-secret'

/** Reviewer-link tokens: a recognisable prefix and 32 random bytes (256 bits), base64url. */
export const REVIEWER_TOKEN_PREFIX = 'rv_'
export const REVIEWER_TOKEN_PATTERN = /^rv_[A-Za-z0-9_-]{43}$/

export const newReviewerToken = () => REVIEWER_TOKEN_PREFIX + randomBytes(32).toString('base64url')

/** Stored form of a token (see token-secret.ts: high-entropy secrets need no slow hash). */
export const hashReviewerToken = hashToken

/**
 * The demo's seeded links: their token is derived from the server's secret, so the demo can show
 * the URL again on the owner's page without any token being stored. Never used outside demo mode.
 */
export function demoReviewerToken(secret: string, accession: string, anonymous: boolean): string {
  const mac = createHmac('sha256', secret)
    .update(`demo-reviewer-link:${accession}:${anonymous ? 'anonymous' : 'named'}`)
    .digest()
  return REVIEWER_TOKEN_PREFIX + mac.toString('base64url')
}

export const reviewerUrl = (publicUrl: string, token: string) => `${publicUrl}/r/${token}`

/**
 * The browser's proof of which links it opened: the link ids, signed with the server's secret.
 * The ids alone grant nothing; every request re-checks each link in the database.
 */
export function signLinkIds(secret: string, ids: readonly number[]): string {
  const body = ids.join('.')
  return `${body}~${mac(secret, body)}`
}

export function verifyLinkIds(secrets: readonly string[], value: string | undefined): number[] {
  if (!value || value.length > 400) return []
  const cut = value.lastIndexOf('~')
  if (cut < 1) return []
  const body = value.slice(0, cut)
  const given = Buffer.from(value.slice(cut + 1))
  const valid = secrets.some((s) => {
    const expected = Buffer.from(mac(s, body))
    return expected.length === given.length && timingSafeEqual(expected, given)
  })
  if (!valid || !/^\d+(\.\d+)*$/.test(body)) return []
  return body.split('.').map(Number)
}

const mac = (secret: string, body: string) =>
  createHmac('sha256', secret).update(`reviewer-cookie:${body}`).digest('base64url')
