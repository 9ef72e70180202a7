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
import { completenessOf } from '@server/modules/metadata/metadata.service'
import { qualityInputsFor } from '@server/modules/quality/quality-jobs'

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

  it('gives every demo dataset past submission a description with every required field', async () => {
    const orm = await openDatabase(':memory:')
    try {
      await seedDemo(orm.em.fork(), DEMO_DIR)
      const em = orm.em.fork()
      const past = await em.find(Dataset, { state: { $nin: ['draft'] } })
      expect(past.length).toBeGreaterThanOrEqual(8)
      for (const dataset of past) {
        const completeness = await completenessOf(em, dataset)
        const missing = completeness.sections.flatMap((s) =>
          s.missing.filter((f) => f.tier === 'required').map((f) => f.path),
        )
        expect(completeness.readyToSubmit).toBe(true)
        expect({ dataset: dataset.title, missing }).toEqual({ dataset: dataset.title, missing: [] })
      }
      // The report compares with the diffraction limit the description implies (λ/2NA).
      const reference = past.find((d) => d.title.startsWith('Microtubule reference'))!
      expect(await qualityInputsFor(em, reference.id)).toMatchObject({
        pixelNm: 108,
        emissionNm: 670,
        numericalAperture: 1.49,
      })
    } finally {
      await orm.close()
    }
  })
})
