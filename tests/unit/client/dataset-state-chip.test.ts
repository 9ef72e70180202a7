import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import DatasetStateChip from '@/components/DatasetStateChip.vue'

const vuetify = createVuetify()
const chip = (props: InstanceType<typeof DatasetStateChip>['$props']) =>
  mount(DatasetStateChip, { props, global: { plugins: [vuetify] } })

describe('DatasetStateChip', () => {
  it('labels a draft as a draft', () => {
    expect(chip({ state: 'draft' }).text()).toBe('Draft')
  })

  it('tells an approved dataset under embargo from a public one by its words', () => {
    const future = chip({ state: 'approved', embargoUntil: '2999-01-01' })
    expect(future.text()).toBe('Approved, under embargo')
    expect(future.attributes('data-phase')).toBe('embargoed')

    const past = chip({ state: 'approved', embargoUntil: '2001-01-01' })
    expect(past.text()).toBe('Approved, public')
    expect(chip({ state: 'approved', embargoUntil: null }).text()).toBe('Approved, public')
  })

  it('names requested changes and withdrawals', () => {
    expect(chip({ state: 'changes_requested' }).text()).toBe('Changes requested')
    expect(chip({ state: 'withdrawn' }).text()).toBe('Withdrawn')
  })
})
