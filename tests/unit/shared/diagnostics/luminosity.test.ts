import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import {
  CM_PER_MPC, createLuminosityDistanceCache, lineLuminosity, luminosityDistanceMpc, sfrKennicutt98, sfrKennicuttEvans12,
} from '../../../../shared/diagnostics/luminosity.ts'

const fixture = JSON.parse(readFileSync(new URL('../../../fixtures/science/cosmology.json', import.meta.url), 'utf8')) as {
  library: string; version: string; cases: Array<{ h0: number; omegaM: number; z: number[]; luminosityDistanceMpc: number[] }>
}

describe('luminosity distance (Hogg 1999, astro-ph/9905116, eqs. 15, 16, 21)', () => {
  it('matches the shared/science/README.md §6 check values', () => {
    // astropy 5.2.1 FlatLambdaCDM, via shared/science/README.md §6; 4 d.p. → ±6e-5 Mpc
    const table: Array<[number, number]> = [[0.01, 43.1582], [0.05, 222.2891], [0.1, 460.2999], [0.5, 2832.9381], [1.0, 6607.6576]]
    for (const [z, d] of table) expect(Math.abs(luminosityDistanceMpc(z, 70, 0.3) - d), `z=${z}`).toBeLessThan(6e-5)
  })
  it(`matches astropy at every fixture redshift to a relative 1e-8 (${fixture.library} ${fixture.version})`, () => {
    // tests/fixtures/science/cosmology.json from make_cosmology_fixture.py (astropy 5.2.1, Debian)
    expect(fixture.library).toBe('astropy')
    for (const c of fixture.cases) {
      const dl = createLuminosityDistanceCache(c.h0, c.omegaM)
      c.z.forEach((z, j) => {
        const want = c.luminosityDistanceMpc[j]
        expect(Math.abs(dl(z) - want) / want, `H0=${c.h0} Ωm=${c.omegaM} z=${z}`).toBeLessThan(1e-8)
      })
    }
  })
  it('has the exact Einstein–de Sitter form for Ω_m = 1', () => {
    // Hogg 1999 eq. 16 with Ω_m = 1: D_C = 2(c/H₀)(1 − 1/√(1+z)) (closed form)
    const z = 2
    const exact = (1 + z) * 2 * (299792.458 / 70) * (1 - 1 / Math.sqrt(1 + z))
    expect(Math.abs(luminosityDistanceMpc(z, 70, 1) - exact) / exact).toBeLessThan(1e-12)
  })
})

describe('Hα luminosity and SFR', () => {
  it('reproduces the shared/science/README.md §6 checks', () => {
    // shared/science/README.md §6: F = 1e-14 at z = 0.05 → L = 5.912e40, SFR_K98 0.467, SFR_KE12 0.318; z = 0.1 → 2.535e41, 2.003, 1.361
    const l05 = lineLuminosity(1e-14, luminosityDistanceMpc(0.05, 70, 0.3))
    expect(l05 / 5.912e40).toBeCloseTo(1, 3)
    expect(sfrKennicutt98(l05)).toBeCloseTo(0.467, 3) // Kennicutt 1998, ARA&A 36, 189
    expect(sfrKennicuttEvans12(l05)).toBeCloseTo(0.318, 3) // Kennicutt & Evans 2012, ARA&A 50, 531
    const l1 = lineLuminosity(1e-14, luminosityDistanceMpc(0.1, 70, 0.3))
    expect(l1 / 2.535e41).toBeCloseTo(1, 3)
    expect(sfrKennicutt98(l1)).toBeCloseTo(2.003, 3)
    expect(sfrKennicuttEvans12(l1)).toBeCloseTo(1.361, 3)
  })
  it('KE12/K98 = 0.680', () => {
    // shared/science/README.md §6: 10^−41.27 / 7.9e-42 = 0.680
    expect(sfrKennicuttEvans12(1e41) / sfrKennicutt98(1e41)).toBeCloseTo(0.68, 3)
  })
  it('uses 1 Mpc = 3.0856775814913673e24 cm', () => {
    // IAU 2015 parsec definition (shared/science/README.md §6)
    expect(CM_PER_MPC).toBe(3.0856775814913673e24)
  })
})
