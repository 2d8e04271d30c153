import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { airToVacuum, refractiveIndexAir, vacuumToAir } from '../../../../shared/spectra/index.ts'
import { AIR_WAVELENGTH_ANGSTROM } from '../../../../shared/vocabulary/lines.ts'

/**
 * Air ↔ vacuum with the IAU refractive index of Morton 2000, ApJS 130, 403 (shared/science/README.md
 * §0, §13.4). Second computations: tests/fixtures/spectra/profiles.json (airvac, an independent Python
 * implementation) and tests/fixtures/science/numerics.json (Balmer lines from the Rydberg formula).
 */
const profiles = JSON.parse(readFileSync(new URL('../../../fixtures/spectra/profiles.json', import.meta.url), 'utf8'))
const numerics = JSON.parse(readFileSync(new URL('../../../fixtures/science/numerics.json', import.meta.url), 'utf8'))

describe('air and vacuum wavelengths (Morton 2000; README §13.4)', () => {
  it('vacuum → air matches the Python implementation of the same index to 1e-9 Å (make_profile_fixture.py)', () => {
    for (const [vac, air] of profiles.airvac as number[][]) expect(Math.abs(vacuumToAir(vac) - air)).toBeLessThan(1e-9)
  })

  it('vacuum → air of the Rydberg Balmer wavelengths matches numerics.json (make_numerics_fixture.py) to 1e-9 Å', () => {
    for (const b of Object.values(numerics.balmer) as { vacuumAngstrom: number; airAngstrom: number }[]) {
      expect(Math.abs(vacuumToAir(b.vacuumAngstrom) - b.airAngstrom)).toBeLessThan(1e-9)
    }
  })

  it('air → vacuum inverts vacuum → air to 1e-10 Å for every line of the table (closed form: fixed point)', () => {
    for (const air of Object.values(AIR_WAVELENGTH_ANGSTROM)) expect(Math.abs(vacuumToAir(airToVacuum(air)) - air)).toBeLessThan(1e-10)
  })

  it('check values: Hα 6562.80 → 6564.61, Hβ 4861.33 → 4862.69, [O III] 5006.84 → 5008.24 Å vacuum (Morton 2000 index; README §13.4)', () => {
    expect(airToVacuum(6562.8)).toBeCloseTo(6564.61, 2)
    expect(airToVacuum(4861.33)).toBeCloseTo(4862.69, 2)
    expect(airToVacuum(5006.84)).toBeCloseTo(5008.24, 2)
    expect(refractiveIndexAir(6564.61) - 1).toBeCloseTo(2.7625e-4, 7)
  })

  it('below 2000 Å wavelengths are vacuum and pass unchanged (common practice)', () => {
    expect(airToVacuum(1215.67)).toBe(1215.67)
    expect(vacuumToAir(1215.67)).toBe(1215.67)
  })
})
