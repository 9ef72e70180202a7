import { reviewedDatasets } from '../reviewer-links/reviewer-access'
import { Router } from 'express'
import { z } from 'zod'
import { idSchema } from '@shared/schemas/common.schema'
import { createTokenSchema } from '@shared/schemas/token.schema'
import type { MeDto } from '@shared/schemas/user.schema'
import { requireUser, signedInUser } from '../../http/authenticate'
import { ForbiddenError } from '../../errors/http-error'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import type { AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { Organization } from '../organizations/organization.entity'
import { accessibleWhere } from '../../http/access'
import type { IApiToken } from '../tokens/api-token.entity'
import { createToken, listTokens, revokeToken } from '../tokens/tokens.service'
import { perMinuteLimit } from '../../http/rate-limit'

export function meRouter(deps: AppDeps): Router {
  const router = Router()
  const tokenLimit = perMinuteLimit('token-create', deps.config.rateLimitSignIn)

  router.get('/', async (req, res) => {
    const user = req.user
    const org =
      user?.organization != null
        ? await em().findOne(Organization, { id: user.organization })
        : null
    const body: MeDto = {
      user: user
        ? {
            id: user.id,
            email: user.email,
            name: user.name,
            siteRole: user.siteRole ?? null,
            organization: org ? { id: org.id, name: org.name } : null,
          }
        : null,
      viewer: req.viewer && {
        ...req.viewer,
        memberships: req.viewer.memberships.map((m) => ({ ...m })),
        shares: req.viewer.shares.map((sh) => ({ ...sh, capabilities: [...sh.capabilities] })),
        manuscriptDatasets: [...(req.viewer.manuscriptDatasets ?? [])],
      },
      reviewing: reviewedDatasets(req),
      demo: deps.config.demo,
    }
    res.json(body)
  })

  router.get('/tokens', requireUser, async (req, res) => {
    const where = accessibleWhere<IApiToken>(req.ability, 'read', 'ApiToken')
    res.json({ items: where ? await listTokens(em(), signedInUser(req).id, where) : [] })
  })

  router.post('/tokens', requireUser, tokenLimit, async (req, res) => {
    const user = signedInUser(req)
    if (!req.ability.can('create', { __type: 'ApiToken', user: user.id }))
      throw new ForbiddenError()
    const created = await createToken(em(), user.id, parseBody(createTokenSchema, req))
    audit(em(), req, {
      action: 'token.create',
      targetType: 'ApiToken',
      targetId: created.id,
      details: { name: created.name },
    })
    await em().flush()
    res.status(201).json(created)
  })

  router.delete('/tokens/:id', requireUser, async (req, res) => {
    const user = signedInUser(req)
    if (!req.ability.can('manage', { __type: 'ApiToken', user: user.id }))
      throw new ForbiddenError()
    const token = await revokeToken(em(), user.id, parseParams(z.object({ id: idSchema }), req).id)
    audit(em(), req, { action: 'token.revoke', targetType: 'ApiToken', targetId: token.id })
    await em().flush()
    res.status(204).end()
  })

  return router
}
