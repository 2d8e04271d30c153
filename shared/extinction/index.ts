import { calzetti00K, CALZETTI00_RANGE_ANGSTROM } from './calzetti00.ts'
import { ccm89K, CCM89_RANGE_ANGSTROM } from './ccm89.ts'
import { fitzpatrick99K, FITZPATRICK99_RANGE_ANGSTROM } from './fitzpatrick99.ts'
import { odonnell94K, ODONNELL94_RANGE_ANGSTROM } from './odonnell94.ts'
import type { ExtinctionLaw } from '../vocabulary/extinction-laws.ts'

// the laws' keys, labels and default R_V are in shared/vocabulary/extinction-laws.ts (shared/science/README.md §1.3)

/** Valid wavelength range of each law in Å (shared/science/README.md §1.3). */
export const EXTINCTION_RANGE_ANGSTROM: Readonly<Record<ExtinctionLaw, { min: number; max: number }>> = {
  ccm89: CCM89_RANGE_ANGSTROM,
  odonnell94: ODONNELL94_RANGE_ANGSTROM,
  calzetti00: CALZETTI00_RANGE_ANGSTROM,
  fitzpatrick99: FITZPATRICK99_RANGE_ANGSTROM,
}

const LAW_FUNCTIONS: Readonly<Record<ExtinctionLaw, (wavelengthAngstrom: number, rv: number) => number>> = {
  ccm89: ccm89K,
  odonnell94: odonnell94K,
  calzetti00: calzetti00K,
  fitzpatrick99: fitzpatrick99K,
}

/**
 * k(λ) = A(λ)/E(B−V) of the named law at one wavelength.
 * Sources: see `ccm89K`, `odonnell94K`, `calzetti00K`, `fitzpatrick99K`.
 *
 * @param law                 extinction law key
 * @param wavelengthAngstrom  λ in Å (air)
 * @param rv                  R_V, dimensionless, finite and > 0
 * @returns k(λ) in mag/mag
 * @throws {RangeError} outside the law's range (the server maps it to a 422 naming the line and law),
 *   for an unknown law or a non-positive R_V
 * @example extinctionK('ccm89', 4861.33, 3.1) // ≈ 3.609
 */
export function extinctionK(law: ExtinctionLaw, wavelengthAngstrom: number, rv: number): number {
  const fn = LAW_FUNCTIONS[law]
  if (!fn) throw new RangeError(`extinctionK: unknown extinction law ${String(law)}`)
  if (!(rv > 0 && Number.isFinite(rv))) throw new RangeError(`extinctionK requires rv > 0, got ${rv}`)
  return fn(wavelengthAngstrom, rv)
}

export { calzetti00K, ccm89K, fitzpatrick99K, odonnell94K }
