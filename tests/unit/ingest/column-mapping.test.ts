import { describe, expect, it } from 'vitest'
import { parseHeaderName, suggestMapping } from '@shared/domain/localization-columns'
import {
  columnMappingSchema,
  mappingFromSuggestion,
} from '@shared/schemas/localization-mapping.schema'

describe('parseHeaderName', () => {
  it.each([
    ['x [nm]', 'x', 'nm'],
    ['x (px)', 'x', 'px'],
    ['x_nm', 'x', 'nm'],
    ['x-nm', 'x', 'nm'],
    ['X (µm)', 'x', 'um'],
    ['Y (μm)', 'y', 'um'],
    ['x / nm', 'x', 'nm'],
    ['"x [nm]"', 'x', 'nm'],
    ['pos_x', 'x', null],
    ['xpos', 'x', null],
    ['frame', 'frame', null],
    ['Frames', 'frame', null],
    ['frame_number', 'frame', null],
    ['intensity [photon]', 'photons', 'photons'],
    ['n_photons', 'photons', null],
    ['photons (ADU)', 'photons', 'adu'],
    ['signal [counts]', 'photons', 'adu'],
    ['bg', 'background', null],
    ['background_photons', 'background', null],
    ['psf_sigma [nm]', 'sigma', 'nm'],
    ['sigma_x [nm]', 'sigmaX', 'nm'],
    ['uncertainty_xy [nm]', 'uncertainty', 'nm'],
    ['loc_precision', 'uncertainty', null],
    ['CRLB', 'uncertainty', null],
    ['uncertainty_z [nm]', 'uncertaintyZ', 'nm'],
    ['channel', 'channel', null],
  ])('%s → %s in %s', (name, role, unit) => {
    expect(parseHeaderName(name)).toMatchObject({ role, unit })
  })

  it('does not read offset without a photon unit as background, time as frames, or amplitude', () => {
    for (const name of ['offset', 'offset [px]', 'time', 'time [s]', 't [s]', 'amplitude']) {
      expect(parseHeaderName(name).role, name).toBeNull()
    }
    expect(parseHeaderName('t (ms)').time).toBe(true)
  })

  it('reports a unit it does not read', () => {
    expect(parseHeaderName('x [mm]')).toMatchObject({ role: 'x', unit: null, unknownUnit: 'mm' })
  })
})

describe('suggestMapping', () => {
  it('is confident on a typical header with units', () => {
    const header = [
      'frame',
      'x [nm]',
      'y [nm]',
      'sigma [nm]',
      'intensity [photon]',
      'offset [photon]',
      'bkgstd [photon]',
      'uncertainty_xy [nm]',
    ]
    const s = suggestMapping(header, [['1', '120.5', '88.25', '130', '1500', '100', '3', '4.1']])
    expect(s.confident).toBe(true)
    expect(s.problems).toEqual([])
    expect(s.columns.map((c) => c.role)).toEqual([
      'frame',
      'x',
      'y',
      'sigma',
      'photons',
      'background',
      'backgroundSd',
      'uncertainty',
    ])
    // The frame base is left to the ingest, which sees the whole column.
    expect(s.frameBase).toBe('auto')
    expect(mappingFromSuggestion(s)).not.toBeNull()
  })

  it('fills units of unitless widths from x', () => {
    const s = suggestMapping(
      ['frame', 'x_nm', 'y_nm', 'sigma', 'photons'],
      [['0', '1', '2', '130', '900']],
    )
    expect(s.columns.find((c) => c.role === 'sigma')?.unit).toBe('nm')
    expect(s.columns.find((c) => c.role === 'photons')?.unit).toBe('photons')
  })

  it('asks when x and y have no unit', () => {
    const s = suggestMapping(['frame', 'x', 'y', 'photons'])
    expect(s.confident).toBe(false)
    expect(s.problems.join(' ')).toContain('The unit of "x" is not stated')
  })

  it('asks when positions are in pixels (the pixel size is needed)', () => {
    const s = suggestMapping(['x (px)', 'y (px)'])
    expect(s.confident).toBe(false)
    expect(s.problems.join(' ')).toContain('pixel size')
  })

  it('asks when a role is claimed twice, and keeps the first', () => {
    const s = suggestMapping(['x [nm]', 'y [nm]', 'x [px]'])
    expect(s.confident).toBe(false)
    expect(s.columns.map((c) => c.role)).toEqual(['x', 'y', 'other'])
    expect(s.problems[0]).toContain('both look like x')
  })

  it('says in words that a table without x or y cannot be read', () => {
    const s = suggestMapping(['frame', 'photons', 'sigma'])
    expect(s.confident).toBe(false)
    expect(s.problems).toContain('No column looks like x (names such as "x", "x [nm]", "x_px")')
    expect(s.problems.some((p) => p.startsWith('No column looks like y'))).toBe(true)
  })

  it('ignores unknown text columns and keeps unknown numeric ones', () => {
    const s = suggestMapping(['x [nm]', 'y [nm]', 'label', 'id'], [['1', '2', 'ring', '17']])
    expect(s.columns.map((c) => c.role)).toEqual(['x', 'y', 'ignore', 'other'])
  })
})

describe('columnMappingSchema', () => {
  const xy = [
    { index: 0, role: 'x', unit: 'nm' },
    { index: 1, role: 'y', unit: 'nm' },
  ] as const

  it('accepts a plain mapping', () => {
    expect(columnMappingSchema.safeParse({ columns: xy, frameBase: 1 }).success).toBe(true)
  })

  it.each([
    [
      'no y',
      { columns: [xy[0], { index: 1, role: 'photons', unit: 'photons' }], frameBase: 1 },
      'Map one column to y',
    ],
    [
      'two x',
      { columns: [...xy, { index: 2, role: 'x', unit: 'nm' }], frameBase: 1 },
      'Only one column can be x',
    ],
    [
      'an index twice',
      { columns: [...xy, { index: 1, role: 'other' }], frameBase: 1 },
      'Column 1 is mapped twice',
    ],
    [
      'px without pixel size',
      { columns: [{ index: 0, role: 'x', unit: 'px' }, xy[1]], frameBase: 0 },
      'Columns in px need the pixel size in nm',
    ],
    [
      'a length without unit',
      { columns: [{ index: 0, role: 'x' }, xy[1]], frameBase: 0 },
      'x needs a unit (nm, um or px)',
    ],
    [
      'a photon unit on x',
      { columns: [{ index: 0, role: 'x', unit: 'adu' }, xy[1]], frameBase: 0 },
      'adu is not a unit for x',
    ],
    [
      'a unit on frame',
      { columns: [...xy, { index: 2, role: 'frame', unit: 'nm' }], frameBase: 0 },
      'A frame column takes no unit',
    ],
    ['frame base 2', { columns: xy, frameBase: 2 }, null],
    [
      'sigma and FWHM both',
      {
        columns: [
          ...xy,
          { index: 2, role: 'sigma', unit: 'nm' },
          { index: 3, role: 'fwhm', unit: 'nm' },
        ],
        frameBase: 1,
      },
      'Give the PSF width once: as sigma or as FWHM',
    ],
    ['pixel size 10 000', { columns: xy, frameBase: 1, pixelSizeNm: 10_000 }, null],
  ])('refuses %s', (_name, body, message) => {
    const result = columnMappingSchema.safeParse(body)
    expect(result.success).toBe(false)
    if (message) expect(result.error?.issues.map((i) => i.message)).toContain(message)
  })

  it('repeats other and ignore freely', () => {
    const columns = [
      ...xy,
      { index: 2, role: 'other' },
      { index: 3, role: 'other' },
      { index: 4, role: 'ignore' },
      { index: 5, role: 'ignore' },
    ]
    expect(columnMappingSchema.safeParse({ columns, frameBase: 1 }).success).toBe(true)
  })
})
