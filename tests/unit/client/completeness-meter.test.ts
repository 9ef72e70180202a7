import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import type { DatasetState } from '@shared/domain/dataset-state'
import { computeCompleteness } from '@shared/metadata/completeness'
import MetadataCompletenessMeter from '@/components/metadata/MetadataCompletenessMeter.vue'
import { completeMetadata } from '../../fixtures/metadata'

const complete = computeCompleteness(completeMetadata(), {
  title: 'A dataset',
  description: 'What was imaged.',
  licence: 'CC-BY-4.0',
})

function statusText(state?: DatasetState, completeness = complete) {
  const wrapper = mount(MetadataCompletenessMeter, {
    props: { completeness, state },
    global: { plugins: [createVuetify()] },
  })
  return wrapper.find('[data-testid="required-missing"]').text()
}

describe('the completeness meter', () => {
  it('offers submission only while the dataset can still be submitted', () => {
    expect(complete.readyToSubmit).toBe(true)
    expect(statusText('draft')).toBe('Ready to submit')
    expect(statusText('changes_requested')).toBe('Ready to submit')
    expect(statusText()).toBe('Ready to submit')
    for (const state of ['submitted', 'approved', 'withdrawn'] as const)
      expect(statusText(state)).toBe('Every required field filled')
  })

  it('counts the required fields still missing, whatever the state', () => {
    const partial = computeCompleteness({}, { title: 'A dataset' })
    expect(statusText('approved', partial)).toMatch(/^\d+ required missing$/)
  })
})
