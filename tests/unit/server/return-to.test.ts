import { describe, expect, it } from 'vitest'
import { safeReturnTo } from '@server/modules/auth/auth.routes'

describe('where sign-in may return to', () => {
  it.each([
    ['/datasets/STPL-000001', '/datasets/STPL-000001'],
    ['/', '/'],
    ['//evil.test/x', '/'],
    ['/\\evil.test', '/'],
    ['https://evil.test/', '/'],
    [undefined, '/'],
  ])('%s → %s', (input, expected) => {
    expect(safeReturnTo(input)).toBe(expected)
  })
})
