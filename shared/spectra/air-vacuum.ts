/**
 * Air ↔ vacuum wavelengths with the IAU standard refractive index of dry air of Morton 2000,
 * ApJS 130, 403 (his eq. 8 as usually quoted — equation number from memory), the index the repository
 * already uses for its Balmer-line check (tests/fixtures/science/make_numerics_fixture.py;
 * shared/science/README.md §0 and §13.4):
 *
 *     n = 1 + 8.34254×10⁻⁵ + 2.406147×10⁻² / (130 − s²) + 1.5998×10⁻⁴ / (38.9 − s²),  s = 10⁴/λ_vac (µm⁻¹)
 *
 * λ_air = λ_vac / n(λ_vac); the inverse is found by fixed-point iteration λ_vac = λ_air · n(λ_vac),
 * which contracts by ~10⁻⁶ per step (three steps reach 1e-12 Å). Valid above 2000 Å (the formula's range).
 */

/** Shortest wavelength (Å) at which the air/vacuum conversion applies (Morton 2000: 2000 Å). */
export const AIR_VACUUM_MIN_ANGSTROM = 2000

/**
 * Refractive index of dry air at a vacuum wavelength (Morton 2000, ApJS 130, 403).
 *
 * @param vacuumAngstrom  λ_vac (Å), ≥ 2000
 * @example refractiveIndexAir(6564.61) // ≈ 1.000276 (shared/science/README.md §13.4)
 */
export function refractiveIndexAir(vacuumAngstrom: number): number {
  const s = 1e4 / vacuumAngstrom
  const s2 = s * s
  return 1 + 8.34254e-5 + 2.406147e-2 / (130 - s2) + 1.5998e-4 / (38.9 - s2)
}

/**
 * Air wavelength of a vacuum wavelength (Morton 2000); below 2000 Å the vacuum value is returned
 * (common practice: wavelengths there are always vacuum).
 *
 * @example vacuumToAir(6564.61) // ≈ 6562.80 (Hα; shared/science/README.md §13.4)
 */
export function vacuumToAir(vacuumAngstrom: number): number {
  if (vacuumAngstrom < AIR_VACUUM_MIN_ANGSTROM) return vacuumAngstrom
  return vacuumAngstrom / refractiveIndexAir(vacuumAngstrom)
}

/**
 * Vacuum wavelength of an air wavelength: the inverse of `vacuumToAir` by fixed-point iteration.
 *
 * @example airToVacuum(6562.80) // ≈ 6564.61 (Hα; shared/science/README.md §13.4)
 */
export function airToVacuum(airAngstrom: number): number {
  if (airAngstrom < AIR_VACUUM_MIN_ANGSTROM) return airAngstrom
  let vac = airAngstrom * refractiveIndexAir(airAngstrom)
  for (let i = 0; i < 4; i++) vac = airAngstrom * refractiveIndexAir(vac)
  return vac
}
