import { describe, expect, it } from 'vitest'
import { parseHeaderName, suggestMapping } from '@shared/domain/localization-columns'
import { mappingFromSuggestion } from '@shared/schemas/localization-mapping.schema'

/**
 * Header spellings as the field's fitting software writes them (issue #13, "Missing" and "Wrong
 * today"), with the role, unit and confidence a reader of the table would give them.
 */
describe('header table: spelling → role, unit, confidence', () => {
  it.each([
    // Units glued to the name.
    ['xnm', 'x', 'nm', 'sure'],
    ['ynm', 'y', 'nm', 'sure'],
    ['znm', 'z', 'nm', 'sure'],
    ['xnano', 'x', 'nm', 'sure'],
    ['ynano', 'y', 'nm', 'sure'],
    // Photon counts spelled out.
    ['number of photons', 'photons', null, 'sure'],
    ['phot', 'photons', null, 'sure'],
    ['n_phot', 'photons', null, 'sure'],
    // First-frame names.
    ['first frame', 'frame', null, 'sure'],
    ['frame_ix', 'frame', null, 'sure'],
    ['frame index', 'frame', null, 'sure'],
    // A bare t: a frame only when its values are whole numbers.
    ['t', 'frame', null, 'whole numbers'],
    // Precision names.
    ['locprec', 'uncertainty', null, 'sure'],
    ['locprecnm', 'uncertainty', 'nm', 'sure'],
    ['lateral localization accuracy', 'uncertainty', null, 'sure'],
    ['precision_x', 'uncertaintyX', null, 'sure'],
    // Background noise as its own role.
    ['bkgstd', 'backgroundSd', null, 'sure'],
    ['bg_sd', 'backgroundSd', null, 'sure'],
    // Two-axis widths.
    ['sigma1', 'sigmaX', null, 'sure'],
    ['sigma2', 'sigmaY', null, 'sure'],
    // A fitted background level written as an offset in photons.
    ['offset [photon]', 'background', 'photons', 'sure'],
    ['offset (photons)', 'background', 'photons', 'sure'],
    // A width that may be a FWHM.
    ['width', 'sigma', null, 'ask'],
    ['fwhm [nm]', 'fwhm', 'nm', 'sure'],
    // Drift-corrected positions.
    ['xc', 'x', null, 'sure'],
    ['x_corr', 'x', null, 'sure'],
    ['x_drift_corrected', 'x', null, 'sure'],
  ])('%s → %s, %s, %s', (name, role, unit, confidence) => {
    expect(parseHeaderName(name)).toMatchObject({ role, unit, confidence })
  })

  it('marks the drift-corrected spellings, and not the raw ones', () => {
    for (const name of ['xc', 'x_corr', 'x_drift_corrected', 'yc', 'y_corr'])
      expect(parseHeaderName(name).corrected, name).toBe(true)
    for (const name of ['x', 'x [nm]', 'xnm', 'pos_x'])
      expect(parseHeaderName(name).corrected).toBe(false)
  })

  it('an offset without a photon unit is no background (a camera baseline or a shift)', () => {
    expect(parseHeaderName('offset').role).toBeNull()
    expect(parseHeaderName('offset [ADU]').role).toBeNull()
  })
})

const roles = (s: ReturnType<typeof suggestMapping>) => s.columns.map((c) => c.role)
const unitOf = (s: ReturnType<typeof suggestMapping>, name: string) =>
  s.columns.find((c) => c.name === name)?.unit

describe('suggestMapping on tables as labs write them', () => {
  it('z without a unit stays nm beside x_px and y_px (not multiplied by the pixel size)', () => {
    const s = suggestMapping(['frame', 'x_px', 'y_px', 'z'], [['1', '10.5', '20.5', '-250']])
    expect(unitOf(s, 'x_px')).toBe('px')
    expect(unitOf(s, 'z')).toBe('nm')
    expect(s.notes.join(' ')).toContain('"z" has no unit and is taken as nm')
  })

  it('z with an explicit px unit and no pixel size asks for the pixel size', () => {
    const s = suggestMapping(['x [nm]', 'y [nm]', 'z [px]'], [['1', '2', '3']])
    expect(unitOf(s, 'z [px]')).toBe('px')
    expect(s.confident).toBe(false)
    expect(s.problems).toContain('"z [px]" is in camera pixels: the pixel size in nm is needed')
    expect(mappingFromSuggestion(s)).toBeNull()
  })

  it('a bare t with whole numbers is the frame, and the table reads without asking', () => {
    const s = suggestMapping(
      ['t', 'x [nm]', 'y [nm]'],
      [
        ['3', '1', '2'],
        ['4', '5', '6'],
      ],
    )
    expect(roles(s)).toEqual(['frame', 'x', 'y'])
    expect(s.confident).toBe(true)
  })

  it('a bare t with fractions is asked about, not taken as the frame', () => {
    const s = suggestMapping(
      ['t', 'x [nm]', 'y [nm]'],
      [
        ['0.05', '1', '2'],
        ['0.10', '5', '6'],
      ],
    )
    expect(roles(s)).toEqual(['other', 'x', 'y'])
    expect(s.confident).toBe(false)
    expect(s.problems.join(' ')).toContain('"t" may be a frame number or a time in seconds')
  })

  it('a table whose only frame column is in seconds asks for the frame', () => {
    const s = suggestMapping(['time [s]', 'x [nm]', 'y [nm]'], [['0.03', '1', '2']])
    expect(roles(s)).toEqual(['other', 'x', 'y'])
    expect(s.confident).toBe(false)
    expect(s.problems.join(' ')).toContain('"time [s]" is a time, not a frame number')
  })

  it.each(['xc', 'x_corr', 'x_drift_corrected'])(
    'prefers the drift-corrected %s over the raw x and says so',
    (corrected) => {
      const header = ['frame', 'x [nm]', 'y [nm]', `${corrected} [nm]`]
      const s = suggestMapping(header, [['1', '10', '20', '11']])
      expect(roles(s)).toEqual(['frame', 'other', 'y', 'x'])
      expect(s.confident).toBe(true)
      expect(s.notes.join(' ')).toMatch(/looks drift-corrected and is used as x/)
    },
  )

  it('two drift-corrected x candidates are asked about', () => {
    const s = suggestMapping(['x [nm]', 'xc [nm]', 'x_corr [nm]', 'y [nm]'], [['1', '2', '3', '4']])
    expect(s.confident).toBe(false)
    expect(s.problems.join(' ')).toContain(
      '"xc [nm]" and "x_corr [nm]" all look like drift-corrected x',
    )
    expect(roles(s).filter((r) => r === 'x')).toHaveLength(1)
  })

  it('duplicate header names are asked about', () => {
    const s = suggestMapping(['x [nm]', 'y [nm]', 'x [nm]'], [['1', '2', '3']])
    expect(s.confident).toBe(false)
    expect(s.problems).toContain('Columns 1 and 3 are both named "x [nm]": say which is which')
  })

  it('a width is asked about (it may be a FWHM), sigma preselected', () => {
    const s = suggestMapping(['x [nm]', 'y [nm]', 'width'], [['1', '2', '300']])
    expect(roles(s)).toEqual(['x', 'y', 'sigma'])
    expect(s.confident).toBe(false)
    expect(s.problems.join(' ')).toContain('(FWHM)')
  })

  it('reads the new spellings into a confident mapping', () => {
    const header = ['first frame', 'xnm', 'ynm', 'znm', 'number of photons', 'offset [photon]']
    const more = ['bkgstd', 'sigma1', 'sigma2', 'locprecnm']
    const s = suggestMapping(
      [...header, ...more],
      [['0', '1', '2', '3', '900', '10', '3', '120', '130', '8']],
    )
    expect(roles(s)).toEqual([
      'frame',
      'x',
      'y',
      'z',
      'photons',
      'background',
      'backgroundSd',
      'sigmaX',
      'sigmaY',
      'uncertainty',
    ])
    expect(s.confident).toBe(true)
    expect(mappingFromSuggestion(s)?.frameBase).toBe('auto')
  })
})
