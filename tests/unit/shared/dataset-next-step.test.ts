/**
 * The dataset page's status text for every state (issue 16, point 1): each state says its own next
 * step, and none of them claims "Ready to submit" once the dataset has left the depositor's hands.
 */
import { describe, expect, it } from 'vitest'
import { datasetNextStep } from '@shared/domain/dataset-next-step'
import type { DatasetDto } from '@shared/schemas/dataset.schema'

const now = new Date('2027-03-01T12:00:00Z')
const base: DatasetDto = {
  id: 3,
  accession: 'STPL-000003',
  title: 'Nup96 by dSTORM',
  description: '',
  project: { id: 1, name: 'Pores' },
  state: 'draft',
  embargoUntil: null,
  proposedEmbargoUntil: null,
  licence: 'CC-BY-4.0',
  version: 2,
  createdBy: null,
  createdAt: '2027-01-01T09:00:00Z',
  updatedAt: '2027-01-01T09:00:00Z',
  submittedAt: null,
  approvedAt: null,
}
const step = (overrides: Partial<DatasetDto>, requiredMissing?: number | null) =>
  datasetNextStep({ ...base, ...overrides }, { now, requiredMissing })
const whole = (s: { title: string; text: string }) => `${s.title} ${s.text}`

describe('the next step a dataset page shows', () => {
  it('a draft with empty required fields counts them and asks to fill them', () => {
    const s = step({}, 3)
    expect(s.phase).toBe('draft')
    expect(s.tone).toBe('warning')
    expect(whole(s)).toContain('3 required fields are still empty')
    expect(whole(s)).not.toMatch(/ready to submit/i)
    expect(step({}, 1).text).toContain('1 required field is still empty')
  })

  it('a draft with every required field filled is ready to submit', () => {
    const s = step({}, 0)
    expect(s.title).toBe('Ready to submit')
    expect(s.tone).toBe('info')
  })

  it('a draft whose description is not loaded yet makes no claim about its fields', () => {
    const s = step({}, null)
    expect(whole(s)).not.toMatch(/ready|empty|missing/i)
    expect(s.text).toContain('submit it for curation')
  })

  it('a submitted dataset waits for the steward, whatever its description', () => {
    const s = step({ state: 'submitted', submittedAt: '2027-02-10T08:30:00Z' }, 0)
    expect(s.title).toBe('Waiting for a data steward')
    expect(s.text).toContain('Submitted on 10 February 2027')
    expect(whole(s)).not.toMatch(/ready to submit/i)
  })

  it('changes requested quotes what the steward asked', () => {
    const s = step({
      state: 'changes_requested',
      stewardNote: {
        decision: 'request_changes',
        comment: 'Give the drift correction method.',
        at: '2027-02-12T16:00:00Z',
      },
    })
    expect(s.title).toBe('Changes requested')
    expect(s.text).toContain('on 12 February 2027')
    expect(s.text).toContain('“Give the drift correction method.”')
    expect(s.text).toContain('submit the dataset again')
  })

  it('changes requested without a recorded note says where the message went', () => {
    const s = step({ state: 'changes_requested' })
    expect(s.text).toContain('by e-mail')
    expect(s.text).not.toContain('“')
  })

  it('an approved dataset under embargo names the day it is released', () => {
    const s = step({
      state: 'approved',
      approvedAt: '2027-02-20T10:00:00Z',
      embargoUntil: '2027-09-30',
    })
    expect(s.phase).toBe('embargoed')
    expect(s.title).toBe('Under embargo until 30 September 2027')
    expect(s.text).toContain('Approved on 20 February 2027 as version 2')
    expect(whole(s)).not.toMatch(/ready to submit|waiting/i)
  })

  it('an approved dataset without embargo is public since its approval', () => {
    const s = step({ state: 'approved', approvedAt: '2027-02-20T10:00:00Z' })
    expect(s.phase).toBe('released')
    expect(s.tone).toBe('success')
    expect(s.title).toBe('Public since 20 February 2027')
    expect(s.text).toContain('STPL-000003')
  })

  it('an approved dataset whose embargo has ended is public since the embargo date', () => {
    const s = step({
      state: 'approved',
      approvedAt: '2026-05-01T10:00:00Z',
      embargoUntil: '2027-01-15',
    })
    expect(s.phase).toBe('released')
    expect(s.title).toBe('Public since 15 January 2027')
  })

  it('a withdrawn dataset is a tombstone that gives the reason', () => {
    const s = step({
      state: 'withdrawn',
      approvedAt: '2026-05-01T10:00:00Z',
      stewardNote: {
        decision: 'withdraw',
        comment: 'Faulty drift correction.',
        at: '2027-02-01T09:00:00Z',
      },
    })
    expect(s.tone).toBe('error')
    expect(s.title).toBe('Withdrawn on 1 February 2027')
    expect(s.text).toContain('Reason: “Faulty drift correction.”')
    expect(s.text).toContain('citations of STPL-000003')
    expect(s.text).toContain('no longer offered')
    expect(step({ state: 'withdrawn' }).title).toBe('Withdrawn')
  })

  it('uses the date format it is given', () => {
    const s = datasetNextStep(
      {
        ...base,
        state: 'approved',
        approvedAt: '2027-02-20T10:00:00Z',
        embargoUntil: '2027-09-30',
      },
      { now, formatDate: (v) => `<${v}>` },
    )
    expect(s.title).toBe('Under embargo until <2027-09-30>')
  })
})
