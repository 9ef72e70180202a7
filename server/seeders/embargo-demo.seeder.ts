import type { EntityManager } from '@mikro-orm/better-sqlite'
import { formatAccession } from '@shared/domain/dataset-state'
import { audit } from '../modules/audit/audit.service'
import { nextSequenceValue } from '../modules/common/sequence.service'
import { Dataset } from '../modules/datasets/dataset.entity'
import { DatasetMetadata } from '../modules/metadata/dataset-metadata.entity'
import { Project } from '../modules/projects/project.entity'
import { User } from '../modules/users/user.entity'

const DAY = 86_400_000
const dayStart = (t: number) => new Date(Math.floor(t / DAY) * DAY)

/** Invented demo records for the embargo schedule, the audit trail and the users page. */
const DEMO = {
  project: 'Nuclear pore scaffold census',
  depositor: 'kasimir.feld@harrowgate.example',
  steward: 'noor.halvorsen@quillon.example',
  admin: 'imre.castellan@quillon.example',
  /** Copies this dataset's description so the new ones read as complete. */
  describedLike: 'Nup96 dSTORM, U2OS cells, bottom nuclear envelope',
  endingSoon: {
    title: 'Nup133 dSTORM, HeLa nuclear envelope (embargo ending soon)',
    description:
      'Nup133 labelled by immunofluorescence and imaged by dSTORM; approved under an embargo that ends within the reminder window, so owners and stewards get a reminder.',
    endsInDays: 3,
  },
  released: {
    title: 'Nup62 central channel, DNA-PAINT (released by the schedule)',
    description:
      'Nup62 imaged by DNA-PAINT; its embargo ended while the demo server was not running, so the scheduler releases it at start-up and records the release in the audit log.',
    endedDaysAgo: 2,
  },
  deactivated: {
    email: 'rowan.pike@harrowgate.example',
    name: 'Rowan Pike (left the lab)',
  },
}

/**
 * Seeds the embargo demo: one dataset whose embargo ends within the reminder window, one whose
 * embargo ended (the scheduler's catch-up releases it at start, after its audit trail of
 * submit, approval and an extension), and one deactivated user. Found by natural keys first, so a
 * second run adds nothing.
 */
export async function seedEmbargoDemo(em: EntityManager, now: Date): Promise<number> {
  const project = await em.findOne(Project, { name: DEMO.project })
  const [depositor, steward, admin] = await Promise.all(
    [DEMO.depositor, DEMO.steward, DEMO.admin].map((email) => em.findOne(User, { email })),
  )
  if (!project || !depositor || !steward || !admin) return 0
  const template = await em.findOne(Dataset, { project: project.id, title: DEMO.describedLike })
  const document = template
    ? (await em.findOne(DatasetMetadata, { dataset: template.id }))?.document
    : undefined
  let created = 0
  const at = (daysAgo: number, hour = 10) =>
    new Date(dayStart(now.getTime()).getTime() - daysAgo * DAY + hour * 3600_000)

  const approvedDataset = async (
    spec: { title: string; description: string },
    embargoUntil: Date,
    history: (accession: string) => void,
  ) => {
    if (await em.findOne(Dataset, { project: project.id, title: spec.title })) return
    const dataset = em.create(Dataset, {
      accession: formatAccession(await nextSequenceValue(em, 'accession')),
      project: project.id,
      title: spec.title,
      description: spec.description,
      state: 'approved',
      createdBy: depositor.id,
      embargoUntil,
      submittedAt: at(40),
      approvedAt: at(35),
    })
    await em.flush()
    if (document)
      em.create(DatasetMetadata, { dataset: dataset.id, document, updatedBy: depositor.id })
    history(dataset.accession)
    await em.flush()
    created++
  }
  const lifecycle = (accession: string, firstEnd: Date) => {
    const target = { targetType: 'Dataset', targetId: accession }
    audit(em, { user: depositor }, { action: 'dataset.create', ...target, at: at(45) })
    audit(em, { user: depositor }, { action: 'dataset.metadata', ...target, at: at(44) })
    audit(em, { user: depositor }, { action: 'dataset.submit', ...target, at: at(40) })
    audit(
      em,
      { user: steward },
      {
        action: 'dataset.approve',
        ...target,
        details: {
          comment: 'Complete; embargo as proposed.',
          embargoUntil: firstEnd.toISOString(),
        },
        at: at(35),
      },
    )
  }

  const soonEnd = dayStart(now.getTime() + DEMO.endingSoon.endsInDays * DAY)
  await approvedDataset(DEMO.endingSoon, soonEnd, (accession) => lifecycle(accession, soonEnd))

  const pastEnd = dayStart(now.getTime() - DEMO.released.endedDaysAgo * DAY)
  const firstEnd = new Date(pastEnd.getTime() - 14 * DAY)
  await approvedDataset(DEMO.released, pastEnd, (accession) => {
    lifecycle(accession, firstEnd)
    audit(
      em,
      { user: steward },
      {
        action: 'dataset.embargo',
        targetType: 'Dataset',
        targetId: accession,
        details: {
          reason: 'The journal moved the publication date by two weeks.',
          from: firstEnd.toISOString(),
          to: pastEnd.toISOString(),
        },
        at: at(20, 15),
      },
    )
  })

  if (!(await em.findOne(User, { email: DEMO.deactivated.email }))) {
    const user = em.create(User, {
      email: DEMO.deactivated.email,
      name: DEMO.deactivated.name,
      subject: null,
      siteRole: null,
      organization: depositor.organization ?? null,
      lastSignInAt: at(60),
      deactivatedAt: at(5, 9),
    })
    await em.flush()
    audit(
      em,
      { user: admin },
      {
        action: 'user.deactivate',
        targetType: 'User',
        targetId: user.id,
        details: { reason: 'Left the consortium at the end of the visiting fellowship.' },
        at: at(5, 9),
      },
    )
    await em.flush()
    created++
  }
  return created
}
