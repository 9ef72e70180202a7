import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import { suggestMapping } from '@shared/domain/localization-columns'
import type { DatasetFileDto, FileValidation } from '@/api/files'
import FileMappingDialog from '@/components/files/FileMappingDialog.vue'
import FileSeparatorChoice from '@/components/files/FileSeparatorChoice.vue'
import { draftFrom, judgeMapping, withRole } from '@/utils/columnMapping'

const fileDto: DatasetFileDto = {
  id: 3,
  name: 'spots.csv',
  size: 120,
  sha256: 'ab'.repeat(32),
  kind: 'localization_table',
  status: 'needs_mapping',
  mediaType: 'text/csv',
  problem: null,
  summary: null,
  job: null,
  createdAt: '2026-01-01T00:00:00Z',
}

/** A table as the inspection reports it, with the shared suggestion for its header. */
function validationOf(header: string[], rows: string[][]): FileValidation {
  return {
    id: 3,
    name: 'spots.csv',
    kind: 'localization_table',
    status: 'needs_mapping',
    problem: null,
    mapping: null,
    report: {
      sniff: {
        delimiter: ',',
        hasHeader: true,
        header,
        sampleRows: rows,
        compression: 'none',
        decimalMark: '.',
        problems: [],
      },
      suggestion: suggestMapping(header, rows),
    },
  }
}
const inPixels = validationOf(
  ['frame', 'x [px]', 'y [px]', 'photons'],
  [
    ['1', '10.5', '20.25', '1500'],
    ['2', '11.0', '21.0', '1620'],
  ],
)

beforeEach(() => {
  // Vuetify's dialog places itself against the visual viewport, which happy-dom lacks.
  vi.stubGlobal(
    'visualViewport',
    Object.assign(new EventTarget(), {
      ...{ width: 1024, height: 768, scale: 1, offsetLeft: 0, offsetTop: 0 },
    }),
  )
})
afterEach(() => vi.unstubAllGlobals())

async function openDialog(validation: FileValidation, describedPixelNm: number | null) {
  const save = vi.fn(async () => {})
  const reread = vi.fn(async () => {})
  const wrapper = mount(FileMappingDialog, {
    props: {
      modelValue: true,
      file: fileDto,
      load: async () => validation,
      save,
      reread,
      describedPixelNm,
    },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  })
  await flushPromises()
  return { wrapper, save, reread }
}
const selections = () =>
  [...document.body.querySelectorAll('.v-select__selection-text')].map((e) => e.textContent)
const saveButton = () =>
  [...document.body.querySelectorAll('button')].find((b) =>
    b.textContent?.includes('Save and read the table'),
  )!
const pixelInput = () => document.body.querySelector<HTMLInputElement>('input[inputmode=decimal]')!

describe('the column mapping dialog', () => {
  it('starts from the suggestion and shows the sample rows under their columns', async () => {
    const { wrapper } = await openDialog(inPixels, null)
    // The separator read from the file, then roles, and units where the role takes one: from the
    // shared suggestion for this header.
    expect(selections()).toEqual([
      'comma',
      'frame',
      'x',
      'px (camera pixels)',
      'y',
      'px (camera pixels)',
      'photons',
      'photons',
    ])
    const table = document.body.querySelector('[data-testid="mapping-table"]')!
    expect(table.textContent).toContain('20.25')
    expect(document.body.textContent).toContain(
      'is in camera pixels: the pixel size in nm is needed',
    )
    wrapper.unmount()
  })

  it('asks for the pixel size when a column is in px, in the shared schema’s words', async () => {
    const { wrapper, save } = await openDialog(inPixels, null)
    expect(document.body.textContent).toContain('Columns in px need the pixel size in nm')
    expect(saveButton().disabled).toBe(true)
    // 6.5 µm camera pixels behind a 60× objective: 108.3 nm at the sample (DOMAIN.md 1.3).
    pixelInput().value = '108.3'
    pixelInput().dispatchEvent(new Event('input'))
    await flushPromises()
    expect(document.body.textContent).not.toContain('Columns in px need the pixel size in nm')
    saveButton().click()
    await flushPromises()
    expect(save).toHaveBeenCalledWith(3, {
      columns: [
        { index: 0, role: 'frame' },
        { index: 1, role: 'x', unit: 'px' },
        { index: 2, role: 'y', unit: 'px' },
        { index: 3, role: 'photons', unit: 'photons' },
      ],
      // Decided by the ingest from the whole frame column, unless the depositor says otherwise.
      frameBase: 'auto',
      pixelSizeNm: 108.3,
    })
    wrapper.unmount()
  })

  it('reads the columns again with another separator when the depositor chooses one', async () => {
    const { wrapper, reread } = await openDialog(inPixels, null)
    expect(document.body.textContent).toContain('Read from the file: comma')
    wrapper.findComponent(FileSeparatorChoice).vm.$emit('reread', ';')
    await flushPromises()
    expect(reread).toHaveBeenCalledWith(3, { delimiter: ';' })
    wrapper.unmount()
  })

  it('takes the pixel size from the description when it is known', async () => {
    const { wrapper } = await openDialog(inPixels, 160)
    expect(pixelInput().value).toBe('160')
    expect(saveButton().disabled).toBe(false)
    wrapper.unmount()
  })
})

describe('judging a mapping with the shared schema', () => {
  const bare = validationOf(['a', 'b', 'c'], [['1', '500', '800']])

  it('places each message where the dialog shows it', () => {
    const draft = draftFrom(bare, null)
    // Numeric columns with unknown names are kept as "other" (shared suggestMapping).
    expect(draft.rows.map((r) => r.role)).toEqual(['other', 'other', 'other'])
    expect(judgeMapping(draft).general).toEqual(['Map one column to x', 'Map one column to y'])

    draft.rows = draft.rows.map((r, i) => withRole(r, i === 0 ? 'frame' : 'x', 'nm'))
    const twice = judgeMapping(draft)
    expect(twice.columns[2]).toEqual({ role: 'Only one column can be x' })
    expect(twice.mapping).toBeNull()

    draft.rows[2] = withRole(draft.rows[2]!, 'y', 'nm')
    expect(judgeMapping(draft).mapping).toEqual({
      columns: [
        { index: 0, role: 'frame' },
        { index: 1, role: 'x', unit: 'nm' },
        { index: 2, role: 'y', unit: 'nm' },
      ],
      frameBase: 'auto',
    })
  })

  it('says which of a raw and a drift-corrected x it chose', async () => {
    const corrected = validationOf(
      ['frame', 'x [nm]', 'y [nm]', 'xc [nm]'],
      [['1', '100', '200', '98.5']],
    )
    const { wrapper } = await openDialog(corrected, null)
    const notes = document.body.querySelector('[data-testid="mapping-notes"]')
    expect(notes?.textContent).toContain('"xc [nm]" looks drift-corrected and is used as x')
    expect(selections().slice(1, 4)).toEqual(['frame', 'other (kept)', 'y'])
    wrapper.unmount()
  })

  it('keeps a fitting unit when the role changes and drops one the role does not take', () => {
    const row = { index: 0, name: 'w', role: 'x' as const, unit: 'um' as const }
    expect(withRole(row, 'sigma', 'nm').unit).toBe('um')
    expect(withRole(row, 'photons', 'nm').unit).toBe('photons')
    expect(withRole(row, 'channel', 'nm').unit).toBeNull()
  })

  it('changes an existing mapping from what was confirmed, not from the suggestion', () => {
    const confirmed: FileValidation = {
      ...bare,
      status: 'ready',
      mapping: {
        columns: [
          { index: 0, role: 'frame' },
          { index: 1, role: 'x', unit: 'um' },
          { index: 2, role: 'y', unit: 'um' },
        ],
        frameBase: 0,
      },
    }
    const draft = draftFrom(confirmed, 100)
    expect(draft.rows.map((r) => [r.role, r.unit])).toEqual([
      ['frame', null],
      ['x', 'um'],
      ['y', 'um'],
    ])
    expect(draft.frameBase).toBe(0)
    expect(draft.pixelSize).toBe('100')
  })
})
