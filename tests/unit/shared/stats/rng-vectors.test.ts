import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { createRng, hashString, splitmix32 } from '../../../../shared/stats/rng.ts'
import { galaxySeed } from '../../../../shared/diagnostics/monte-carlo.ts'

/**
 * Reference vectors from an independent Python implementation of the published definitions
 * (tests/fixtures/science/rng_vectors.py: xoshiro128** of Blackman & Vigna 2021, seeded by the
 * golden-ratio step + MurmurHash3 fmix32 mixer, Box & Muller 1958 normals, FNV-1a). Monte Carlo
 * reproducibility (same seed → same percentiles everywhere) rests on these sequences.
 */
interface Fixture {
  splitmix32: { input: number; output: number }[]
  hashString: { text: string; output: number }[]
  galaxySeed: { seed: number; id: string; output: number }[]
  cases: { seed: number; uint32: number[]; float: number[]; normal: number[] }[]
}
const fixture = JSON.parse(readFileSync(new URL('../../../fixtures/science/rng.json', import.meta.url), 'utf8')) as Fixture

describe('seeded generator against the independent reference vectors (rng_vectors.py)', () => {
  it('covers negative, ≥ 2³¹, ≥ 2³² and fractional seeds', () => {
    expect(fixture.cases.map((c) => c.seed)).toEqual(expect.arrayContaining([-1, 2147483648, 4294967301, 3.75]))
  })

  it('mixes seeds exactly as splitmix32 (golden-ratio step + fmix32)', () => {
    for (const { input, output } of fixture.splitmix32) expect(splitmix32(input), `splitmix32(${input})`).toBe(output)
  })

  it('hashes ids with FNV-1a over UTF-16 code units and derives galaxy seeds exactly', () => {
    for (const { text, output } of fixture.hashString) expect(hashString(text), JSON.stringify(text)).toBe(output)
    for (const { seed, id, output } of fixture.galaxySeed) expect(galaxySeed(seed, id), `${seed} ${id}`).toBe(output)
  })

  it.each(fixture.cases.map((c) => [c.seed, c] as const))('seed %s: the first 16 xoshiro128** outputs and their floats exactly', (seed, c) => {
    const a = createRng(seed), b = createRng(seed)
    expect(c.uint32.map(() => a.nextUint32())).toEqual(c.uint32)
    // u · 2⁻³² is exact in binary64, so the floats must match bit for bit
    expect(c.float.map(() => b.nextFloat())).toEqual(c.float)
  })

  it.each(fixture.cases.map((c) => [c.seed, c] as const))('seed %s: the first 16 Box–Muller normals to a few ulp', (seed, c) => {
    const rng = createRng(seed)
    // log, sin and cos are not correctly rounded in every libm (Python's C library vs the JS engine):
    // 13 of these 192 differ in the last bits; allow 4 ulp of the larger of |z| and 1 (sin/cos of up to 2π)
    for (const [i, want] of c.normal.entries()) {
      const got = rng.nextNormal()
      expect(Math.abs(got - want), `normal #${i}: ${got} vs ${want}`).toBeLessThanOrEqual(4 * Number.EPSILON * Math.max(1, Math.abs(want)))
    }
  })
})
