import { describe, expect, it } from 'vitest'
import { mount, type VueWrapper } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import { VCombobox, VSelect, VTextarea } from 'vuetify/components'
import { OME_IMMERSIONS } from '@shared/metadata/ome-terms'
import MetadataForm from '@/components/metadata/MetadataForm.vue'
import type { Draft } from '@/utils/metadataPaths'
import { metadataVocabulary, type SchemaNode } from '@/utils/metadataVocabulary'

const vocabulary = metadataVocabulary()
/**
 * The vocabulary cut down to some fields (`*` steps into a list's entries), each node as the
 * real schema has it: drawing fewer Vuetify inputs keeps each test quick.
 */
function pick(...paths: string[]): SchemaNode {
  const root: SchemaNode = { ...vocabulary, properties: {} }
  for (const path of paths) {
    let from: SchemaNode | undefined = vocabulary
    let to = root
    for (const key of path.split('.')) {
      if (key === '*') {
        from = from?.items
        to.items ??= { ...from, properties: {} }
        to = to.items
        continue
      }
      from = from?.properties?.[key]
      if (!from || !to.properties) throw new Error(`No field ${path}`)
      const last = key === path.split('.').at(-1)
      to.properties[key] ??= last ? from : { ...from, properties: from.properties && {} }
      to = to.properties[key]
    }
  }
  return root
}
const schema = pick(
  'instrument.microscopeType',
  'instrument.objective.lensNA',
  'instrument.objective.immersion',
  'instrument.objective.correction',
  'instrument.detector.pixelSizeNm',
)
const sectionsOnly: SchemaNode = {
  ...vocabulary,
  properties: Object.fromEntries(
    Object.entries(vocabulary.properties ?? {}).map(([k, v]) => [
      k,
      { ...v, properties: {}, items: undefined, type: 'object' },
    ]),
  ),
}

const vuetify = createVuetify()

function render(props: Record<string, unknown> = {}, document: Draft = {}) {
  return mount(MetadataForm, {
    props: { schema, document, open: ['study', 'biosample', 'labelling', 'instrument'], ...props },
    global: { plugins: [vuetify] },
    attachTo: window.document.body,
  })
}

/** The field whose label starts with `label`, found as a person would. */
function field(wrapper: VueWrapper, label: string) {
  const found = wrapper
    .findAll('.v-input')
    .find((f) => f.find('label').exists() && f.find('label').text().startsWith(label))
  if (!found) throw new Error(`No field labelled ${label}`)
  return found
}

describe('the form generated from the schema', () => {
  it('has one panel per section, titled with its completeness', () => {
    const wrapper = render({ schema: sectionsOnly })
    const titles = wrapper.findAll('.v-expansion-panel-title').map((t) => t.text())
    expect(titles.map((t) => t.split(/\s/)[0])).toEqual([
      'Study',
      'Biosample',
      'Labelling',
      'Instrument',
      'Acquisition',
      'Localization',
      'Files',
    ])
    wrapper.unmount()
  })

  it('puts the unit beside numbers and the tier in words in the label', () => {
    const wrapper = render()
    const pixel = field(wrapper, 'Pixel size at the sample')
    expect(pixel.find('.v-text-field__suffix').text()).toBe('nm')
    expect(pixel.find('input').attributes('inputmode')).toBe('decimal')
    expect(field(wrapper, 'Numerical aperture (NA)').find('label').text()).toBe(
      'Numerical aperture (NA) required',
    )
    expect(field(wrapper, 'Microscope stand').find('.tier-mark').text()).toBe('recommended')
    expect(field(wrapper, 'Correction').find('.tier-mark').exists()).toBe(false)
    wrapper.unmount()
  })

  it('offers an enumeration as a select with exactly its values', () => {
    const wrapper = render()
    const immersion = wrapper
      .findAllComponents(VSelect)
      .find((s) => s.props('label') === undefined && s.text().startsWith('Immersion'))
    // Words on screen, the OME identifier as the value (it is what the exports write).
    expect(immersion?.props('items')).toContainEqual({
      title: 'Water dipping',
      value: 'WaterDipping',
    })
    expect(immersion?.props('items')?.map((i: { value: string }) => i.value)).toEqual([
      ...OME_IMMERSIONS,
    ])
    wrapper.unmount()
  })

  it('chooses textareas, chips and suggestion lists from the schema keywords', () => {
    const wrapper = render(
      {
        schema: pick('study.keywords', 'biosample.preparation', 'labelling.*.target'),
        suggestions: { 'labelling.*.target': ['Nup96', 'Nup107'] },
      },
      { labelling: [{}] },
    )
    const textareas = wrapper.findAllComponents(VTextarea).map((t) => t.text())
    expect(textareas.some((t) => t.startsWith('Sample preparation'))).toBe(true)
    const comboboxes = wrapper.findAllComponents(VCombobox)
    const keywords = comboboxes.find((c) => c.text().startsWith('Keywords'))
    expect(keywords?.props('multiple')).toBe(true)
    const target = comboboxes.find((c) => c.text().startsWith('Target'))
    expect(target?.props('items')).toEqual(['Nup96', 'Nup107'])
    wrapper.unmount()
  })

  it('raises a tier when told to (an ethics reference for a human sample)', () => {
    const wrapper = render({
      schema: pick('biosample.ethicsReference'),
      tiers: { 'biosample.ethicsReference': 'required' },
    })
    expect(field(wrapper, 'Ethics approval').find('.tier-mark').text()).toBe('required')
    wrapper.unmount()
  })

  it('reports numbers as numbers, unfinished ones as text, and blanks as nothing', async () => {
    const wrapper = render()
    const input = field(wrapper, 'Numerical aperture (NA)').find('input')
    await input.setValue('1,49')
    await input.setValue('1.4x')
    await input.setValue('')
    expect(wrapper.emitted('update')).toEqual([
      ['instrument.objective.lensNA', 1.49],
      ['instrument.objective.lensNA', '1.4x'],
      ['instrument.objective.lensNA', undefined],
    ])
    wrapper.unmount()
  })

  it('shows each message under the field it is about', () => {
    const wrapper = render({
      messages: {
        'instrument.objective.lensNA': 'An NA of 1.6 is not possible with oil immersion',
      },
    })
    expect(field(wrapper, 'Numerical aperture (NA)').text()).toContain(
      'An NA of 1.6 is not possible with oil immersion',
    )
    wrapper.unmount()
  })

  it('adds and removes list entries', async () => {
    const wrapper = render(
      { schema: pick('study.authors.*.name') },
      { study: { authors: [{ name: 'A' }, { name: 'B' }] } },
    )
    await wrapper
      .findAll('button')
      .find((b) => b.text() === 'Add author')
      ?.trigger('click')
    await wrapper.find('button[aria-label="Remove author 1"]').trigger('click')
    expect(wrapper.emitted('update')).toEqual([
      ['study.authors', [{ name: 'A' }, { name: 'B' }, {}]],
      ['study.authors', [{ name: 'B' }]],
    ])
    wrapper.unmount()
  })

  it('only shows the values when it is read-only', () => {
    const wrapper = render({ readonly: true }, { instrument: { objective: { lensNA: 1.49 } } })
    const na = field(wrapper, 'Numerical aperture (NA)').find('input')
    expect(na.element.value).toBe('1.49')
    expect(na.attributes('readonly')).toBeDefined()
    expect(wrapper.findAll('button').filter((b) => b.text().startsWith('Add'))).toEqual([])
    wrapper.unmount()
  })
})
