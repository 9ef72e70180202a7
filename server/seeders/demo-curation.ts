import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { CurationStep } from '@shared/schemas/curation.schema'
import { versionLabel } from '@shared/schemas/dataset-version.schema'
import { curationChecks } from '../modules/curation/curation-checks'
import { CurationEntry } from '../modules/curation/curation-entry.entity'
import { recordCurationStep } from '../modules/curation/curation.service'
import { Dataset, type IDataset } from '../modules/datasets/dataset.entity'
import { metadataOf } from '../modules/metadata/metadata.service'
import { User } from '../modules/users/user.entity'
import { DatasetVersion } from '../modules/versions/dataset-version.entity'

const STEWARD = 'noor.halvorsen@quillon.example'
const HOUR = 3_600_000
/** The demo's own policy length; the running server's EMBARGO_MAX_YEARS governs real decisions. */
const DEMO_POLICY = { maxYears: 3 }

/** Comments of the demo's curation threads, by dataset title (invented). */
const SENT_BACK: Record<string, { comment: string; resubmitted: boolean }> = {
  'Nuclear envelope Exchange-PAINT, two scaffold targets': {
    comment:
      'Please state the imager strand concentrations for both rounds and the wash between them; the acquisition section names only the first round.',
    resubmitted: true,
  },
  'Pore density across the cell cycle (PALM)': {
    comment:
      'The cell-cycle staging method is missing: say how G1 and G2 cells were told apart, and give the number of cells per stage.',
    resubmitted: false,
  },
}
/** The version whose DOI registration the demo shows as failed, for the steward's queue. */
const FAILED_DOI = 'Bassoon 3D astigmatic STORM, cortical slices'

/**
 * Curation records of the demo datasets: a thread for each dataset past submission (one sent
 * back and resubmitted, one waiting for changes), version 1 of each approved one (its DOI is then
 * registered by the running server with the local DataCite stand-in), and one registration that
 * failed. Runs once: datasets that already have a thread are left alone.
 */
export async function seedDemoCuration(em: EntityManager, now: Date): Promise<number> {
  const steward = await em.findOne(User, { email: STEWARD })
  const datasets = await em.find(Dataset, { state: { $ne: 'draft' } }, { orderBy: { id: 'asc' } })
  let created = 0
  for (const d of datasets) {
    if (await em.count(DatasetVersion, { dataset: d.id })) continue
    if (await em.count(CurationEntry, { dataset: d.id })) continue
    const at = (hoursAgo: number) => new Date(now.getTime() - hoursAgo * HOUR)
    const step = async (s: CurationStep, hoursAgo: number, comment = '') =>
      recordCurationStep(
        em,
        d,
        {
          step: s,
          actor: s === 'submitted' ? (d.createdBy ?? null) : (steward?.id ?? null),
          comment,
          checks: s === 'submitted' ? [] : await curationChecks(em, d, DEMO_POLICY, now),
        },
        at(hoursAgo),
      )
    await step('submitted', 72)
    const sentBack = SENT_BACK[d.title]
    if (sentBack) {
      await step('changes_requested', 48, sentBack.comment)
      if (sentBack.resubmitted) await step('submitted', 20)
    }
    if (d.state === 'approved' || d.state === 'withdrawn') {
      await step('approved', 24, 'Complete description; quality reports read.')
      await freezeDemoVersion(em, d, steward?.id ?? null, at(24))
    }
    created++
  }
  await em.flush()
  return created
}

async function freezeDemoVersion(
  em: EntityManager,
  d: IDataset,
  stewardId: number | null,
  approvedAt: Date,
) {
  const failed = d.title === FAILED_DOI
  em.create(DatasetVersion, {
    dataset: d.id,
    number: 1,
    label: versionLabel(d.accession, 1),
    title: d.title,
    description: d.description,
    licence: d.licence,
    metadata: structuredClone(await metadataOf(em, d.id)),
    approvedAt,
    approvedBy: stewardId,
    // Pending ones are registered by the running server against the DataCite stand-in.
    doiStatus: failed ? 'failed' : 'pending',
    doiAttempts: failed ? 5 : 0,
    doiNextAttemptAt: failed ? null : approvedAt,
    doiError: failed ? 'DataCite answered 503: Service temporarily unavailable' : null,
    doiFailedAt: failed ? approvedAt : null,
  })
}
