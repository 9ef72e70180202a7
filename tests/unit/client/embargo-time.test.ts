/**
 * The embargo dialog states an end (00:00 UTC of the chosen day) in UTC and in the viewer's zone;
 * far from UTC that is another calendar day. Zone offsets: Kiritimati UTC+14, Pago Pago UTC−11,
 * neither with daylight saving (IANA time zone database).
 */
import { describe, expect, it } from 'vitest'
import { embargoEndWords } from '@/utils/embargoTime'

describe('an embargo end in the viewer’s zone', () => {
  it('reads as the afternoon of the same day in Kiritimati and the evening before in Pago Pago', () => {
    const east = embargoEndWords('2030-03-01', 'Pacific/Kiritimati', 'en-GB')!
    expect(east.utc).toBe('1 Mar 2030, 00:00')
    expect(east.local).toBe('1 Mar 2030, 14:00')
    const west = embargoEndWords('2030-03-01', 'Pacific/Pago_Pago', 'en-GB')!
    expect(west.local).toBe('28 Feb 2030, 13:00')
    expect(west.zone).toBe('Pacific/Pago_Pago')
  })

  it('says nothing for an empty or malformed day', () => {
    expect(embargoEndWords('', 'UTC')).toBeNull()
    expect(embargoEndWords('2030-13-45', 'UTC')).toBeNull()
  })
})
