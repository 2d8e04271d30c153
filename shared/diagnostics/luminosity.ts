import { adaptiveGaussLegendre, gaussLegendre10 } from '../stats/integration.ts'

/** Speed of light, km s⁻¹ (exact; SI definition). */
export const SPEED_OF_LIGHT_KM_PER_S = 299792.458
/** Centimetres per megaparsec (IAU 2012 au and 2015 pc definitions, via shared/science/README.md §6). */
export const CM_PER_MPC = 3.0856775814913673e24

/**
 * Dimensionless Hubble rate of flat ΛCDM without radiation, E(z) = √(Ω_m(1+z)³ + 1 − Ω_m).
 * Source: Hogg 1999, astro-ph/9905116, eq. 14 (with Ω_k = 0, Ω_r = 0).
 *
 * @param z       redshift
 * @param omegaM  Ω_m, dimensionless
 * @returns E(z), dimensionless
 * @example hubbleRate(0, 0.3) // 1
 */
export function hubbleRate(z: number, omegaM: number): number {
  const zp = 1 + z
  return Math.sqrt(omegaM * zp * zp * zp + 1 - omegaM)
}

function inverseHubbleRate(z: number, omegaM: number): number {
  return 1 / hubbleRate(z, omegaM)
}

/**
 * Luminosity distance of flat ΛCDM, D_L = (1 + z)(c/H₀)∫₀^z dz′/E(z′), integrated with adaptive
 * Gauss–Legendre quadrature to a relative error ≤ 1e-10.
 * Source: Hogg 1999, astro-ph/9905116, eqs. 15, 16, 21.
 *
 * @param z       redshift, > 0
 * @param h0      H₀, km s⁻¹ Mpc⁻¹
 * @param omegaM  Ω_m (Ω_Λ = 1 − Ω_m), dimensionless
 * @returns D_L in Mpc
 * @example luminosityDistanceMpc(0.1, 70, 0.3) // ≈ 460.2999 (astropy 5.2.1, via shared/science/README.md §6)
 */
export function luminosityDistanceMpc(z: number, h0: number, omegaM: number): number {
  const integral = adaptiveGaussLegendre(inverseHubbleRate, 0, z, 1e-10, omegaM)
  return (1 + z) * (SPEED_OF_LIGHT_KM_PER_S / h0) * integral
}

/** Node spacing (in z) and reach of the D_C table of `createLuminosityDistanceCache`. */
const TABLE_STEP_Z = 0.002
const TABLE_MAX_Z = 10

/**
 * D_L(z) for fixed (H₀, Ω_m), shared by every galaxy of a batch (`diagnoseMany`, the kernel). The
 * comoving distance is integrated once onto nodes z_j = 0.002 j (0 ≤ z ≤ 10) by summing 10-point
 * Gauss–Legendre panels, and evaluated between nodes by cubic Hermite interpolation with the exact
 * derivative dD_C/dz = (c/H₀)/E(z) (Hogg 1999 eq. 15). The interpolation error is ≲ h⁴/384·max|D_C⁗|,
 * below 1e-9 relative for h = 0.002; the fixture test checks ≤ 1e-8 against astropy. Beyond z = 10
 * the direct adaptive integral is used. The table is built on first use.
 *
 * @param h0      km s⁻¹ Mpc⁻¹
 * @param omegaM  dimensionless
 * @returns z → D_L in Mpc (z > 0)
 * @example createLuminosityDistanceCache(70, 0.3)(0.05) // ≈ 222.2891
 */
export function createLuminosityDistanceCache(h0: number, omegaM: number): (z: number) => number {
  const hubbleDistance = SPEED_OF_LIGHT_KM_PER_S / h0
  const nodes = Math.round(TABLE_MAX_Z / TABLE_STEP_Z) + 1
  let dc: Float64Array | null = null
  let slope: Float64Array | null = null
  const build = () => {
    dc = new Float64Array(nodes)
    slope = new Float64Array(nodes)
    slope[0] = hubbleDistance
    for (let j = 1; j < nodes; j++) {
      dc[j] = dc[j - 1] + hubbleDistance * gaussLegendre10(inverseHubbleRate, (j - 1) * TABLE_STEP_Z, j * TABLE_STEP_Z, omegaM)
      slope[j] = hubbleDistance * inverseHubbleRate(j * TABLE_STEP_Z, omegaM)
    }
  }
  return (z: number) => {
    if (!(z < TABLE_MAX_Z)) return luminosityDistanceMpc(z, h0, omegaM)
    if (dc === null) build()
    const d = dc as unknown as Float64Array
    const m = slope as unknown as Float64Array
    const t = z / TABLE_STEP_Z
    const j = Math.floor(t)
    const s = t - j
    // cubic Hermite basis on [z_j, z_j+1]
    const s2 = s * s
    const s3 = s2 * s
    const h = TABLE_STEP_Z
    const value = (2 * s3 - 3 * s2 + 1) * d[j] + (s3 - 2 * s2 + s) * h * m[j] + (-2 * s3 + 3 * s2) * d[j + 1] + (s3 - s2) * h * m[j + 1]
    return (1 + z) * value
  }
}

/**
 * Line luminosity L = 4π D_L² F.
 * Source: definition of the luminosity distance (Hogg 1999, astro-ph/9905116, eq. 20).
 *
 * @param fluxCgs     flux, erg s⁻¹ cm⁻²
 * @param distanceMpc D_L, Mpc
 * @returns L in erg s⁻¹
 * @example lineLuminosity(1e-14, 222.2891) // ≈ 5.912e40 (shared/science/README.md §6)
 */
export function lineLuminosity(fluxCgs: number, distanceMpc: number): number {
  const d = distanceMpc * CM_PER_MPC
  return 4 * Math.PI * d * d * fluxCgs
}

/** Kennicutt 1998, ARA&A 36, 189, eq. 2: SFR = 7.9×10⁻⁴² L(Hα) (M☉ yr⁻¹ per erg s⁻¹; Salpeter IMF 0.1–100 M☉). */
export const KENNICUTT98_HALPHA = 7.9e-42
/** Kennicutt & Evans 2012, ARA&A 50, 531, eq. 12 and Table 1: log SFR = log L(Hα) − 41.27 (Kroupa IMF eq. no. from memory, shared/science/README.md §12). */
export const KENNICUTT_EVANS12_LOG_HALPHA = 41.27

/**
 * Star-formation rate from dereddened Hα, Kennicutt 1998 (ARA&A 36, 189, eq. 2; Salpeter IMF).
 * @param luminosityHalpha  L(Hα), erg s⁻¹
 * @returns SFR in M☉ yr⁻¹
 * @example sfrKennicutt98(5.912e40) // ≈ 0.467 (shared/science/README.md §6)
 */
export function sfrKennicutt98(luminosityHalpha: number): number {
  return KENNICUTT98_HALPHA * luminosityHalpha
}

/**
 * Star-formation rate from dereddened Hα, Kennicutt & Evans 2012 (ARA&A 50, 531; Kroupa IMF):
 * SFR = L(Hα)·10^−41.27.
 * @param luminosityHalpha  L(Hα), erg s⁻¹
 * @returns SFR in M☉ yr⁻¹
 * @example sfrKennicuttEvans12(5.912e40) // ≈ 0.3175 (shared/science/README.md §6)
 */
export function sfrKennicuttEvans12(luminosityHalpha: number): number {
  return luminosityHalpha * KENNICUTT_EVANS12_FACTOR
}
const KENNICUTT_EVANS12_FACTOR = Math.pow(10, -KENNICUTT_EVANS12_LOG_HALPHA)
