import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import type { OmeImportReport } from '@/api/metadata'
import OmeImportDialog from '@/components/metadata/OmeImportDialog.vue'
import { metadataVocabulary } from '@/utils/metadataVocabulary'
import { chosenValues, planImport, showValue } from '@/utils/omeImportPlan'

const schema = metadataVocabulary()
afterEach(() => vi.unstubAllGlobals())
// Shaped like the answer of POST /api/metadata/import for an Instrument with one objective.
const mapped: OmeImportReport['mapped'] = [
  { path: 'instrument.objective.lensNA', from: 'Instrument/Objective@LensNA', value: 1.49 },
  { path: 'instrument.objective.immersion', from: 'Instrument/Objective@Immersion', value: 'Oil' },
  { path: 'instrument.detector.type', from: 'Instrument/Detector@Type', value: 'CMOS' },
  { path: 'acquisition.frames', from: 'Image/Pixels@SizeT', value: 20000 },
]
const current = {
  instrument: { objective: { immersion: 'Oil' }, detector: { type: 'EMCCD' } },
  acquisition: { frames: '' },
}

describe('planning an OME-XML prefill', () => {
  it('fills empty fields, leaves equal ones, and holds back the ones that differ', () => {
    const plan = planImport(current, mapped, schema)
    expect(plan.fills.map((f) => f.path)).toEqual([
      'instrument.objective.lensNA',
      'acquisition.frames',
    ])
    expect(plan.unchanged.map((f) => f.path)).toEqual(['instrument.objective.immersion'])
    expect(plan.conflicts).toEqual([
      {
        path: 'instrument.detector.type',
        from: 'Instrument/Detector@Type',
        value: 'CMOS',
        current: 'EMCCD',
        label: 'Instrument › Detector › Detector type',
      },
    ])
  })

  it('writes a differing value only when the depositor takes it', () => {
    const plan = planImport(current, mapped, schema)
    expect(chosenValues(plan, new Set()).map((v) => v.path)).toEqual([
      'instrument.objective.lensNA',
      'acquisition.frames',
    ])
    expect(chosenValues(plan, new Set(['instrument.detector.type']))).toContainEqual({
      path: 'instrument.detector.type',
      value: 'CMOS',
    })
    expect(showValue(schema, 'acquisition.frames', 20000)).toBe('20000 frames')
  })

  it('shows the review in the dialog and hands back only what was chosen', async () => {
    const report: OmeImportReport = {
      metadata: {},
      mapped,
      ignored: [{ from: 'Instrument/Filter', reason: 'no place in Stipple’s metadata' }],
    }
    // Vuetify's dialog places itself against the visual viewport, which happy-dom lacks.
    vi.stubGlobal(
      'visualViewport',
      Object.assign(new EventTarget(), {
        width: 1024,
        height: 768,
        scale: 1,
        offsetLeft: 0,
        offsetTop: 0,
      }),
    )
    const wrapper = mount(OmeImportDialog, {
      props: { modelValue: true, read: async () => report, current, schema },
      global: { plugins: [createVuetify()] },
      attachTo: document.body,
    })
    await flushPromises()
    const body = () => document.body.textContent ?? ''
    const pasteBox = document.body.querySelector('textarea')!
    pasteBox.value = '<OME/>'
    pasteBox.dispatchEvent(new Event('input'))
    await flushPromises()
    const button = (text: string) =>
      [...document.body.querySelectorAll('button')].find((b) => b.textContent?.trim() === text)
    button('Read document')?.click()
    await flushPromises()
    expect(body()).toContain('Will fill 2 empty fields')
    expect(body()).toContain('Instrument › Objective › Numerical aperture (NA) = 1.49')
    expect(body()).toContain('yours EMCCD, imported CMOS')
    expect(body()).toContain('Not imported (1)')
    button('Fill 2 fields')?.click()
    await flushPromises()
    expect(wrapper.emitted('apply')?.[0]?.[0]).toEqual([
      { path: 'instrument.objective.lensNA', value: 1.49 },
      { path: 'acquisition.frames', value: 20000 },
    ])
    wrapper.unmount()
  })
})
