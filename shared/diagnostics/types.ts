/**
 * Types of the science library. The result and the settings are `z.infer` of their zod schemas
 * (shared/schemas/), which is where every field is described; only types are imported here, so the
 * library never loads zod at run time. Names (lines, ratios, classes) come from shared/vocabulary/.
 */
import type { z } from 'zod'
import type { GalaxyResultSchema } from '../schemas/diagnostics-result.schema.ts'
import type { Settings } from '../schemas/galaxy.schema.ts'
import type { LineId } from '../vocabulary/lines.ts'

// re-exported so that consumers need one import for every type of the result
export type { ExtinctionLaw } from '../vocabulary/extinction-laws.ts'
export type { LineId } from '../vocabulary/lines.ts'
export type { RatioKey } from '../vocabulary/ratios.ts'
export type { Percentiles } from '../stats/percentiles.ts'
export type { NiiClass, OverallClass, SiiOiClass, WhanClass } from '../vocabulary/classes.ts'

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

/**
 * The analysis assumptions, complete (public API `settings` after its defaults; shared/science/README.md §10):
 * extinction law and R_V, intrinsic Hα/Hβ, T_e (K) for the densities, minimum S/N, negative fluxes
 * allowed or not, SFR calibration, flat ΛCDM cosmology (H₀ km s⁻¹ Mpc⁻¹, Ω_m) and Monte Carlo draws and seed.
 */
export type DiagnosticSettings = Settings

/** Everything derived for one galaxy under one set of assumptions (see `GalaxyResultSchema`). */
export type GalaxyResult = z.infer<typeof GalaxyResultSchema>

/** Dust block: Balmer decrement, E(B−V), A_V (mag) and errors. */
export type ExtinctionResult = GalaxyResult['extinction']
/** One dereddened line: flux and error (input flux unit) with A_λ (mag), or a dereddened upper limit. */
export type DereddenedLine = NonNullable<GalaxyResult['dereddened'][LineId]>
/** Classes per diagram (shared/science/README.md §2.3–2.5) and overall (§2.4); Monte Carlo class fractions when requested. */
export type ClassesResult = GalaxyResult['classes']
/** Signed perpendicular distances (dex) on the [N II] diagram, positive on the AGN/Seyfert side (shared/science/README.md §2.6). */
export type NiiDistances = NonNullable<GalaxyResult['distances']['nii']>
/** Signed perpendicular distances (dex) on the [S II] or [O I] diagram (shared/science/README.md §2.6). */
export type SeyfertLinerDistances = NonNullable<GalaxyResult['distances']['sii']>
/** Electron density from one doublet (Sanders et al. 2016), cm⁻³. */
export type DensityResult = NonNullable<GalaxyResult['density']['sii']>
/** Electron temperature from one ion (Osterbrock & Ferland 2006 eqs. 5.4/5.5), K. */
export type TemperatureResult = NonNullable<GalaxyResult['temperature']['oiii']>
/** 12 + log(O/H) of the six calibrations (shared/science/README.md §5), dex. */
export type MetallicityResult = GalaxyResult['metallicity']
/** D_L (Mpc), L(Hα) (erg s⁻¹) and Hα SFRs (M☉ yr⁻¹) (shared/science/README.md §6). */
export type SfrResult = GalaxyResult['sfr']
/** Greene & Ho 2005 virial black-hole mass (M☉) from broad Hα (shared/science/README.md §7). */
export type BlackHoleResult = NonNullable<GalaxyResult['blackHoleMass']>
