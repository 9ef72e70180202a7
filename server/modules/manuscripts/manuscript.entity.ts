import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { Dataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'

/** A journal whose editors check the data behind its manuscripts. */
export const Journal = defineEntity({
  name: 'Journal',
  properties: {
    id: p.integer().primary(),
    name: p.string().unique(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IJournal = InferEntity<typeof Journal>

/**
 * An editor belongs to a journal through this row (one person may edit several journals). It
 * opens that journal's manuscripts only while the person also holds the site role 'editor'.
 */
export const JournalEditor = defineEntity({
  name: 'JournalEditor',
  uniques: [{ properties: ['journal', 'user'] }],
  properties: {
    id: p.integer().primary(),
    journal: p.manyToOne(Journal).mapToPk().deleteRule('cascade'),
    user: p.manyToOne(User).mapToPk().index().deleteRule('cascade'),
  },
})
export type IJournalEditor = InferEntity<typeof JournalEditor>

/** A manuscript under consideration at a journal, created by a depositor to link its data. */
export const Manuscript = defineEntity({
  name: 'Manuscript',
  uniques: [{ properties: ['journal', 'reference'] }],
  properties: {
    id: p.integer().primary(),
    journal: p.manyToOne(Journal).mapToPk().index(),
    /** The journal's own manuscript number, e.g. "NIM-2026-0412". */
    reference: p.string(),
    title: p.string(),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IManuscript = InferEntity<typeof Manuscript>

/** A dataset attached to a manuscript by one of its depositors: the journal's editors may read it. */
export const ManuscriptDataset = defineEntity({
  name: 'ManuscriptDataset',
  uniques: [{ properties: ['manuscript', 'dataset'] }],
  properties: {
    id: p.integer().primary(),
    manuscript: p.manyToOne(Manuscript).mapToPk().deleteRule('cascade'),
    dataset: p.manyToOne(Dataset).mapToPk().index().deleteRule('cascade'),
    attachedBy: p.manyToOne(User).mapToPk().nullable(),
    attachedAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IManuscriptDataset = InferEntity<typeof ManuscriptDataset>
