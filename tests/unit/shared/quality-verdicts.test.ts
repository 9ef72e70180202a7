import { describe, expect, it } from 'vitest'
import { qualityCards } from '@shared/domain/quality-cards'
import {
  driftVerdict,
  lengthText,
  nenaVerdict,
  precisionVerdict,
  resolutionVerdicts,
} from '@shared/domain/quality-verdicts'
import { doneReport } from '../../fixtures/quality-report'

// The bands (≤ 1.3 as good as photon statistics allow, ≤ 2 somewhat worse, beyond much worse)
// and the wording are the page's specification, not derived from the code under test.
describe('precision against what the photon counts predict', () => {
  it.each([
    [1, 'good', 'As good as the photon counts allow'],
    [1.3, 'good', 'As good as the photon counts allow'],
    [1.31, 'fair', 'Somewhat worse than photon statistics predict'],
    [2, 'fair', 'Somewhat worse than photon statistics predict'],
    [2.01, 'poor', 'Much worse than photon statistics predict'],
    [5, 'poor', 'Much worse than photon statistics predict'],
    [0.5, 'note', 'Better than the photon counts predict'],
  ])('measured ÷ expected %s → %s', (ratio, tone, words) => {
    const verdict = precisionVerdict({ measuredToExpected: ratio, expectedMedianNm: 8 })
    expect(verdict?.tone).toBe(tone)
    expect(verdict?.text).toContain(words)
  })

  it('names the common causes when worse, and the prediction', () => {
    const text = precisionVerdict({ measuredToExpected: 1.6, expectedMedianNm: 8 })?.text
    expect(text).toContain('defocus, PSF mismatch or residual drift are common causes')
    expect(text).toContain('(they predict 8 nm)')
    expect(text).toContain('1.6 times the prediction')
  })

  it('gives no verdict without a prediction', () => {
    expect(precisionVerdict({ measuredToExpected: null })).toBeNull()
    expect(precisionVerdict({ measuredToExpected: Number.NaN })).toBeNull()
  })
})

describe('FRC resolution against the diffraction and Nyquist limits', () => {
  // Abbe λ/(2 NA), 670 nm at NA 1.49 → 224.8 nm; FRC check value 32 nm (DOMAIN.md §1.2, §5 [C, S]):
  // 224.8 / 32 = 7.025 → "7 times finer".
  it('says how many times finer than the diffraction limit', () => {
    const [diffraction] = resolutionVerdicts({ frcNm: 32, diffractionNm: 224.8, nyquistNm: null })
    expect(diffraction).toEqual({
      tone: 'good',
      text: '7 times finer than the diffraction limit (224.8 nm).',
    })
  })

  it('says when the image is no finer than the diffraction limit', () => {
    const [v] = resolutionVerdicts({ frcNm: 250, diffractionNm: 224.8, nyquistNm: null })
    expect(v?.tone).toBe('poor')
    expect(v?.text).toContain('No finer than the diffraction limit (224.8 nm)')
  })

  // Nyquist (Shroff et al. 2008, DOMAIN.md §1.5 [M]): 10 000 molecules/µm² support 20 nm. A Nyquist
  // limit coarser than the FRC means the density, not the precision, bounds the resolution.
  it.each([
    [
      32,
      40,
      'raw localizations',
      'fair',
      'Labelling density, not precision, limits the resolution',
    ],
    [32, 20, 'raw localizations', 'good', 'The labelling density supports this resolution'],
  ])('FRC %s nm, Nyquist %s nm (%s) → %s', (frcNm, nyquistNm, countingUnit, tone, words) => {
    const [v] = resolutionVerdicts({ frcNm, diffractionNm: null, nyquistNm, countingUnit })
    expect(v?.tone).toBe(tone)
    expect(v?.text).toContain(words)
    expect(v?.text).toContain('Blinking inflates the density count')
  })

  it('says merged events still over-count molecules that blink again', () => {
    const [v] = resolutionVerdicts({
      ...{ frcNm: 32, diffractionNm: null, nyquistNm: 40, countingUnit: 'merged events' },
    })
    expect(v?.text).toContain('Even after merging, molecules that blink again later are counted')
  })

  it('has nothing to say without an FRC value', () => {
    expect(resolutionVerdicts({ frcNm: null, diffractionNm: 224.8, nyquistNm: 40 })).toEqual([])
  })
})

// Drift no larger than the precision does not blur; up to 3× it is worth a look; beyond is a
// problem (a rule of thumb chosen for this page).
describe('drift against the localization precision', () => {
  it.each([
    [5, 10, 'good', 'no more than the localization precision (10 nm)'],
    [25, 10, 'fair', '2.5 times the localization precision (10 nm)'],
    [80, 10, 'poor', '8 times the localization precision (10 nm)'],
    [80, null, 'note', 'The sample drifted up to 80 nm during the acquisition.'],
  ])('%s nm of drift at precision %s nm → %s', (totalDriftNm, precisionNm, tone, words) => {
    const v = driftVerdict({ totalDriftNm, precisionNm })
    expect(v?.tone).toBe(tone)
    expect(v?.text).toContain(words)
  })

  it('shows the FRC after correcting the drift', () => {
    // DOMAIN.md §6 [S]: drift-corrected FRC on a drifting simulation 37.4 → 14.5 nm.
    const v = driftVerdict({ totalDriftNm: 80, precisionNm: 10, frcNm: 37.4, frcCorrectedNm: 14.5 })
    expect(v?.text).toContain(
      'Corrected for this drift, the FRC resolution is 14.5 nm (37.4 nm as deposited).',
    )
  })

  it('gives no verdict without a drift', () => {
    expect(driftVerdict({ totalDriftNm: null, precisionNm: 10 })).toBeNull()
  })
})

describe('NeNA against the table’s precision', () => {
  it.each([
    [10, 10, 'uncertainty column', 'good', 'Agrees with the table’s own precision (10 nm)'],
    [12.9, 10, 'uncertainty column', 'good', 'Agrees with'],
    [15, 10, 'uncertainty column', 'fair', '1.5 times it: the stated precision may be optimistic'],
    [30, 10, 'uncertainty column', 'poor', '3 times it'],
    [5, 10, 'uncertainty column', 'note', 'the stated precision may be cautious'],
    [10, 10, 'expected from photons', 'good', 'the precision the photon counts predict (10 nm)'],
  ])('NeNA %s nm, precision %s nm (%s) → %s', (nenaNm, precisionNm, source, tone, words) => {
    const v = nenaVerdict({ nenaNm, precisionNm, precisionSource: source })
    expect(v?.tone).toBe(tone)
    expect(v?.text).toContain(words)
  })

  it('gives no verdict when either value is missing', () => {
    expect(nenaVerdict({ nenaNm: null, precisionNm: 10 })).toBeNull()
    expect(nenaVerdict({ nenaNm: 10, precisionNm: null })).toBeNull()
  })
})

describe('lengths and cards', () => {
  it.each([
    [12.34, '12.3 nm'],
    [999, '999 nm'],
    [1500, '1.5 µm'],
    [null, '—'],
  ])('%s nm reads %s', (nm, text) => expect(lengthText(nm)).toBe(text))

  it('builds one card per metric, with the reason of one not computed', () => {
    const reason = 'The description gives no emission wavelength or objective NA.'
    const cards = qualityCards({
      ...doneReport,
      diffractionLimitNm: null,
      metrics: {
        ...doneReport.metrics,
        diffraction: { value: null, method: 'Abbe', parameters: {}, reason },
      },
    })
    expect(cards.map((c) => c.key)).toEqual([
      ...['summary', 'precision', 'nena', 'frc', 'drift', 'density', 'merge', 'diffraction'],
    ])
    const byKey = Object.fromEntries(cards.map((c) => [c.key, c]))
    expect(byKey.precision?.value).toBe('10 nm (median)')
    expect(byKey.frc?.value).toBe('32 nm ± 1.5 nm')
    // The merged density's Nyquist limit (40 nm) is the one judged, not the raw one (35.8 nm).
    expect(byKey.frc?.verdicts[0]?.text).toContain('no finer than 40 nm')
    expect(byKey.density?.details).toContain('Nyquist resolution 40 nm')
    expect(byKey.diffraction?.value).toBeNull()
    expect(byKey.diffraction?.metric?.reason).toBe(reason)
  })
})
