import { describe, expect, it } from 'vitest'
import { verdictChips, worstTone } from '@shared/domain/quality-summary'
import { doneReport } from '../../fixtures/quality-report'

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
