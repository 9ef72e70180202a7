import { describe, expect, it } from 'vitest'
import { qualityCards } from '@shared/domain/quality-cards'
import { doneReport } from '../../fixtures/quality-report'

const frcDetails = (localizationsPerEmitter: number) =>
  qualityCards({ ...doneReport, localizationsPerEmitter }).find(
    (c) => c.title === 'Resolution (FRC)',
  )!.details

describe('the FRC card', () => {
  it('reads Q as localizations per molecule when it can be one (≥ 1)', () => {
    expect(frcDetails(4.2)).toContain('about 4.2 localizations per molecule')
  })

  it('gives a Q below 1 as a factor, not as a count of localizations', () => {
    const details = frcDetails(0.1)
    expect(details.join(' ')).not.toContain('about 0.1 localizations')
    expect(details.some((d) => d.startsWith('repeat factor Q ≈ 0.1'))).toBe(true)
  })
})
