import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import type { ReviewDecision, ReviewDatasetInput } from '@shared/schemas/dataset.schema'
import ReviewDialog from '@/components/ReviewDialog.vue'

const vuetify = createVuetify()

async function dialogText(decision: ReviewDecision) {
  const sent: ReviewDatasetInput[] = []
  const wrapper = mount(ReviewDialog, {
    props: {
      modelValue: true,
      decision,
      proposedEmbargoUntil: null,
      save: async (body: ReviewDatasetInput) => sent.push(body),
    },
    global: { plugins: [vuetify] },
    attachTo: document.body,
  })
  await flushPromises()
  const text = document.body.textContent ?? ''
  wrapper.unmount()
  return text
}

describe('the steward’s decision dialog', () => {
  // happy-dom has no visualViewport; Vuetify's dialog positioning reads it.
  beforeEach(() => {
    vi.stubGlobal(
      'visualViewport',
      Object.assign(new EventTarget(), {
        ...{ width: 1024, height: 768, scale: 1, offsetLeft: 0, offsetTop: 0 },
      }),
    )
  })
  afterEach(() => vi.unstubAllGlobals())

  it('asks for the reason of a withdrawal, which goes on the tombstone page', async () => {
    const text = await dialogText('withdraw')
    expect(text).toContain('Reason for withdrawal')
    expect(text).toContain('tombstone page')
    expect(text).not.toContain('what must change')
  })

  it('asks what must change when changes are requested', async () => {
    const text = await dialogText('request_changes')
    expect(text).toContain('What must change')
    expect(text).not.toContain('withdraw')
  })
})
