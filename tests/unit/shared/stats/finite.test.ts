import { describe, expect, it } from 'vitest'
import { assertAllFinite, findNonFinite } from '../../../../shared/stats/finite.ts'

describe('finite-number guard for API output', () => {
  it('finds the JSON Pointer of the first NaN or Infinity', () => {
    expect(findNonFinite({ a: 1, b: [2, null, { c: 3 }] })).toBeNull()
    expect(findNonFinite({ a: [1, Number.NaN] })).toBe('/a/1')
    expect(findNonFinite({ 'x/y': { z: -Infinity } })).toBe('/x~1y/z')
    expect(findNonFinite(Float64Array.of(1, Infinity))).toBe('/1')
  })
  it('throws naming the pointer', () => {
    expect(() => assertAllFinite({ results: [{ ebv: Number.NaN }] }, 'response')).toThrow(/response has a non-finite number at \/results\/0\/ebv/)
    expect(() => assertAllFinite({ ebv: 0.3 })).not.toThrow()
  })
})
