import type { ExtinctionLaw } from '../extinction/index.ts'
import type { LineId } from '../lines/index.ts'
import type { Percentiles } from '../stats/percentiles.ts'
import type { NiiClass, OverallClass, SiiOiClass, WhanClass } from './classes.ts'

// re-exported so that consumers need one import for every type of the result
export type { ExtinctionLaw } from '../extinction/index.ts'
export type { LineId } from '../lines/index.ts'
export type { Percentiles } from '../stats/percentiles.ts'
export type { NiiClass, OverallClass, SiiOiClass, WhanClass } from './classes.ts'

/** One line measurement: a flux with its 1σ error (same unit), or an upper limit on the flux. */
export type LineValue = { flux: number; error: number } | { upperLimit: number }

/** One galaxy nucleus as submitted (public API `POST /api/v1/diagnostics`, `galaxies[]`; openapi/openapi.json). */
export interface GalaxyInput {
  id: string
  /** redshift; missing or ≤ 0 → no luminosities (flag), not an error */
  redshift?: number
  /** erg s⁻¹ cm⁻² per flux unit (default 1); matters only for luminosities */
  fluxUnit?: number
  lines: Partial<Record<LineId, LineValue>>
  /** equivalent widths in Å, emission positive (WHAN uses Hα and [N II] 6584) */
  ew?: Partial<Record<LineId, number>>
  /** FWHM in km s⁻¹ (`halpha_broad` for the black-hole mass) */
  fwhm?: Partial<Record<LineId, number>>
}

/** The analysis assumptions (public API `settings`; shared/science/README.md §10). */
export interface DiagnosticSettings {
  extinctionLaw: ExtinctionLaw
  /** R_V = A_V/E(B−V), dimensionless */
  rv: number
  /** intrinsic Hα/Hβ (2.86 Case B; 3.1 is the documented AGN choice) */
  intrinsicBalmer: number
  /** T_e (K) used to scale the doublet densities */
  electronTemperature: number
  /** lines with F/σ below this become upper limits minSnr·σ */
  minSnr: number
  /** accept negative fluxes (they become upper limits) instead of refusing them */
  allowNegative: boolean
  sfrCalibration: 'kennicutt98' | 'kennicuttEvans12'
  /** flat ΛCDM: H₀ in km s⁻¹ Mpc⁻¹, Ω_m dimensionless */
  cosmology: { h0: number; omegaM: number }
  /** Monte Carlo: number of draws (0 = off) and the integer seed */
  monteCarlo: { draws: number; seed: number }
}

/** Keys of `ratios` (public API; shared/science/README.md §2.1): log10 of observed ratios, except the two linear doublets. */
export type RatioKey = 'niiHa' | 'oiiiHb' | 'siiHa' | 'oiHa' | 'siiDoublet' | 'oiiDoublet'

/** Adds an optional `<key>Percentiles` sibling to every numeric field of T (Monte Carlo runs). */
export type WithPercentiles<T> = T & {
  [K in keyof T as T[K] extends number | null ? `${K & string}Percentiles` : never]?: Percentiles
}

/** Dust block: Balmer decrement, E(B−V), A_V (mag) and errors; see `GalaxyResult`. */
export type ExtinctionResult = WithPercentiles<{
  /** observed Hα/Hβ (or Hγ/Hβ when `source` is 'hgamma-hbeta') */
  balmerDecrement: number | null
  balmerDecrementError: number | null
  /** E(B−V), mag, ≥ 0 (clipped) */
  ebv: number | null
  /** error of the unclipped estimate, mag */
  ebvError: number | null
  av: number | null
  avError: number | null
  source: 'halpha-hbeta' | 'hgamma-hbeta' | null
  flags: string[]
}>

/** One dereddened line: flux and error (input flux unit) with A_λ (mag), or a dereddened upper limit. */
export type DereddenedLine =
  | WithPercentiles<{ flux: number; error: number; aLambda: number | null }>
  | WithPercentiles<{ upperLimit: number }>

/** Classes per diagram (shared/science/README.md §2.3–2.5) and overall (§2.4); Monte Carlo class fractions when requested. */
export interface ClassesResult {
  nii: NiiClass
  sii: SiiOiClass
  oi: SiiOiClass
  whan: WhanClass
  overall: OverallClass
  niiSubtype: 'seyfert' | 'liner' | null
  classProbabilities?: {
    nii: Record<NiiClass, number>
    sii: Record<SiiOiClass, number>
    oi: Record<SiiOiClass, number>
    whan: Record<WhanClass, number>
    overall: Record<OverallClass, number>
  }
}

/** Signed perpendicular distances (dex) on the [N II] diagram, positive on the AGN/Seyfert side (shared/science/README.md §2.6). */
export type NiiDistances = WithPercentiles<{
  ka03: number; ka03Error: number
  ke01: number; ke01Error: number
  s07: number; s07Error: number
  nearest: 'ka03' | 'ke01'
  nearestDistance: number
}>

/** Signed perpendicular distances (dex) on the [S II] or [O I] diagram (shared/science/README.md §2.6). */
export type SeyfertLinerDistances = WithPercentiles<{
  ke01: number; ke01Error: number
  ke06: number; ke06Error: number
  nearest: 'ke01'
  nearestDistance: number
}>

/** Electron density from one doublet (Sanders et al. 2016), cm⁻³. */
export type DensityResult = WithPercentiles<{
  /** n_e, cm⁻³; null at a density limit */
  ne: number | null
  neError: number | null
  /** observed doublet ratio (linear) */
  ratio: number
  ratioError: number
  flag: 'low-density-limit' | 'high-density-limit' | null
}>

/** Electron temperature from one ion (Osterbrock & Ferland 2006 eqs. 5.4/5.5), K. */
export type TemperatureResult = WithPercentiles<{
  /** T_e, K; null out of range or when only a limit exists */
  te: number | null
  teError: number | null
  /** n_e used in the last iteration step, cm⁻³ */
  neUsed: number | null
  flags: string[]
}>

/** 12 + log(O/H) of the six calibrations (shared/science/README.md §5), dex. */
export type MetallicityResult = WithPercentiles<{
  n2Pp04: number | null; n2Pp04Error: number | null
  n2Pp04Cubic: number | null; n2Pp04CubicError: number | null
  o3n2Pp04: number | null; o3n2Pp04Error: number | null
  n2M13: number | null; n2M13Error: number | null
  o3n2M13: number | null; o3n2M13Error: number | null
  n2s2haD16: number | null; n2s2haD16Error: number | null
  flags: string[]
}>

/** D_L (Mpc), L(Hα) (erg s⁻¹) and Hα SFRs (M☉ yr⁻¹) (shared/science/README.md §6). */
export type SfrResult = WithPercentiles<{
  luminosityDistanceMpc: number | null
  /** L(Hα), erg s⁻¹, dereddened when E(B−V) exists */
  luminosityHalpha: number | null
  luminosityHalphaError: number | null
  /** SFR by `settings.sfrCalibration`, M☉ yr⁻¹ */
  sfrHalpha: number | null
  sfrHalphaError: number | null
  sfrK98: number | null
  sfrK98Error: number | null
  sfrKe12: number | null
  sfrKe12Error: number | null
  /** IMF of `sfrHalpha` */
  imf: 'salpeter' | 'kroupa'
  flags: string[]
}>

/** Greene & Ho 2005 virial black-hole mass (M☉) from broad Hα (shared/science/README.md §7). */
export type BlackHoleResult = WithPercentiles<{
  massSolar: number
  log10Mass: number
  log10MassError: number
  /** observed broad Hα luminosity, erg s⁻¹ */
  luminosityBroadHalpha: number
  fwhmKmPerS: number
  flags: string[]
}>

/**
 * Everything derived for one galaxy under one set of assumptions (the response item of
 * POST /api/v1/diagnostics). Every number is finite or null, never NaN or Infinity.
 *
 * - `extinction`: Balmer decrement (Hα/Hβ, or Hγ/Hβ with source 'hgamma-hbeta'), E(B−V) (clipped at 0
 *   with `balmer-below-intrinsic`; `ebvError` is the error of the unclipped estimate), A_V and errors.
 * - `dereddened`: every submitted line; detected lines `{ flux, error, aLambda }` (flux corrected by
 *   10^(0.4 k E); without a decrement the observed flux with `aLambda: null`); upper limits
 *   `{ upperLimit }` (corrected the same way). `halpha_broad` is corrected like Hα here, but the
 *   black-hole mass uses the observed broad flux.
 * - `ratios`: log10 of observed niiHa, oiiiHb, siiHa, oiHa; linear siiDoublet, oiiDoublet; null when
 *   not computable. A ratio with an upper limit in the numerator is an upper limit, in the denominator
 *   a lower limit: `ratioLimits[key]` says 'upper' or 'lower' and `flags` holds
 *   `ratio-limit:<key>:upper|lower`; `ratioErrors[key]` is null for limits.
 * - `classes`: per diagram and overall (Kewley et al. 2006 with shared/science/README.md §2.4 conventions), WHAN,
 *   S07 subtype of an [N II] AGN; every `unclassified` comes with a flag saying why
 *   (`missing-line:<diagram>`, `limit-not-decisive:<diagram>`, `whan-needs-ew-halpha`, `overall-needs-nii`…).
 * - `distances`: signed perpendicular distances (dex) to each curve, positive on the AGN (or Seyfert)
 *   side, with first-order errors; null unless both ratios of the diagram are measured.
 * - `density`: [S II] and [O II] n_e (cm⁻³) at `settings.electronTemperature`; `ne: null` with
 *   `flag` 'low-density-limit' | 'high-density-limit' at the ends of the fit (the bound is not reported).
 * - `temperature`: [O III] and [N II] T_e (K) from dereddened fluxes, iterated with the [S II] density.
 * - `metallicity`: 12 + log(O/H) of six calibrations, for star-forming nuclei only.
 * - `sfr`: D_L (Mpc), L(Hα) (erg s⁻¹), SFR (M☉ yr⁻¹) Kennicutt 1998 and Kennicutt & Evans 2012.
 * - `blackHoleMass`: Greene & Ho 2005 virial mass from `halpha_broad` and `fwhm.halpha_broad`; null
 *   when no broad Hα was given or when it cannot be computed (with a flag).
 * - `flags`: every flag of the galaxy, deduplicated, including `below-min-snr:<line>`.
 * - With `monteCarlo.draws > 0`, every measured number `x` (not the `…Error` fields) gains
 *   `xPercentiles: { p16, p50, p84 }` over the finite draws, and `classes.classProbabilities` gives,
 *   per diagram, the fraction of draws in each class (including `unclassified`).
 */
export interface GalaxyResult {
  id: string
  extinction: ExtinctionResult
  dereddened: Partial<Record<LineId, DereddenedLine>>
  ratios: WithPercentiles<Record<RatioKey, number | null>>
  ratioErrors: Record<RatioKey, number | null>
  ratioLimits: Partial<Record<RatioKey, 'upper' | 'lower'>>
  classes: ClassesResult
  distances: { nii: NiiDistances | null; sii: SeyfertLinerDistances | null; oi: SeyfertLinerDistances | null }
  density: { sii: DensityResult | null; oii: DensityResult | null }
  temperature: { oiii: TemperatureResult | null; nii: TemperatureResult | null }
  metallicity: MetallicityResult
  sfr: SfrResult
  blackHoleMass: BlackHoleResult | null
  flags: string[]
}
