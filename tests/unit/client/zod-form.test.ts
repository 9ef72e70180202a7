import { describe, expect, it } from 'vitest'
import {
  createDatasetSchema,
  reviewDatasetSchema,
  updateDatasetSchema,
} from '@shared/schemas/dataset.schema'
import { ApiError } from '@/api/client'
import { useServerErrors, zodFieldRule, zodRule } from '@/composables/useZodForm'

describe('zodRule', () => {
  const title = zodRule(createDatasetSchema.shape.title)

  it("returns the shared schema's own messages", () => {
    expect(title(undefined)).toBe('Title is required')
    expect(title('  ')).toBe('Title needs at least 3 characters')
    expect(title('ab')).toBe('Title needs at least 3 characters')
    expect(title('x'.repeat(201))).toBe('Title can have at most 200 characters')
  })

  it('returns true for a valid value', () => {
    expect(title('Nuclear pore complexes, dSTORM')).toBe(true)
  })

  it('maps an emptied optional field to what the schema expects', () => {
    const embargo = zodRule(updateDatasetSchema.shape.proposedEmbargoUntil, { emptyAs: null })
    expect(embargo('')).toBe(true)
    expect(embargo('next summer')).toBe('Use a date such as 2027-06-30')
    expect(embargo('2027-06-30')).toBe(true)
  })

  it('checks rules that span fields by parsing the whole object', () => {
    let decision: 'approve' | 'withdraw' = 'withdraw'
    const comment = zodFieldRule(reviewDatasetSchema, () => ({ decision, comment: '' }), 'comment')
    expect(comment('')).toBe('Say what must change, or why the dataset is withdrawn')
    decision = 'approve'
    expect(comment('')).toBe(true)
  })
})

describe('useServerErrors', () => {
  it('puts field messages under their fields and forgets one once it is edited', () => {
    const errors = useServerErrors()
    errors.take(
      new ApiError({
        status: 400,
        title: 'Invalid request',
        errors: [{ pointer: '#/title', detail: 'Title is required' }],
      }),
    )
    expect(errors.of('title')).toEqual(['Title is required'])
    expect(errors.general).toBeNull()
    errors.forget('title')
    expect(errors.of('title')).toEqual([])
  })

  it('shows an error without field messages above the form', () => {
    const errors = useServerErrors()
    errors.take(
      new ApiError({ status: 403, title: 'Forbidden', detail: 'Only members can do that.' }),
    )
    expect(errors.general).toBe('Only members can do that.')
  })
})
