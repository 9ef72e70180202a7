import { Router } from 'express'
import { publicSearchQuerySchema } from '@shared/schemas/public-search.schema'
import { requestEm as em } from '../../http/request-context'
import { parseQuery } from '../../http/validate'
import { publicSearch } from './public-search.service'

export interface SearchDeps {
  /** The clock embargo ends are judged by (tests pass their own). */
  clock?: () => Date
}

/**
 * GET /api/search: the public catalogue, the same for everyone (signed in or not), so it needs
 * no abilities beyond the public's: only approved datasets, quality numbers only once public.
 */
export function searchRouter(deps: SearchDeps = {}): Router {
  const router = Router()
  const now = deps.clock ?? (() => new Date())
  router.get('/', async (req, res) => {
    const q = parseQuery(publicSearchQuerySchema, req)
    res.json(await publicSearch(em(), q, now()))
  })
  return router
}
