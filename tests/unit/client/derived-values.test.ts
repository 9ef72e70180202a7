import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import CameraCountsPanel from '@/components/metadata/CameraCountsPanel.vue'
import ExpectedPrecisionPanel from '@/components/metadata/ExpectedPrecisionPanel.vue'
import MetadataOpticsPanels from '@/components/metadata/MetadataOpticsPanels.vue'
import { derivedNotes } from '@/utils/derivedNotes'
import { cameraReadout, expectedPrecision } from '@/utils/derivedOptics'

const global = { plugins: [createVuetify()] }

describe('diffraction limits beside NA and emission wavelength', () => {
  it('shows Abbe and Rayleigh for 670 nm at NA 1.49', () => {
    // DOMAIN.md 1.2 check values: Abbe λ/(2 NA) = 224.8 nm, Rayleigh 0.61 λ/NA = 274.3 nm.
    const notes = derivedNotes({
      instrument: { objective: { lensNA: 1.49 } },
      acquisition: { emissionWavelengthNm: 670 },
    })
    expect(notes['instrument.objective.lensNA']).toEqual([
      'Abbe limit λ/(2·NA) = 224.8 nm',
      'Rayleigh limit 0.61·λ/NA = 274.3 nm',
    ])
    expect(notes['acquisition.emissionWavelengthNm']).toEqual(notes['instrument.objective.lensNA'])
  })

  it('gives the second check pair, 520 nm at NA 1.4', () => {
    // DOMAIN.md 1.2: 185.7 and 226.6 nm.
    const notes = derivedNotes({
      instrument: { objective: { lensNA: 1.4 } },
      acquisition: { emissionWavelengthNm: 520 },
    })
    expect(notes['instrument.objective.lensNA']).toEqual([
      'Abbe limit λ/(2·NA) = 185.7 nm',
      'Rayleigh limit 0.61·λ/NA = 226.6 nm',
    ])
  })

  it('says what is still needed, and nothing while a value is being typed', () => {
    const notes = derivedNotes({ instrument: { objective: { lensNA: 1.49 } } })
    expect(notes['instrument.objective.lensNA']?.[0]).toMatch(/once the emission wavelength/)
    expect(derivedNotes({ instrument: { objective: { lensNA: '1.' } } })).toEqual({})
  })

  it('projects the camera pixel onto the sample', () => {
    // DOMAIN.md 1.3: 16 µm / 100× = 160 nm.
    const notes = derivedNotes({
      instrument: {
        objective: { nominalMagnification: 100 },
        detector: { physicalPixelSizeUm: 16 },
      },
    })
    expect(notes['instrument.detector.pixelSizeNm']).toEqual([
      '16 µm ÷ 100× = 160.0 nm at the sample',
    ])
  })

  it('divides by the total magnification when a tube or relay lens is given', () => {
    // DOMAIN.md §6: 16 µm / (100 × 1.5) = 106.7 nm, not the objective's 160 nm.
    const notes = derivedNotes({
      instrument: {
        objective: { nominalMagnification: 100, tubeLensMagnification: 1.5 },
        detector: { physicalPixelSizeUm: 16 },
      },
    })
    expect(notes['instrument.detector.pixelSizeNm']).toEqual([
      '16 µm ÷ (100× objective × 1.5× tube lens) = 106.7 nm at the sample',
    ])
    // DOMAIN.md 1.3: 6.5 µm / 60× = 108.3 nm; a tube lens still being typed leaves the objective's.
    const typing = derivedNotes({
      instrument: {
        objective: { nominalMagnification: 60, tubeLensMagnification: '1.' },
        detector: { physicalPixelSizeUm: 6.5 },
      },
    })
    expect(typing['instrument.detector.pixelSizeNm']).toEqual([
      '6.5 µm ÷ 60× = 108.3 nm at the sample',
    ])
  })
})

// 0.21·700/1.47 = 100 nm exactly, so the PSF is the s = 100 nm of DOMAIN.md's precision table.
const optics = { emissionNm: 700, na: 1.47, pixelNm: 100 }

describe('expected precision', () => {
  it('matches the DOMAIN.md table for s = a = 100 nm, N = 1000, b² = 10', () => {
    // DOMAIN.md 1.1 [S]: Thompson 3.653, Mortensen LSQ 4.713, MLE 4.093 nm; EMCCD 6.665 / 5.788.
    const sCmos = expectedPrecision({
      ...optics,
      detectorType: 'CMOS',
      photons: 1000,
      background: 10,
    })
    expect(sCmos?.psfSigmaNm).toBeCloseTo(100, 9)
    expect(sCmos?.thompsonNm).toBeCloseTo(3.653, 2)
    expect(sCmos?.lsqNm).toBeCloseTo(4.713, 2)
    expect(sCmos?.mleNm).toBeCloseTo(4.093, 2)
    const emccd = expectedPrecision({
      ...optics,
      detectorType: 'EMCCD',
      photons: 1000,
      background: 10,
    })
    expect(emccd?.excessNoise).toBe(2)
    expect(emccd?.lsqNm).toBeCloseTo(6.665, 2)
    expect(emccd?.mleNm).toBeCloseTo(5.788, 2)
  })

  it('shows the three values in the panel, defaulting to N = 1000 and b² = 10', () => {
    const wrapper = mount(ExpectedPrecisionPanel, {
      global,
      props: { ...optics, detectorType: 'EMCCD' },
    })
    const text = wrapper.text()
    expect(text).toContain('PSF σ = 100.0 nm, ideal 0.21·λ/NA, a lower bound')
    expect(text).toContain('excess noise applied: variance × F = 2')
    // Thompson with the EMCCD's variance factor: 3.653 · √2 = 5.166 nm.
    expect(text).toMatch(/Thompson 2002, variance × F\s*5\.2 nm/)
    expect(text).toMatch(/least squares\s*6\.7 nm/)
    expect(text).toMatch(/maximum likelihood\s*5\.8 nm/)
  })

  it('follows an edited background: none gives the pixelated shot-noise bound', async () => {
    // DOMAIN.md 1.1: s = a = 100, N = 1000, b² = 0 → Thompson = MLE = 3.291 nm, LSQ 4.389 nm.
    const wrapper = mount(ExpectedPrecisionPanel, {
      global,
      props: { ...optics, detectorType: 'CMOS' },
    })
    const [, background] = wrapper.findAll('input')
    await background?.setValue('0')
    expect(wrapper.text()).toMatch(/Thompson 2002\s*3\.3 nm/)
    expect(wrapper.text()).toMatch(/least squares\s*4\.4 nm/)
    expect(wrapper.text()).toMatch(/maximum likelihood\s*3\.3 nm/)
  })

  it('prefers a table’s measured PSF width, then the described one, over the ideal', () => {
    const base = { ...optics, detectorType: 'CMOS', photons: 1000, background: 10 }
    // Ideal: 0.21·700/1.47 = 100 nm; a described 130 nm and a measured 150 nm override it.
    expect(expectedPrecision(base)?.psfSource).toBe('ideal')
    const described = expectedPrecision({ ...base, fittedPsfSigmaNm: 130 })
    expect([described?.psfSigmaNm, described?.psfSource]).toEqual([130, 'description'])
    const measured = expectedPrecision({ ...base, fittedPsfSigmaNm: 130, measuredPsfSigmaNm: 150 })
    expect([measured?.psfSigmaNm, measured?.psfSource]).toEqual([150, 'table'])
  })

  it('intensified CCDs get F = 2; CMOS read noise adds to b² (DOMAIN.md §6)', () => {
    const iccd = expectedPrecision({
      ...optics,
      detectorType: 'IntensifiedCCD',
      photons: 1000,
      background: 10,
    })
    expect(iccd?.excessNoise).toBe(2)
    expect(iccd?.mleNm).toBeCloseTo(5.788, 2)
    // b² 0 plus read noise √10 e⁻ squared = b² 10: Thompson 3.653 nm (§1.1 table).
    const cmos = expectedPrecision({
      ...optics,
      detectorType: 'CMOS',
      photons: 1000,
      background: 0,
      readNoiseE: Math.sqrt(10),
    })
    expect(cmos?.thompsonNm).toBeCloseTo(3.653, 2)
  })

  it('takes the pixel from the chip pixel and the total magnification when no pixel size is given', () => {
    // DOMAIN.md §6: 16 µm / (100 × 1.5) = 106.7 nm.
    const r = expectedPrecision({
      ...optics,
      pixelNm: undefined,
      chipPixelUm: 16,
      nominalMagnification: 100,
      tubeLensMagnification: 1.5,
      detectorType: 'CMOS',
      photons: 1000,
      background: 10,
    })
    expect(r?.pixelNm).toBeCloseTo(106.67, 2)
    expect(r?.pixelSource).toBe('total magnification')
  })

  it('shows the axial limit 2nλ/NA² for the immersion medium (DOMAIN.md §6: 670 nm, 1.49, 1.518 → 916 nm)', () => {
    const wrapper = mount(ExpectedPrecisionPanel, {
      global,
      props: { emissionNm: 670, na: 1.49, pixelNm: 100, detectorType: 'CMOS', immersion: 'Oil' },
    })
    expect(wrapper.get('[data-testid="axial-limit"]').text()).toBe('916.2 nm')
  })

  it("uses the deposited tables' measured PSF width handed down from the page", () => {
    const document = {
      acquisition: { emissionWavelengthNm: 700 },
      instrument: { objective: { lensNA: 1.47 }, detector: { type: 'CMOS', pixelSizeNm: 100 } },
      processing: { fittedPsfSigmaNm: 100 },
    }
    const measured = mount(MetadataOpticsPanels, {
      global,
      props: { document, measuredPsfSigmaNm: 130 },
    })
    const used = measured.get('[data-testid="precision-inputs"]').text()
    expect(used).toContain('PSF σ = 130.0 nm, median fitted width of the deposited tables')
    // DOMAIN.md §6: Thompson at s = 130, a = 100, N = 1000, b² = 10 (the panel's defaults) → 4.99.
    expect(measured.text()).toMatch(/Thompson 2002\s*5\.0 nm/)
    // No table width yet: the description's 100 nm, Thompson 3.653 (DOMAIN.md §1.1 table).
    const described = mount(MetadataOpticsPanels, {
      global,
      props: { document, measuredPsfSigmaNm: null },
    })
    expect(described.get('[data-testid="precision-inputs"]').text()).toContain(
      'PSF σ = 100.0 nm, fitted width from the description',
    )
    expect(described.text()).toMatch(/Thompson 2002\s*3\.7 nm/)
  })

  it('asks for the missing optics instead of guessing', () => {
    const wrapper = mount(ExpectedPrecisionPanel, { global, props: { ...optics, na: undefined } })
    expect(wrapper.text()).toContain('Give the emission wavelength, the objective NA')
  })
})

describe('camera counts to photons', () => {
  it('converts an EMCCD reading with offset, conversion factor and EM gain', async () => {
    // DOMAIN.md 1.3: 5100 ADU, offset 100, 10 e⁻/ADU, gain 100 → 500 e⁻; QE 0.95 → 526.3.
    const wrapper = mount(CameraCountsPanel, {
      global,
      props: {
        offset: 100,
        conversionFactor: 10,
        emGain: 100,
        detectorType: 'EMCCD',
        convention: 'at unity EM gain',
        quantumEfficiency: 0.95,
      },
    })
    await wrapper.find('input').setValue('5100')
    expect(wrapper.find('[data-testid="camera-electrons"]').text()).toBe('500 e⁻')
    expect(wrapper.find('[data-testid="camera-photons"]').text()).toBe('526.3 photons')
  })

  it('ignores EM gain on a CMOS camera and on a factor quoted after the gain', () => {
    // DOMAIN.md 1.3: sCMOS 600 ADU, offset 100, 0.5 e⁻/ADU → 250 e⁻; QE 0.8 → 312.5 photons.
    const base = {
      adu: 600,
      offset: 100,
      conversionFactor: 0.5,
      emGain: 300,
      quantumEfficiency: 0.8,
    }
    expect(cameraReadout({ ...base, detectorType: 'CMOS', convention: undefined })).toEqual({
      electrons: 250,
      incidentPhotons: 312.5,
    })
    // Arithmetic: (600 − 100) × 0.5 = 250 e⁻ when the factor already includes the gain.
    expect(
      cameraReadout({ ...base, detectorType: 'EMCCD', convention: 'after EM gain' }),
    ).toMatchObject({ electrons: 250 })
    expect(
      cameraReadout({ ...base, detectorType: 'EMCCD', emGain: undefined, convention: undefined }),
    ).toEqual({
      missing: ['the EM gain'],
    })
  })
})
