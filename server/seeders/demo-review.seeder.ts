import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { AppConfig } from '../config'
import { audit } from '../modules/audit/audit.service'
import { Dataset } from '../modules/datasets/dataset.entity'
import {
  Journal,
  JournalEditor,
  Manuscript,
  ManuscriptDataset,
} from '../modules/manuscripts/manuscript.entity'
import { ReviewerLink } from '../modules/reviewer-links/reviewer-link.entity'
import { demoReviewerToken, hashReviewerToken } from '../modules/reviewer-links/reviewer-link-token'
import { User } from '../modules/users/user.entity'

const JOURNAL = 'Journal of Nanoscale Imaging Methods'
const EDITOR = 'tobias.wren@journal.example'
const OWNER = 'mireille.stroud@harrowgate.example'
const MANUSCRIPT = {
  reference: 'NIM-2026-0412',
  title: 'Subunit-resolved maps of the nuclear pore scaffold',
}
/** The manuscript's data: one embargoed dataset with a named link, one in curation with an anonymous one. */
const LINKED = [
  { title: 'Nup107 DNA-PAINT eight-fold symmetry series', anonymous: false },
  { title: 'Nuclear envelope Exchange-PAINT, two scaffold targets', anonymous: true },
]
const LINK_DAYS = 30

/**
 * The editors' part of the demo: the demo editor's journal, a manuscript of it with two datasets
 * attached by their owner, and a live reviewer link to each (one anonymous). The links' tokens
 * are derived from the server secret, so the owner's page can show the URLs (demo mode only).
 * Idempotent: found by natural keys first.
 */
export async function seedDemoReview(
  em: EntityManager,
  config: Pick<AppConfig, 'sessionSecrets'>,
  now = new Date(),
): Promise<number> {
  const [editor, owner] = await Promise.all([
    em.findOne(User, { email: EDITOR }),
    em.findOne(User, { email: OWNER }),
  ])
  if (!editor || !owner) return 0
  let created = 0
  let journal = await em.findOne(Journal, { name: JOURNAL })
  if (!journal) {
    journal = em.create(Journal, { name: JOURNAL })
    await em.flush()
    em.create(JournalEditor, { journal: journal.id, user: editor.id })
    created += 2
  }
  let manuscript = await em.findOne(Manuscript, {
    journal: journal.id,
    reference: MANUSCRIPT.reference,
  })
  if (manuscript) return created
  manuscript = em.create(Manuscript, { journal: journal.id, ...MANUSCRIPT, createdBy: owner.id })
  await em.flush()
  created++
  for (const { title, anonymous } of LINKED) {
    const dataset = await em.findOne(Dataset, { title })
    if (!dataset) continue
    em.create(ManuscriptDataset, {
      manuscript: manuscript.id,
      dataset: dataset.id,
      attachedBy: owner.id,
    })
    const token = demoReviewerToken(config.sessionSecrets[0]!, dataset.accession, anonymous)
    em.create(ReviewerLink, {
      dataset: dataset.id,
      version: dataset.version,
      tokenHash: hashReviewerToken(token),
      anonymous,
      expiresAt: new Date(now.getTime() + LINK_DAYS * 86_400_000),
      createdBy: owner.id,
      demo: true,
    })
    const actor = { user: { id: owner.id } }
    audit(em, actor, {
      action: 'manuscript.attach',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { manuscript: manuscript.id, reference: manuscript.reference },
    })
    audit(em, actor, {
      action: 'reviewer_link.create',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { anonymous, demo: true },
    })
    created += 2
  }
  await em.flush()
  return created
}
