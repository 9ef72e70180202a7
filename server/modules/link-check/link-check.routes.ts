import { Router } from 'express'
import { z } from 'zod'
import { linkCheckRequestSchema } from '@shared/schemas/link-check.schema'
import { requireUser } from '../../http/authenticate'
import { perMinuteLimit } from '../../http/rate-limit'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseQuery } from '../../http/validate'
import { clockOf, type AppDeps } from '../../services'
import { linkCheckCsv } from './link-check-csv'
import { checkLinks } from './link-check.service'

const formatQuery = z.object({ format: z.enum(['json', 'csv']).default('json') })

/** POST /api/link-check: for editors and anyone signed in; `?format=csv` for a spreadsheet. */
export function linkCheckRouter(deps: AppDeps): Router {
  const router = Router()
  const now = clockOf(deps)
  router.post('/', requireUser, perMinuteLimit('link-check', 60), async (req, res) => {
    const { format } = parseQuery(formatQuery, req)
    const { text } = parseBody(linkCheckRequestSchema, req)
    const result = await checkLinks(em(), req, text, {
      hubOrigin: deps.config.publicUrl,
      now: now(),
    })
    if (format === 'csv') {
      const day = result.checkedAt.slice(0, 10)
      res
        .type('text/csv; charset=utf-8')
        .attachment(`link-check-${day}.csv`)
        .send(linkCheckCsv(result))
      return
    }
    res.json(result)
  })
  return router
}
