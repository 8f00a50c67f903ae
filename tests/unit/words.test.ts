import { describe, expect, it } from 'vitest'
import { countOf } from '../../shared/utils/words'

describe('countOf', () => {
  it('puts the noun in the singular only for exactly one', () => {
    expect(countOf(1, 'false alert')).toBe('1 false alert')
    expect(countOf(0, 'false alert')).toBe('0 false alerts')
    expect(countOf(2, 'miss', 'misses')).toBe('2 misses')
    expect(countOf(1, 'miss', 'misses')).toBe('1 miss')
  })
})
