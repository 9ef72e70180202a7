import { describe, expect, it } from 'vitest'
import { openDatabase } from '@server/db'
import { createLogger } from '@server/logger'
import { CurationEntry } from '@server/modules/curation/curation-entry.entity'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DoiRegistrar } from '@server/modules/doi/doi-registrar'
import { startFakeDataCite } from '@server/modules/doi/fake-datacite/fake-datacite'
import { DatasetVersion } from '@server/modules/versions/dataset-version.entity'
import { DEMO_DIR } from '@server/paths'
import { seedDemo } from '@server/seeders/demo.seeder'
import { testConfig } from '../fixtures/test-app'

describe('demo curation records', () => {
  it('show a resubmitted thread, approved versions whose DOIs the stand-in registers, and one failed DOI', async () => {
    const orm = await openDatabase(':memory:')
    const config = testConfig()
    const fake = await startFakeDataCite(config.datacite)
    try {
      await seedDemo(orm.em.fork(), DEMO_DIR)
      expect((await seedDemo(orm.em.fork(), DEMO_DIR)).created).toBe(0)
      const em = orm.em.fork()
      const resubmitted = await em.findOneOrFail(Dataset, {
        title: 'Nuclear envelope Exchange-PAINT, two scaffold targets',
      })
      const steps = await em.find(
        CurationEntry,
        { dataset: resubmitted.id },
        { orderBy: { createdAt: 'asc' } },
      )
      expect(steps.map((s) => s.step)).toEqual(['submitted', 'changes_requested', 'submitted'])
      expect(steps[1]!.comment).not.toBe('')

      const failed = await em.find(DatasetVersion, { doiStatus: 'failed' })
      expect(failed).toHaveLength(1)
      const registrar = new DoiRegistrar({
        orm,
        config,
        logger: createLogger('silent'),
        mailer: { send: async () => {} },
        url: fake.url,
      })
      const pending = await em.count(DatasetVersion, { doiStatus: 'pending' })
      expect(pending).toBeGreaterThanOrEqual(3)
      expect(await registrar.runDue()).toBe(pending)
      const registered = await orm.em.fork().find(DatasetVersion, { doiStatus: 'registered' })
      expect(registered).toHaveLength(pending)
      expect(registered.every((v) => v.doi?.startsWith('10.5072/stpl-'))).toBe(true)
      expect(fake.records.size).toBe(pending)
    } finally {
      await fake.stop()
      await orm.close()
    }
  })
})
