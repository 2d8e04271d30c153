import { describe, expect, it } from 'vitest'
import { readFileSync } from 'node:fs'
import {
  doubletSumFromStrongLine, NII_6584_TO_6548, NII_TEMPERATURE_MODEL, OIII_5007_TO_4959, OIII_TEMPERATURE_MODEL, temperatureError,
  temperatureFromRatio, temperatureRatio, temperatureRatioLogSlope, temperatureWithDensityIteration,
} from '../../../../shared/diagnostics/temperature.ts'
import { electronDensityFromSiiRatio } from '../../../../shared/diagnostics/density.ts'

describe('electron temperature (Osterbrock & Ferland 2006, eqs. 5.4 and 5.5)', () => {
  it('reproduces the forward [O III] and [N II] check values at n_e = 100', () => {
    // shared/science/README.md §4; 2 d.p. → ±0.006
    const t = [8000, 10000, 12500, 15000, 20000]
    const o3 = [482.44, 211.96, 109.78, 70.8, 40.92]
    const n2 = [186.4, 99.82, 60.57, 43.42, 28.64]
    t.forEach((tk, j) => {
      expect(Math.abs(temperatureRatio(OIII_TEMPERATURE_MODEL, tk, 100) - o3[j]), `${tk}`).toBeLessThan(0.006)
      expect(Math.abs(temperatureRatio(NII_TEMPERATURE_MODEL, tk, 100) - n2[j]), `${tk}`).toBeLessThan(0.006)
    })
    expect(temperatureRatio(OIII_TEMPERATURE_MODEL, 30000, 100)).toBeCloseTo(23.65, 2)
  })
  it('inverts them by bracketing root-finding', () => {
    // shared/science/README.md §4; quoted to 1 K → ±0.6 K
    const o3: Array<[number, number]> = [[100, 12959], [200, 10180], [300, 9045]]
    for (const [r, t] of o3) expect(Math.abs((temperatureFromRatio(OIII_TEMPERATURE_MODEL, r, 100) as number) - t)).toBeLessThan(0.6)
    const n2: Array<[number, number]> = [[50, 13828], [100, 9993], [150, 8598]]
    for (const [r, t] of n2) expect(Math.abs((temperatureFromRatio(NII_TEMPERATURE_MODEL, r, 100) as number) - t)).toBeLessThan(0.6)
  })
  it('returns null outside 5000–30 000 K (te-out-of-range)', () => {
    // shared/science/README.md §4: the [O III] ratio at 30 000 K is 23.65; anything lower is out of range
    expect(temperatureFromRatio(OIII_TEMPERATURE_MODEL, 20, 100)).toBeNull()
    expect(temperatureFromRatio(OIII_TEMPERATURE_MODEL, 10000, 100)).toBeNull() // ratio at 5000 K is ≈ 5690
    expect(temperatureFromRatio(OIII_TEMPERATURE_MODEL, 0, 100)).toBeNull()
  })
  it('iterates with the [S II] density until |ΔT| < 0.1 K', () => {
    // shared/science/README.md §4 (project convention): the solution is self-consistent in T and n_e(T)
    const sol = temperatureWithDensityIteration(OIII_TEMPERATURE_MODEL, 150, 0.8)
    const t = sol.temperatureK as number
    expect(sol.densityAssumed).toBe(false)
    expect(sol.neCm3).toBeCloseTo(electronDensityFromSiiRatio(0.8, t) as number, 0)
    expect(temperatureRatio(OIII_TEMPERATURE_MODEL, t, sol.neCm3)).toBeCloseTo(150, 2)
    const assumed = temperatureWithDensityIteration(OIII_TEMPERATURE_MODEL, 200, Number.NaN)
    expect(assumed).toMatchObject({ neCm3: 100, densityAssumed: true })
    expect(assumed.temperatureK as number).toBeCloseTo(10180, -1)
  })
  it('has the analytic log-slope of the model', () => {
    const h = 0.01
    const num = (Math.log(temperatureRatio(OIII_TEMPERATURE_MODEL, 1e4 + h, 500)) - Math.log(temperatureRatio(OIII_TEMPERATURE_MODEL, 1e4 - h, 500))) / (2 * h)
    expect(temperatureRatioLogSlope(OIII_TEMPERATURE_MODEL, 1e4, 500)).toBeCloseTo(num, 9)
  })
})

describe('T_e iteration start', () => {
  it('gives the same T_e as the plain shared/science/README.md §4 iteration started at 10⁴ K (within its 0.1 K tolerance)', () => {
    // plain iteration written out here: n_e from [S II] at T, solve T, until |ΔT| < 0.1 K
    const plain = (ratio: number, sii: number) => {
      let t = 1e4
      for (let i = 0; i < 50; i++) {
        const next = temperatureFromRatio(OIII_TEMPERATURE_MODEL, ratio, electronDensityFromSiiRatio(sii, t) as number) as number
        const done = Math.abs(next - t) < 0.1
        t = next
        if (done) break
      }
      return t
    }
    for (const [ratio, sii] of [[80, 0.6], [150, 1.0], [300, 1.3], [60, 0.5]]) {
      const fast = temperatureWithDensityIteration(OIII_TEMPERATURE_MODEL, ratio, sii).temperatureK as number
      expect(Math.abs(fast - plain(ratio, sii)), `R=${ratio} Rs=${sii}`).toBeLessThan(0.1)
    }
  })
})

describe('temperature helpers of the kernel (shared/science/README.md §4)', () => {
  it('builds the doublet sum from the stronger line with the fixed ratios', () => {
    // 5007/4959 = 2.98 (Storey & Zeippen 2000, MNRAS 312, 813) and 6584/6548 = 3.05 — both from memory (§4, §12)
    expect(OIII_5007_TO_4959).toBe(2.98)
    expect(NII_6584_TO_6548).toBe(3.05)
    expect(doubletSumFromStrongLine(298, OIII_5007_TO_4959)).toBeCloseTo(398, 12)
    expect(doubletSumFromStrongLine(305, NII_6584_TO_6548)).toBeCloseTo(405, 12)
  })
  it('gives σ_T = σ_lnR/|d ln R/dT|, the slope of scipy brentq T(R) (numerics.json)', () => {
    // tests/fixtures/science/numerics.json (python3-scipy 1.10.1 brentq at n_e = 100 cm⁻³, 25 log-spaced ratios): the
    // central difference dT/d ln R between neighbours; the spacing (factor ≈ 1.26) limits agreement to ≈ 3 % (§4, §9)
    const fixture = JSON.parse(readFileSync(new URL('../../../fixtures/science/numerics.json', import.meta.url), 'utf8')) as {
      temperature: Array<{ model: 'oiii' | 'nii'; neCm3: number; ratio: number[]; temperatureK: number[] }>
    }
    for (const c of fixture.temperature.filter((x) => x.neCm3 === 100)) {
      const model = c.model === 'oiii' ? OIII_TEMPERATURE_MODEL : NII_TEMPERATURE_MODEL
      for (let j = 1; j < c.ratio.length - 1; j++) {
        const slope = Math.abs((c.temperatureK[j + 1] - c.temperatureK[j - 1]) / Math.log(c.ratio[j + 1] / c.ratio[j - 1]))
        const sigma = temperatureError(model, c.temperatureK[j], 100, 0.01)
        expect(Math.abs(sigma / (0.01 * slope) - 1), `${c.model} R ${c.ratio[j]}`).toBeLessThan(0.04)
      }
    }
  })
})
