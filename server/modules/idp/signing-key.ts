import { existsSync, readFileSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { exportJWK, generateKeyPair, type JWK } from 'jose'

/**
 * The local provider's signing key, made once and kept in the data directory (by the primary when
 * several processes serve HTTP, so they never race to make it).
 */
export async function signingKey(dataDir: string): Promise<JWK> {
  const file = join(dataDir, 'idp-signing-key.json')
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8')) as JWK
  const { privateKey } = await generateKeyPair('RS256', { extractable: true })
  const jwk = {
    ...(await exportJWK(privateKey)),
    kid: `stipple-${Date.now()}`,
    alg: 'RS256',
    use: 'sig',
  }
  writeFileSync(file, JSON.stringify(jwk), { mode: 0o600 })
  return jwk
}
