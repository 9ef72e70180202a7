import { describe, expect, it } from 'vitest'
import {
  datasetPsfSigmaNm,
  fittedPsfSigmaOf,
  verdictChips,
  worstTone,
} from '@shared/domain/quality-summary'
import type { QualityReportDto } from '@shared/schemas/quality.schema'
import { doneReport, runningReport } from '../../fixtures/quality-report'

describe('the verdicts of a report in one line', () => {
  it('takes the worst tone of an aspect: a problem over worth a look over a note over good', () => {
    const v = (tone: 'good' | 'note' | 'fair' | 'poor') => ({ tone, text: tone })
    expect(worstTone([])).toBe('good')
    expect(worstTone([v('good'), v('note')])).toBe('note')
    expect(worstTone([v('note'), v('fair'), v('good')])).toBe('fair')
    expect(worstTone([v('fair'), v('poor'), v('note')])).toBe('poor')
  })

  it('names each judged aspect once, in the cards’ order, with all of its sentences', () => {
    const chips = verdictChips(doneReport)
    // The fixture's FRC card has two verdicts: 7× finer than diffraction (good) and the labelling
    // density limiting it (fair); the chip carries the worse and both sentences.
    expect(chips.map((c) => [c.key, c.title, c.tone])).toEqual([
      ['precision', 'Precision', 'good'],
      ['nena', 'NeNA', 'good'],
      ['frc', 'Resolution', 'fair'],
      ['drift', 'Drift', 'poor'],
    ])
    const frc = chips.find((c) => c.key === 'frc')!
    expect(frc.text).toContain('7 times finer than the diffraction limit')
    expect(frc.text).toContain('Labelling density, not precision, limits the resolution')
  })

  it('has nothing to say without numbers to judge', () => {
    const bare = {
      ...doneReport,
      ...{ precisionMedianNm: null, nenaPrecisionNm: null, frcResolutionNm: null, driftNm: null },
      metrics: {},
    }
    expect(verdictChips(bare)).toEqual([])
  })
})

/** A finished report whose sigma column has this median (nm), or none without one. */
function withSigma(median: number | null, report: QualityReportDto = doneReport): QualityReportDto {
  const { sigma: _none, ...metrics } = report.metrics
  if (median === null) return { ...report, metrics }
  const value = {
    ...{ edges: [80, 120, 160, 200], counts: [10, 30, 5], median, mean: median + 2 },
    ...{ lowerQuartile: median - 10, upperQuartile: median + 10 },
  }
  return { ...report, metrics: { ...metrics, sigma: { value, method: 'm', parameters: {} } } }
}

describe('the measured PSF width of a dataset', () => {
  it("is a finished table's sigma median", () => {
    expect(fittedPsfSigmaOf(withSigma(128.5))).toBe(128.5)
    expect(datasetPsfSigmaNm([withSigma(128.5)])).toBe(128.5)
  })

  it('is the median over the tables that have one: the middle one, or the middle two averaged', () => {
    const three = [withSigma(150), withSigma(null), withSigma(110), withSigma(120)]
    expect(datasetPsfSigmaNm(three)).toBe(120)
    expect(datasetPsfSigmaNm([withSigma(140), withSigma(120)])).toBe(130)
  })

  it('is null without a sigma column, before a report is computed, or for a width that is no width', () => {
    expect(datasetPsfSigmaNm([])).toBeNull()
    expect(datasetPsfSigmaNm([withSigma(null)])).toBeNull()
    expect(fittedPsfSigmaOf(withSigma(125, runningReport))).toBeNull()
    expect(fittedPsfSigmaOf(withSigma(0))).toBeNull()
    expect(fittedPsfSigmaOf(withSigma(Number.NaN))).toBeNull()
    const misshapen = {
      ...doneReport,
      metrics: { sigma: { value: 7, method: 'm', parameters: {} } },
    }
    expect(fittedPsfSigmaOf(misshapen)).toBeNull()
  })
})
