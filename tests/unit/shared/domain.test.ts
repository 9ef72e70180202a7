import { describe, expect, it } from 'vitest'
import { ACCESSION_PATTERN, accessPhase, formatAccession } from '@shared/domain/dataset-state'
import { isSpdxLicenceId } from '@shared/domain/licences'
import { createDatasetSchema, reviewDatasetSchema, shareDatasetSchema, updateDatasetSchema } from '@shared/schemas/dataset.schema'
import { addMemberSchema } from '@shared/schemas/project.schema'
import { pointerToPath } from '@shared/api/problem'

describe('accessions', () => {
  it('use our prefix and at least six digits', () => {
    expect(formatAccession(42)).toBe('STPL-000042')
    expect(formatAccession(1234567)).toBe('STPL-1234567')
    expect(ACCESSION_PATTERN.test('STPL-000042')).toBe(true)
    expect(ACCESSION_PATTERN.test('STPL-42')).toBe(false)
  })
})

describe('access phases', () => {
  const now = new Date('2027-01-01T00:00:00Z')
  it.each([
    [{ state: 'draft' as const, embargoUntil: null }, 'draft'],
    [{ state: 'approved' as const, embargoUntil: null }, 'released'],
    [{ state: 'approved' as const, embargoUntil: new Date('2027-01-02T00:00:00Z') }, 'embargoed'],
    [{ state: 'approved' as const, embargoUntil: new Date('2027-01-01T00:00:00Z') }, 'released'],
    [{ state: 'withdrawn' as const, embargoUntil: new Date('2030-01-01T00:00:00Z') }, 'withdrawn'],
  ])('%o is %s', (facts, phase) => {
    expect(accessPhase(facts, now)).toBe(phase)
  })
})

describe('licences', () => {
  it('knows SPDX identifiers from the maintained list, case as SPDX writes them', () => {
    // Identifiers as listed by SPDX (DOMAIN.md 3.5).
    for (const id of ['CC0-1.0', 'CC-BY-4.0', 'CC-BY-SA-4.0', 'CC-BY-NC-4.0', 'ODbL-1.0', 'ODC-By-1.0', 'PDDL-1.0']) {
      expect(isSpdxLicenceId(id), id).toBe(true)
    }
    expect(isSpdxLicenceId('cc-by-4.0')).toBe(false)
    expect(isSpdxLicenceId('Public domain')).toBe(false)
  })
})

describe('shared request schemas', () => {
  it.each([
    ['a dataset with project and title', createDatasetSchema, { projectId: 1, title: 'Good title' }, true],
    ['a title of one letter', createDatasetSchema, { projectId: 1, title: '  x ' }, false],
    ['a dataset without project', createDatasetSchema, { title: 'No project' }, false],
    ['an unknown licence', createDatasetSchema, { projectId: 1, title: 'Bad licence', licence: 'MIT-ish' }, false],
    ['30 February', updateDatasetSchema, { proposedEmbargoUntil: '2027-02-30' }, false],
    ['28 February', updateDatasetSchema, { proposedEmbargoUntil: '2027-02-28' }, true],
    ['a field nobody may set', updateDatasetSchema, { accession: 'STPL-000001' }, false],
    ['an approval without comment', reviewDatasetSchema, { decision: 'approve' }, true],
    ['a withdrawal without reason', reviewDatasetSchema, { decision: 'withdraw' }, false],
    ['a share to a non-address', shareDatasetSchema, { email: 'not-an-address' }, false],
    ['a share granting edit', shareDatasetSchema, { email: 'a@b.test', capabilities: ['edit'] }, false],
    ['an owner invitation', addMemberSchema, { email: 'a@b.test', role: 'owner' }, true],
  ].map(([label, schema, input, valid]) => ({ label, schema, input, valid })))('$label → valid: $valid', ({ schema, input, valid }) => {
    expect(schema.safeParse(input).success).toBe(valid)
  })

  it('normalises e-mail addresses', () => {
    expect(addMemberSchema.parse({ email: ' Ada@Lab.TEST ', role: 'member' }).email).toBe('ada@lab.test')
  })

  it('maps problem pointers to field paths', () => {
    expect(pointerToPath('#/title')).toBe('title')
    expect(pointerToPath('#/region/pointsNm')).toBe('region.pointsNm')
  })
})
