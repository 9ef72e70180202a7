import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import type { DatasetFileDto, FileValidation, StackReport, TableReport } from '@/api/files'
import FileReportDialog from '@/components/files/FileReportDialog.vue'
import FileTableReport from '@/components/files/FileTableReport.vue'
import { boundsText, framesText, scaleNote } from '@/utils/fileReport'

const vuetify = createVuetify()

// Shaped like the server's ingest report of a 5-row table whose 4th line has a word for a frame.
const tableReport: TableReport = {
  rowsRead: 5,
  rowsAccepted: 4,
  rowsRejected: 1,
  rejected: {
    not_a_number: {
      count: 1,
      description: 'text in a numeric column',
      examples: [{ line: 4, column: 'frame', text: 'three,1220.0,3420.0,1700' }],
    },
    field_count: {
      count: 7,
      description: 'wrong number of fields',
      examples: [
        { line: 9, text: '9,1,2' },
        { line: 12, text: '12' },
      ],
    },
  },
  columns: [
    { name: 'frame', role: 'frame', unit: null, sourceColumn: 'frame', min: 0, max: 4, count: 4 },
    { name: 'x', role: 'x', unit: 'nm', sourceColumn: 'x [nm]', min: 1200.5, max: 1240, count: 4 },
  ],
  boundsNm: { xMin: 1200.5, xMax: 1240, yMin: 3400.25, yMax: 3440 },
  frames: { first: 0, last: 4, sourceBase: 1 },
  aduColumns: ['photons'],
  problems: [],
}

describe('the report of a localization table', () => {
  it('lists the rejected rows by reason with their line numbers', () => {
    const text = mount(FileTableReport, {
      props: { report: tableReport },
      global: { plugins: [vuetify] },
    }).text()
    expect(text).toContain('1 row: text in a numeric column')
    expect(text).toContain('Line 4, column “frame”: three,1220.0,3420.0,1700')
    expect(text).toContain('7 rows: wrong number of fields')
    expect(text).toContain('Line 9: 9,1,2')
    expect(text).toContain('Line 12: 12')
    expect(text).toContain('The first 2 are shown.')
    expect(text).toContain('x [nm]')
    expect(text).toContain('1,200.5')
    expect(text).toContain('photons is in ADU (camera counts)')
  })

  it('gives the extent in µm and the frame range in both countings', () => {
    // 1 µm = 1000 nm (SI).
    expect(boundsText(tableReport.boundsNm)).toBe(
      'x 1.2 to 1.24 µm, y 3.4 to 3.44 µm (0.04 × 0.04 µm)',
    )
    expect(framesText({ first: 0, last: 999, sourceBase: 1 })).toBe(
      '0 to 999 as stored, counted from 0 (1 to 1,000 in the file, which counts from 1; a span of 1,000 frames)',
    )
    expect(framesText({ first: 5, last: 9, sourceBase: 0 })).toBe('5 to 9 (a span of 5 frames)')
  })
})

describe('the report of a raw stack', () => {
  it('says what a thumbnail pixel stands for', () => {
    // 1024 px wide shown at 512: 2 × 2 camera pixels per thumbnail pixel.
    const note = scaleNote({ width: 1024, height: 1024, frames: 20000 }, 512, 160)
    expect(note.reduction).toBe(2)
    expect(note.text).toContain('reduced 2×')
    // 1024 × 160 nm = 163.84 µm; the longest round bar (1, 2 or 5 × 10ⁿ) within a fifth of it is 20 µm.
    expect(note.text).toContain('Field of view 163.84 × 163.84 µm')
    expect(note.bar).toEqual({ label: '20 µm', fraction: 20_000 / 163_840 })
    expect(scaleNote({ width: 256, height: 256, frames: 10 }, 256, null).bar).toBeNull()
  })

  beforeEach(() => {
    vi.stubGlobal(
      'visualViewport',
      Object.assign(new EventTarget(), {
        ...{ width: 1024, height: 768, scale: 1, offsetLeft: 0, offsetTop: 0 },
      }),
    )
  })
  afterEach(() => vi.unstubAllGlobals())

  it('shows dimensions, the projection, the trace and the OME-XML prefill', async () => {
    const prefill = { metadata: {}, mapped: [], ignored: [] }
    const stack: StackReport = {
      ...{ format: 'tiff', byteOrder: 'little-endian', width: 512, height: 256, frames: 4 },
      ...{ bitsPerSample: 16, sampleFormat: 'unsigned', compression: 'none', fileSet: [] },
      ...{ hasOmeXml: true, omePrefill: prefill, thumbnail: { width: 512, height: 256 } },
    }
    const validation: FileValidation = {
      ...{ id: 8, name: 'stack.ome.tif', kind: 'raw_stack', status: 'ready', problem: null },
      ...{ mapping: null, report: stack },
    }
    const file = { id: 8, name: 'stack.ome.tif', kind: 'raw_stack', status: 'ready' }
    const wrapper = mount(FileReportDialog, {
      props: {
        ...{ modelValue: true, file: file as DatasetFileDto, load: async () => validation },
        ...{ loadTrace: async () => [100, 102, 99, 101], pixelSizeNm: null, canUseOme: true },
        thumbnailUrl: (id: number) => `/api/datasets/1/files/${id}/thumbnail.png`,
      },
      global: { plugins: [vuetify] },
      attachTo: document.body,
    })
    await flushPromises()
    const report = document.body.querySelector('[data-testid="file-report"]')!
    expect(report.querySelector('[data-testid="stack-facts"]')?.textContent).toContain(
      '512 × 256 pixels',
    )
    expect(report.textContent).toContain('16-bit unsigned')
    expect(report.querySelector('img')?.getAttribute('src')).toBe(
      '/api/datasets/1/files/8/thumbnail.png',
    )
    expect(report.textContent).toContain('at full size (one thumbnail pixel is one camera pixel)')
    expect(report.querySelector('svg')?.textContent).toContain('mean intensity (counts)')
    const useOme = [...report.querySelectorAll('button')].find((b) =>
      b.textContent?.includes('Use the OME-XML in this stack'),
    )
    useOme?.click()
    await flushPromises()
    expect(wrapper.emitted('useOme')?.[0]).toEqual([prefill])
    wrapper.unmount()
  })
})
