import { Router, type Request } from 'express'
import { z } from 'zod'
import {
  adminUserQuerySchema,
  setSiteRoleSchema,
  setUserActiveSchema,
} from '@shared/schemas/admin-user.schema'
import { idSchema } from '@shared/schemas/common.schema'
import { ForbiddenError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams, parseQuery } from '../../http/validate'
import { listUsers, setSiteRole, setUserActive } from './admin-users.service'

const userParams = z.object({ id: idSchema })

function assertAdmin(req: Request) {
  if (!req.ability.can('manage', 'User')) throw new ForbiddenError('Only site admins manage users.')
}

/** The admin's users page: list and search, site roles, deactivation. */
export function adminUsersRouter(): Router {
  const router = Router()
  router.use(requireUser)
  router.get('/', async (req, res) => {
    assertAdmin(req)
    res.json(await listUsers(em(), parseQuery(adminUserQuerySchema, req)))
  })
  router.put('/:id/site-role', async (req, res) => {
    assertAdmin(req)
    const { id } = parseParams(userParams, req)
    res.json(await setSiteRole(em(), req, id, parseBody(setSiteRoleSchema, req)))
  })
  router.put('/:id/active', async (req, res) => {
    assertAdmin(req)
    const { id } = parseParams(userParams, req)
    res.json(await setUserActive(em(), req, id, parseBody(setUserActiveSchema, req)))
  })
  return router
}
