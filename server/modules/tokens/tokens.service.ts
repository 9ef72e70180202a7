import type { EntityManager, FilterQuery } from '@mikro-orm/better-sqlite'
import type { CreateTokenBody, CreatedTokenDto, TokenDto } from '@shared/schemas/token.schema'
import { NotFoundError } from '../../errors/http-error'
import { ApiToken, type IApiToken } from './api-token.entity'
import { hashToken, newTokenSecret } from './token-secret'

const DAY_MS = 86_400_000

export function toTokenDto(t: IApiToken): TokenDto {
  return {
    id: t.id,
    name: t.name,
    prefix: t.prefix,
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    expiresAt: t.expiresAt?.toISOString() ?? null,
  }
}

export async function createToken(
  em: EntityManager,
  userId: number,
  input: CreateTokenBody,
  now = new Date(),
): Promise<CreatedTokenDto> {
  const { name, expiresInDays } = input
  const secret = newTokenSecret()
  const token = em.create(ApiToken, {
    user: userId,
    name,
    tokenHash: hashToken(secret),
    prefix: secret.slice(0, 10),
    expiresAt: expiresInDays === null ? null : new Date(now.getTime() + expiresInDays * DAY_MS),
  })
  await em.flush()
  return { ...toTokenDto(token), token: secret }
}

export async function listTokens(
  em: EntityManager,
  userId: number,
  allowed: FilterQuery<IApiToken>,
): Promise<TokenDto[]> {
  const rows = await em.find(
    ApiToken,
    { $and: [allowed, { user: userId, revokedAt: null }] },
    { orderBy: { createdAt: 'desc' } },
  )
  return rows.map(toTokenDto)
}

export async function revokeToken(
  em: EntityManager,
  userId: number,
  tokenId: number,
): Promise<IApiToken> {
  const token = await em.findOne(ApiToken, { id: tokenId, user: userId, revokedAt: null })
  if (!token) throw new NotFoundError('token', tokenId)
  token.revokedAt = new Date()
  await em.flush()
  return token
}
