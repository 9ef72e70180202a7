import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { ACCESS_PHASES, accessPhase } from '@shared/domain/dataset-state'
import { openDatabase } from '@server/db'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { Organization } from '@server/modules/organizations/organization.entity'
import { DEMO_DIR } from '@server/paths'
import { seedDemo } from '@server/seeders/demo.seeder'

describe('database', () => {
  it('the committed migrations build exactly the schema the entities describe', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'stipple-db-'))
    const orm = await openDatabase(join(dir, 'stipple.sqlite'))
    try {
      expect(await orm.schema.getUpdateSchemaSQL()).toBe('')
    } finally {
      await orm.close()
      rmSync(dir, { recursive: true, force: true })
    }
  })

  it('seeds the demo consortium idempotently, with datasets in every access phase', async () => {
    const orm = await openDatabase(':memory:')
    try {
      const first = await seedDemo(orm.em.fork(), DEMO_DIR)
      expect(first.created).toBeGreaterThan(20)
      expect((await seedDemo(orm.em.fork(), DEMO_DIR)).created).toBe(0)
      const em = orm.em.fork()
      expect(await em.count(Organization)).toBe(3)
      const datasets = await em.find(Dataset, {})
      expect(datasets.length).toBeGreaterThanOrEqual(10)
      expect(new Set(datasets.map((d) => accessPhase(d)))).toEqual(new Set(ACCESS_PHASES))
    } finally {
      await orm.close()
    }
  })
})
