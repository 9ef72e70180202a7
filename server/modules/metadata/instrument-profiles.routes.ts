import { Router } from 'express'
import { z } from 'zod'
import { instrumentProfileInputSchema } from '@shared/schemas/instrument-profile.schema'
import { idSchema } from '@shared/schemas/common.schema'
import { ConflictError, ForbiddenError, NotFoundError } from '../../errors/http-error'
import { accessibleWhere } from '../../http/access'
import { requireUser, signedInUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import { audit } from '../audit/audit.service'
import { InstrumentProfile, type IInstrumentProfile } from './dataset-metadata.entity'

const toDto = (p: IInstrumentProfile) => ({
  id: p.id,
  name: p.name,
  instrument: p.instrument,
  createdAt: p.createdAt.toISOString(),
})

/** A lab's saved instrument descriptions, reused across its datasets. */
export function instrumentProfilesRouter(): Router {
  const router = Router()
  router.use(requireUser)

  router.get('/', async (req, res) => {
    const where = accessibleWhere<IInstrumentProfile>(req.ability, 'read', 'InstrumentProfile')
    const rows = where
      ? await em().find(InstrumentProfile, where, { orderBy: { name: 'asc' } })
      : []
    res.json({ items: rows.map(toDto) })
  })

  router.post('/', async (req, res) => {
    const user = signedInUser(req)
    const subject = {
      __type: 'InstrumentProfile' as const,
      organization: user.organization ?? null,
    }
    if (user.organization == null || !req.ability.can('create', subject)) {
      throw new ForbiddenError('Saved instruments belong to a lab; you are not a member of one.')
    }
    const { name, instrument } = parseBody(instrumentProfileInputSchema, req)
    if (await em().count(InstrumentProfile, { organization: user.organization, name })) {
      throw new ConflictError(`Your lab already has an instrument called "${name}".`)
    }
    const profile = em().create(InstrumentProfile, {
      organization: user.organization,
      name,
      instrument,
      createdBy: user.id,
    })
    audit(em(), req, {
      action: 'instrument.create',
      targetType: 'InstrumentProfile',
      targetId: name,
    })
    await em().flush()
    res.status(201).json(toDto(profile))
  })

  router.delete('/:id', async (req, res) => {
    const { id } = parseParams(z.object({ id: idSchema }), req)
    const profile = await em().findOne(InstrumentProfile, { id })
    if (
      !profile ||
      !req.ability.can('manage', {
        __type: 'InstrumentProfile',
        organization: profile.organization ?? null,
      })
    ) {
      throw new NotFoundError('instrument', id)
    }
    em().remove(profile)
    await em().flush()
    res.status(204).end()
  })
  return router
}
