import type { Adapter, AdapterFactory, AdapterPayload } from 'oidc-provider'
import type { Orm } from '../../db'
import { OidcPayload } from './oidc-payload.entity'

/** Models whose rows belong to a grant, revoked together when the grant is. */
const GRANTABLE = new Set([
  'AccessToken',
  'AuthorizationCode',
  'RefreshToken',
  'DeviceCode',
  'BackchannelAuthenticationRequest',
])

/**
 * oidc-provider's storage interface on Stipple's SQLite database (the library's own in-memory
 * adapter is for quick starts only and forgets everything at a restart). Expired rows are never
 * returned and are deleted by `pruneOidcPayloads`.
 */
export function sqliteAdapter(orm: Orm): AdapterFactory {
  return (model: string): Adapter => {
    const em = () => orm.em.fork()
    const live = () => ({ $or: [{ expiresAt: null }, { expiresAt: { $gt: new Date() } }] })
    const findOne = async (where: Record<string, unknown>) => {
      const row = await em().findOne(OidcPayload, { model, ...where, ...live() })
      return row ? (row.payload as AdapterPayload) : undefined
    }
    return {
      async upsert(id, payload, expiresIn) {
        await em().upsert(OidcPayload, {
          model,
          id,
          payload: payload as Record<string, unknown>,
          grantId: GRANTABLE.has(model) ? (payload.grantId ?? null) : null,
          uid: payload.uid ?? null,
          userCode: payload.userCode ?? null,
          expiresAt: expiresIn ? new Date(Date.now() + expiresIn * 1000) : null,
        })
      },
      find: (id) => findOne({ id }),
      findByUid: (uid) => findOne({ uid }),
      findByUserCode: (userCode) => findOne({ userCode }),
      async consume(id) {
        const row = await em().findOne(OidcPayload, { model, id })
        if (!row) return
        const payload = { ...row.payload, consumed: Math.floor(Date.now() / 1000) }
        await em().nativeUpdate(OidcPayload, { model, id }, { payload })
      },
      async destroy(id) {
        await em().nativeDelete(OidcPayload, { model, id })
      },
      async revokeByGrantId(grantId) {
        await em().nativeDelete(OidcPayload, { grantId })
      },
    }
  }
}

/** Deletes the provider's expired rows; the hourly upkeep calls it. */
export async function pruneOidcPayloads(orm: Orm, now = new Date()): Promise<number> {
  return orm.em.fork().nativeDelete(OidcPayload, { expiresAt: { $lte: now } })
}
