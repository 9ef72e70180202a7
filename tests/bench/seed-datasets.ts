import type { EntityManager } from '@mikro-orm/better-sqlite'
import { formatAccession } from '@shared/domain/dataset-state'
import { DATASET_STATES } from '@shared/domain/dataset-state'
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

/**
 * Benchmark data: `count` datasets spread over 20 projects in every state, inserted in one
 * transaction with multi-row INSERTs, and a depositor who belongs to 4 of the projects.
 * Returns the depositor's personal access token.
 */
export async function seedDatasets(em: EntityManager, count: number): Promise<string> {
  const org = em.create(Organization, { name: 'Bench lab', emailDomain: 'bench.test' })
  const user = em.create(User, {
    email: 'depositor@bench.test',
    name: 'Bench depositor',
    subject: 'bench-1',
    organization: null,
  })
  await em.flush()
  user.organization = org.id
  const projects = Array.from({ length: 20 }, (_, i) =>
    em.create(Project, { name: `Bench project ${i + 1}`, description: '' }),
  )
  await em.flush()
  for (const p of projects.slice(0, 4))
    em.create(Membership, { project: p.id, user: user.id, role: 'member' })
  await em.flush()

  const base = Date.UTC(2024, 0, 1)
  const knex = em.getKnex()
  await knex.transaction(async (trx) => {
    for (let start = 0; start < count; start += 500) {
      const rows = []
      for (let i = start; i < Math.min(count, start + 500); i++) {
        const state = DATASET_STATES[i % DATASET_STATES.length]!
        const created = base + i * 3_600_000
        rows.push({
          accession: formatAccession(i + 1),
          title: `${WORDS[i % WORDS.length]} ${METHODS[i % METHODS.length]} series ${i + 1}`,
          description: 'Benchmark dataset',
          project_id: projects[i % projects.length]!.id,
          state,
          embargo_until: state === 'approved' && i % 4 === 0 ? base + 5 * 365 * 86_400_000 : null,
          licence: 'CC-BY-4.0',
          version: 1,
          created_at: created,
          updated_at: created,
        })
      }
      await trx('dataset').insert(rows)
    }
    await trx('sequence').insert({ name: 'accession', value: count })
  })
  return (await createToken(em, user.id, { name: 'bench', expiresInDays: 1 })).token
}
