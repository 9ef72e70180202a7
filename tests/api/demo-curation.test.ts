import { createHash } from 'node:crypto'
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { openDatabase } from '@server/db'
import { createLogger } from '@server/logger'
import { CurationEntry } from '@server/modules/curation/curation-entry.entity'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DoiRegistrar } from '@server/modules/doi/doi-registrar'
import { startFakeDataCite } from '@server/modules/doi/fake-datacite/fake-datacite'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { DatasetVersion, VersionFile } from '@server/modules/versions/dataset-version.entity'
import { DEMO_DIR } from '@server/paths'
import { seedDemo } from '@server/seeders/demo.seeder'
import { seedDemoTables } from '@server/seeders/demo-tables'
import { LocalStorage } from '@server/storage/local-storage'
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

  it('freezes the demo tables into the approved version 1 they belong to, bytes kept as a blob', async () => {
    const orm = await openDatabase(':memory:')
    const dataDir = mkdtempSync(join(tmpdir(), 'stipple-demo-versions-'))
    try {
      const storage = new LocalStorage(dataDir)
      await seedDemo(orm.em.fork(), DEMO_DIR)
      const title = 'Bassoon 3D astigmatic STORM, cortical slices'
      expect(await seedDemoTables(orm.em.fork(), storage, () => {}, [title])).toBe(1)
      const em = orm.em.fork()
      const dataset = await em.findOneOrFail(Dataset, { title })
      const table = await em.findOneOrFail(DatasetFile, { dataset: dataset.id })
      const v1 = await em.findOneOrFail(DatasetVersion, { dataset: dataset.id, number: 1 })
      const frozen = await em.find(VersionFile, { version: v1.id })
      expect(frozen.map((f) => [f.name, f.size, f.sha256])).toEqual([
        [table.name, table.size, table.sha256],
      ])
      const bytes = readFileSync(storage.versionBlobPath(table.sha256!))
      expect(createHash('sha256').update(bytes).digest('hex')).toBe(table.sha256)
      // Seeding again adds nothing, to the dataset or to its version.
      expect(await seedDemoTables(orm.em.fork(), storage, () => {}, [title])).toBe(0)
      expect(await orm.em.fork().count(VersionFile, { version: v1.id })).toBe(1)
    } finally {
      await orm.close()
      rmSync(dataDir, { recursive: true, force: true })
    }
  })
})
