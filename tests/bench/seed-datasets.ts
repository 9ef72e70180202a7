import type { EntityManager } from '@mikro-orm/better-sqlite'
import { formatAccession } from '@shared/domain/dataset-state'
import { DATASET_STATES } from '@shared/domain/dataset-state'
import { DatasetShare } from '@server/modules/datasets/dataset.entity'
import { Organization } from '@server/modules/organizations/organization.entity'
import { Membership, Project } from '@server/modules/projects/project.entity'
import { createToken } from '@server/modules/tokens/tokens.service'
import { User } from '@server/modules/users/user.entity'

const WORDS = [
  'Nup96',
  'PSD-95',
  'Bassoon',
  'gephyrin',
  'actin',
  'tubulin',
  'clathrin',
  'Homer1',
  'RIM1',
  'spectrin',
]
const METHODS = ['dSTORM', 'PALM', 'DNA-PAINT', '3D STORM', 'Exchange-PAINT']
const SAMPLES = ['U2OS', 'HeLa', 'COS-7', 'hippocampal neurons', 'HEK293', 'fibroblasts', 'Vero']
const LABELS = [
  'cyanine 5',
  'mEos3.2',
  'rhodamine',
  'oxazine',
  'photoactivatable rhodamine',
  'carbopyronine',
]
/** One dataset in RARE_EVERY mentions cryo-fixation: a search word that matches few datasets. */
export const RARE_EVERY = 499
export const PROJECTS = 20

/** The people the list benchmark asks as: personal access tokens, made before the run. */
export interface BenchPeople {
  /** Member of 4 projects (the repeated-query line asks as this person). */
  depositor: string
  /** Member of one project. */
  member: string
  /** No project; a few drafts shared with them. */
  collaborator: string
  /** Site steward: sees every dataset. */
  steward: string
}

/** A hash of `i`: states and projects independent of the words in the title. */
const spread = (i: number, salt: number) => (Math.imul(i + 1, 2654435761) >>> (salt * 4)) & 0xffff
const stateOf = (i: number) => DATASET_STATES[spread(i, 1) % DATASET_STATES.length]!

/** Title and description of bench dataset `i`, varied enough that search words match many or few. */
function textOf(i: number) {
  const word = WORDS[i % WORDS.length]!
  const method = METHODS[i % METHODS.length]!
  const sample = SAMPLES[i % SAMPLES.length]!
  const label = LABELS[i % LABELS.length]!
  const fixation = i % RARE_EVERY === 0 ? 'cryo-fixed' : 'chemically fixed'
  return {
    title: `${word} ${method} series ${i + 1}`,
    description:
      `${word} imaged by ${method} in ${fixation} ${sample}, labelled with ${label}. ` +
      `Acquisition ${(i % 40) + 1} of a benchmark series; drift corrected with fiducials.`,
  }
}

async function person(em: EntityManager, key: string, organization: number | null, extra = {}) {
  const user = em.create(User, {
    email: `${key}@bench.test`,
    name: `Bench ${key}`,
    subject: `bench-${key}`,
    organization,
    ...extra,
  })
  await em.flush()
  return user
}

/**
 * Benchmark data: `count` datasets spread over 20 projects in every state, inserted in one
 * transaction with multi-row INSERTs (the full-text index follows through its triggers), and the
 * people of BenchPeople with their tokens.
 */
export async function seedDatasets(em: EntityManager, count: number): Promise<BenchPeople> {
  const org = em.create(Organization, { name: 'Bench lab', emailDomain: 'bench.test' })
  await em.flush()
  const depositor = await person(em, 'depositor', org.id)
  const member = await person(em, 'member', org.id)
  const collaborator = await person(em, 'collaborator', null)
  const steward = await person(em, 'steward', org.id, { siteRole: 'steward' })
  const projects = Array.from({ length: PROJECTS }, (_, i) =>
    em.create(Project, { name: `Bench project ${i + 1}`, description: '' }),
  )
  await em.flush()
  for (const p of projects.slice(0, 4))
    em.create(Membership, { project: p.id, user: depositor.id, role: 'member' })
  em.create(Membership, { project: projects[5]!.id, user: member.id, role: 'member' })
  await em.flush()

  const base = Date.UTC(2024, 0, 1)
  const knex = em.getKnex()
  await knex.transaction(async (trx) => {
    for (let start = 0; start < count; start += 500) {
      const rows = []
      for (let i = start; i < Math.min(count, start + 500); i++) {
        const state = stateOf(i)
        const created = base + i * 3_600_000
        rows.push({
          accession: formatAccession(i + 1),
          ...textOf(i),
          project_id: projects[spread(i, 2) % projects.length]!.id,
          state,
          embargo_until:
            state === 'approved' && i % 4 === 0 ? new Date(base + 5 * 365 * 86_400_000) : null,
          licence: 'CC-BY-4.0',
          version: 1,
          // Dates, not numbers: each driver writes its database's form (epoch ms on SQLite).
          created_at: new Date(created),
          // Updates interleave differently from creation, so the two sorts read different pages.
          updated_at: new Date(created + ((i * 7919) % 1000) * 3_600_000),
        })
      }
      await trx('dataset').insert(rows)
    }
    await trx('sequence').insert({ name: 'accession', value: count })
  })
  // Eight drafts shared with the collaborator (ids are 1…count in insert order).
  const drafts = Array.from({ length: count }, (_, i) => i).filter((i) => stateOf(i) === 'draft')
  for (let k = 0; k < 8; k++)
    em.create(DatasetShare, {
      dataset: drafts[k * 37]! + 1,
      user: collaborator.id,
      capabilities: [],
    })
  await em.flush()

  const token = async (userId: number) =>
    (await createToken(em, userId, { name: 'bench', expiresInDays: 1 })).token
  return {
    depositor: await token(depositor.id),
    member: await token(member.id),
    collaborator: await token(collaborator.id),
    steward: await token(steward.id),
  }
}
