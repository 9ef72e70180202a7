// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { lastRecordEnd } from '@server/compute/ingest/record.boundary'
import { splitRecord } from '@server/compute/ingest/record.splitter'

const bytes = (text: string) => new TextEncoder().encode(text)

describe('lastRecordEnd', () => {
  it('ends after the last line feed when there are no quotes', () => {
    expect(lastRecordEnd(bytes('1,2\n3,4\n5,'), ',')).toEqual({ end: 8, openQuote: false })
  })

  it('does not end inside a quoted field (RFC 4180, 2.6: line breaks inside quotes)', () => {
    // The example of RFC 4180 section 2, rule 6: "aaa","b CRLF bb","ccc".
    const text = '"aaa","b\r\nbb","ccc"\r\nzzz,yyy,"x\ny'
    expect(lastRecordEnd(bytes(text), ',')).toEqual({ end: 21, openQuote: true })
  })

  it('reads doubled quotes as one quote (RFC 4180, 2.7) and ignores quotes inside unquoted fields', () => {
    expect(lastRecordEnd(bytes('"b""bb",1\n2 "in,3\n4,"x'), ',')).toEqual({
      end: 18,
      openQuote: true,
    })
  })

  it('opens quotes after padding, and after any padding in whitespace tables', () => {
    expect(lastRecordEnd(bytes('1, "a\nb"\n2'), ',').end).toBe(9)
    expect(lastRecordEnd(bytes('1  "a\nb"\n2'), 'whitespace').end).toBe(9)
  })
})

describe('splitRecord', () => {
  it('splits the RFC 4180 examples', () => {
    expect(splitRecord('"aaa","b""bb","ccc"', ',')).toEqual(['aaa', 'b"bb', 'ccc'])
    expect(splitRecord('aaa,,ccc\r', ',')).toEqual(['aaa', '', 'ccc'])
    expect(splitRecord('  1\t 2   "three four"  ', 'whitespace')).toEqual(['1', '2', 'three four'])
  })
})
