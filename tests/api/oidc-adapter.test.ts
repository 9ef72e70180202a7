/**
 * The stand-in identity provider's storage on SQLite, against the adapter contract oidc-provider
 * documents (lib/adapters/memory_adapter.js is the library's reference implementation).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type Orm } from '@server/db'
import { pruneOidcPayloads, sqliteAdapter } from '@server/modules/idp/oidc-adapter'

let orm: Orm
beforeAll(async () => {
  orm = await openDatabase(':memory:')
})
afterAll(() => orm.close())

describe('the identity provider storage adapter', () => {
  it('stores, finds by id, uid and user code, consumes and destroys', async () => {
    const interactions = sqliteAdapter(orm)('Interaction')
    await interactions.upsert('i-1', { uid: 'u-1', userCode: 'ABCD', returnTo: '/x' }, 60)
    expect(await interactions.find('i-1')).toMatchObject({ returnTo: '/x' })
    expect(await interactions.findByUid('u-1')).toMatchObject({ returnTo: '/x' })
    expect(await interactions.findByUserCode('ABCD')).toMatchObject({ returnTo: '/x' })
    // The same id in another model is another row.
    expect(await sqliteAdapter(orm)('Session').find('i-1')).toBeUndefined()
    await interactions.consume('i-1')
    expect((await interactions.find('i-1'))?.consumed).toBeGreaterThan(0)
    await interactions.destroy('i-1')
    expect(await interactions.find('i-1')).toBeUndefined()
  })

  it('revokes everything of a grant, and never returns nor keeps what expired', async () => {
    const codes = sqliteAdapter(orm)('AuthorizationCode')
    const tokens = sqliteAdapter(orm)('AccessToken')
    await codes.upsert('c-1', { grantId: 'g-1' }, 60)
    await tokens.upsert('t-1', { grantId: 'g-1' }, 60)
    await tokens.upsert('t-2', { grantId: 'g-2' }, 60)
    await tokens.revokeByGrantId('g-1')
    expect(await codes.find('c-1')).toBeUndefined()
    expect(await tokens.find('t-1')).toBeUndefined()
    expect(await tokens.find('t-2')).toBeDefined()

    await tokens.upsert('t-3', { grantId: 'g-3' }, 1)
    expect(await tokens.find('t-3')).toBeDefined()
    await new Promise((r) => setTimeout(r, 1100))
    expect(await tokens.find('t-3')).toBeUndefined()
    expect(await pruneOidcPayloads(orm)).toBe(1)
    expect(await tokens.find('t-2')).toBeDefined()
  })
})
