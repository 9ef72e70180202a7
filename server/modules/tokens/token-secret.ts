import { hash, randomBytes } from 'node:crypto'

/** Our token format: a recognisable prefix and 32 random bytes, base64url. */
export const TOKEN_PREFIX = 'stp_'

export function newTokenSecret(): string {
  return TOKEN_PREFIX + randomBytes(32).toString('base64url')
}

/**
 * Tokens carry 256 random bits, so a fast hash is enough to make the stored value useless to a
 * thief (no dictionary to try); common practice for high-entropy API keys.
 */
export function hashToken(secret: string): string {
  // One-shot crypto.hash: a quarter of createHash()'s time, and no Hash object per request.
  return hash('sha256', secret, 'hex')
}
