import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { ACCESS_PHASES, type AccessPhase } from '@shared/domain/dataset-state'
import { datasetSubject, defineAbilityFor } from '@shared/permissions/abilities'
import { DATASET_ACTIONS } from '@shared/permissions/actions'
import { DATASET_MATRIX } from '@shared/permissions/matrix'
import { renderPermissionsMarkdown } from '@shared/permissions/render-matrix'
import type { Viewer } from '@shared/permissions/viewer'

const NOW = new Date('2026-06-15T12:00:00Z')
const subjectIn = (phase: AccessPhase, id = 1) =>
  datasetSubject({
    id,
    project: 7,
    state: phase === 'embargoed' || phase === 'released' ? 'approved' : phase,
    embargoUntil:
      phase === 'embargoed'
        ? new Date('2026-06-16T00:00:00Z')
        : phase === 'released'
          ? new Date('2026-06-15T00:00:00Z')
          : null,
  })
const viewer = (overrides: Partial<Viewer>): Viewer => ({
  id: 1,
  siteRole: null,
  organizationId: 3,
  memberships: [],
  shares: [],
  ...overrides,
})

describe('abilities built from the matrix', () => {
  const cases: [string, Viewer | null, keyof typeof DATASET_MATRIX][] = [
    ['public', null, 'public'],
    ['outsider', viewer({}), 'outsider'],
    ['member', viewer({ memberships: [{ projectId: 7, role: 'member' }] }), 'member'],
    ['owner', viewer({ memberships: [{ projectId: 7, role: 'owner' }] }), 'owner'],
    ['steward', viewer({ siteRole: 'steward' }), 'steward'],
    ['editor', viewer({ siteRole: 'editor', manuscriptDatasets: [1] }), 'editor'],
    // An editor whose journal has no manuscript with this dataset is an outsider to it.
    [
      'editor of another journal',
      viewer({ siteRole: 'editor', manuscriptDatasets: [2] }),
      'outsider',
    ],
    ['admin', viewer({ siteRole: 'admin' }), 'admin'],
    [
      'collaborator',
      viewer({
        organizationId: null,
        shares: [{ datasetId: 1, capabilities: ['preview', 'annotate', 'download'] }],
      }),
      'collaborator',
    ],
  ]
  it.each(cases)('%s: can() agrees with every cell', (_name, who, role) => {
    const ability = defineAbilityFor(who, NOW)
    expectCells(ability, role)
  })
  it('a reviewer link (signed out) agrees with the reviewer row, for its dataset only', () => {
    expectCells(defineAbilityFor(null, NOW, [1]), 'reviewer')
    expectCells(defineAbilityFor(null, NOW, [2]), 'public')
  })
  function expectCells(
    ability: ReturnType<typeof defineAbilityFor>,
    role: keyof typeof DATASET_MATRIX,
  ) {
    for (const phase of ACCESS_PHASES) {
      for (const action of DATASET_ACTIONS) {
        expect(ability.can(action, subjectIn(phase)), `${action} in ${phase}`).toBe(
          DATASET_MATRIX[role][action].includes(phase),
        )
      }
    }
  }

  it('a member of another project has only the public rights', () => {
    const ability = defineAbilityFor(
      viewer({ memberships: [{ projectId: 8, role: 'owner' }] }),
      NOW,
    )
    expect(ability.can('read', subjectIn('draft'))).toBe(false)
    expect(ability.can('read', subjectIn('released'))).toBe(true)
  })

  it('an embargo ends at 00:00 UTC of its day', () => {
    const facts = {
      id: 1,
      project: 7,
      state: 'approved' as const,
      embargoUntil: new Date('2026-06-16T00:00:00Z'),
    }
    expect(
      defineAbilityFor(null, new Date('2026-06-15T23:59:59Z')).can(
        'download',
        datasetSubject(facts),
      ),
    ).toBe(false)
    expect(
      defineAbilityFor(null, new Date('2026-06-16T00:00:00Z')).can(
        'download',
        datasetSubject(facts),
      ),
    ).toBe(true)
  })

  it('only people of a consortium organization may create projects', () => {
    expect(defineAbilityFor(viewer({}), NOW).can('create', 'Project')).toBe(true)
    expect(defineAbilityFor(viewer({ organizationId: null }), NOW).can('create', 'Project')).toBe(
      false,
    )
    expect(defineAbilityFor(null, NOW).can('create', 'Project')).toBe(false)
  })
})

describe('shared/permissions/PERMISSIONS.md', () => {
  it('is up to date with the matrix (run `npm run docs:permissions`)', () => {
    const committed = readFileSync(join(process.cwd(), 'shared/permissions/PERMISSIONS.md'), 'utf8')
    expect(committed).toBe(renderPermissionsMarkdown())
  })
})
