import { Router } from 'express'
import { ForbiddenError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import type { Mailbox } from './mail-catcher'

/** Demo mode only: admins read what the local mail catcher received. */
export function caughtMailRouter(mailbox: Mailbox): Router {
  const router = Router()
  router.get('/', requireUser, async (req, res) => {
    if (!req.ability.can('read', 'Mail'))
      throw new ForbiddenError('Only site admins can read caught mail.')
    res.json({ items: await mailbox.list() })
  })
  return router
}
