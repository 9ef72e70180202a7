import type { EntityManager } from '@mikro-orm/better-sqlite'
import { JournalEditor, Manuscript, ManuscriptDataset } from './manuscript.entity'

/** Journals this person edits (their site role is checked by the caller). */
export async function journalsEditedBy(em: EntityManager, userId: number): Promise<number[]> {
  const rows = await em.find(
    JournalEditor,
    { user: userId },
    { fields: ['journal'], disableIdentityMap: true },
  )
  return rows.map((r) => r.journal)
}

/** Datasets attached to any manuscript of the journals this person edits, for the abilities. */
export async function manuscriptDatasetsOf(em: EntityManager, userId: number): Promise<number[]> {
  const journals = await journalsEditedBy(em, userId)
  if (!journals.length) return []
  const rows = await em.find(
    ManuscriptDataset,
    { manuscript: { $in: await manuscriptIdsOf(em, journals) } },
    { fields: ['dataset'], disableIdentityMap: true },
  )
  return [...new Set(rows.map((r) => r.dataset))].sort((a, b) => a - b)
}

async function manuscriptIdsOf(em: EntityManager, journals: number[]): Promise<number[]> {
  const rows = await em.find(
    Manuscript,
    { journal: { $in: journals } },
    { fields: ['id'], disableIdentityMap: true },
  )
  return rows.map((r) => r.id)
}
