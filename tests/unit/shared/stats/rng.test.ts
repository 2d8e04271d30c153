import { describe, expect, it } from 'vitest'
import { createRng, hashString, splitmix32 } from '../../../../shared/stats/rng.ts'

describe('seeded generator (xoshiro128** + Box–Muller)', () => {
  it('is deterministic per seed and differs between seeds', () => {
    const a = createRng(42), b = createRng(42), c = createRng(43)
    const sa = Array.from({ length: 5 }, () => a.nextUint32())
    expect(Array.from({ length: 5 }, () => b.nextUint32())).toEqual(sa)
    expect(Array.from({ length: 5 }, () => c.nextUint32())).not.toEqual(sa)
  })
  it('gives uniform [0, 1) and standard normal deviates with the right moments', () => {
    // sampling error of the mean for N = 200 000: 0.29/√N ≈ 6.5e-4 (uniform), 1/√N ≈ 2.2e-3 (normal); 5σ bounds
    const rng = createRng(1)
    const n = 200000
    let su = 0, sn = 0, sn2 = 0, min = 1, max = 0
    for (let i = 0; i < n; i++) {
      const u = rng.nextFloat()
      su += u
      min = Math.min(min, u)
      max = Math.max(max, u)
      const z = rng.nextNormal()
      sn += z
      sn2 += z * z
    }
    expect(min).toBeGreaterThanOrEqual(0)
    expect(max).toBeLessThan(1)
    expect(Math.abs(su / n - 0.5)).toBeLessThan(3.3e-3)
    expect(Math.abs(sn / n)).toBeLessThan(1.1e-2)
    expect(Math.abs(sn2 / n - 1)).toBeLessThan(1.6e-2)
  })
  it('hashes strings with FNV-1a and mixes with splitmix32', () => {
    // FNV-1a 32-bit offset basis 2166136261 for the empty string; "a" → 0xe40c292c (common practice, IETF draft-eastlake-fnv)
    expect(hashString('')).toBe(2166136261)
    expect(hashString('a')).toBe(0xe40c292c)
    expect(splitmix32(1)).not.toBe(splitmix32(2))
  })
})
