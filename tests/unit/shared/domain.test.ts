import { describe, expect, it } from 'vitest'
import type { z } from 'zod'
import { ACCESSION_PATTERN, accessPhase, formatAccession } from '@shared/domain/dataset-state'
import { isSpdxLicenceId } from '@shared/domain/licences'
import {
  createDatasetSchema,
  reviewDatasetSchema,
  shareDatasetSchema,
  updateDatasetSchema,
} from '@shared/schemas/dataset.schema'
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
    for (const id of [
      'CC0-1.0',
      'CC-BY-4.0',
      'CC-BY-SA-4.0',
      'CC-BY-NC-4.0',
      'ODbL-1.0',
      'ODC-By-1.0',
      'PDDL-1.0',
    ]) {
      expect(isSpdxLicenceId(id), id).toBe(true)
    }
    expect(isSpdxLicenceId('cc-by-4.0')).toBe(false)
    expect(isSpdxLicenceId('Public domain')).toBe(false)
  })
})

describe('shared request schemas', () => {
  const cases: { label: string; schema: z.ZodType; input: unknown; valid: boolean }[] = [
    {
      label: 'a dataset with project and title',
      schema: createDatasetSchema,
      input: { projectId: 1, title: 'Good title' },
      valid: true,
    },
    {
      label: 'a title of one letter',
      schema: createDatasetSchema,
      input: { projectId: 1, title: '  x ' },
      valid: false,
    },
    {
      label: 'a dataset without project',
      schema: createDatasetSchema,
      input: { title: 'No project' },
      valid: false,
    },
    {
      label: 'an unknown licence',
      schema: createDatasetSchema,
      input: { projectId: 1, title: 'Bad licence', licence: 'MIT-ish' },
      valid: false,
    },
    {
      label: '30 February',
      schema: updateDatasetSchema,
      input: { proposedEmbargoUntil: '2027-02-30' },
      valid: false,
    },
    {
      label: '28 February',
      schema: updateDatasetSchema,
      input: { proposedEmbargoUntil: '2027-02-28' },
      valid: true,
    },
    {
      label: 'a field nobody may set',
      schema: updateDatasetSchema,
      input: { accession: 'STPL-000001' },
      valid: false,
    },
    {
      label: 'an approval without comment',
      schema: reviewDatasetSchema,
      input: { decision: 'approve' },
      valid: true,
    },
    {
      label: 'a withdrawal without reason',
      schema: reviewDatasetSchema,
      input: { decision: 'withdraw' },
      valid: false,
    },
    {
      label: 'a share to a non-address',
      schema: shareDatasetSchema,
      input: { email: 'not-an-address' },
      valid: false,
    },
    {
      label: 'a share granting edit',
      schema: shareDatasetSchema,
      input: { email: 'a@b.test', capabilities: ['edit'] },
      valid: false,
    },
    {
      label: 'an owner invitation',
      schema: addMemberSchema,
      input: { email: 'a@b.test', role: 'owner' },
      valid: true,
    },
  ]
  it.each(cases)('$label → valid: $valid', ({ schema, input, valid }) => {
    expect(schema.safeParse(input).success).toBe(valid)
  })

  it('normalises e-mail addresses', () => {
    expect(addMemberSchema.parse({ email: ' Ada@Lab.TEST ', role: 'member' }).email).toBe(
      'ada@lab.test',
    )
  })

  it('maps problem pointers to field paths', () => {
    expect(pointerToPath('#/title')).toBe('title')
    expect(pointerToPath('#/region/pointsNm')).toBe('region.pointsNm')
  })
})
