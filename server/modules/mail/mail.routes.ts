import { Router } from 'express'
import { ForbiddenError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import type { MailCatcher } from './mail-catcher'

/** Demo mode only: admins read what the local mail catcher received. */
export function caughtMailRouter(catcher: MailCatcher): Router {
  const router = Router()
  router.get('/', requireUser, (req, res) => {
    if (!req.ability.can('read', 'Mail'))
      throw new ForbiddenError('Only site admins can read caught mail.')
    res.json({ items: catcher.messages })
  })
  return router
}
