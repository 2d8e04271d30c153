/** Inputs and results of a spectrum fit (shared/science/README.md §13, §14). */
import type { LineId } from '../vocabulary/lines.ts'
import type { ProfileKind } from './model.ts'

/** The instrumental line-spread function (Gaussian): exactly one field. */
export interface Resolution {
  /** FWHM in observed Å */
  fwhmAngstrom?: number
  /** FWHM in km/s */
  fwhmKmPerS?: number
  /** R = λ/FWHM */
  resolvingPower?: number
}

/** A 1-D spectrum: observed-frame wavelengths (Å) and flux densities in `fluxUnit` erg s⁻¹ cm⁻² Å⁻¹. */
export interface SpectrumInput {
  id: string
  redshift: number
  fluxUnit?: number
  wavelengthMedium?: 'air' | 'vacuum'
  wavelength: ArrayLike<number>
  flux: ArrayLike<number>
  /** 1σ per pixel (> 0), null for a bad pixel; or give `ivar` */
  error?: ArrayLike<number | null>
  /** inverse variance (≥ 0, 0 = bad pixel) */
  ivar?: ArrayLike<number>
  resolution?: Resolution
}

/** The `fit` options; every field optional (defaults in `DEFAULT_FIT_OPTIONS`). */
export interface FitOptions {
  profile?: ProfileKind
  components?: 1 | 2 | 'auto'
  broadHalpha?: 'off' | 'on' | 'auto'
  absorption?: readonly 'nad'[]
  monteCarlo?: { draws?: number; seed?: number }
  /** fixed rest-frame absorption EW (Å) added back to the narrow Balmer lines; 0 = none */
  balmerAbsorptionEw?: number
}

export interface ResolvedFitOptions {
  profile: ProfileKind
  components: 1 | 2 | 'auto'
  broadHalpha: 'off' | 'on' | 'auto'
  absorption: 'nad'[]
  monteCarlo: { draws: number; seed: number }
  balmerAbsorptionEw: number
}

/** What a fit takes from the `/diagnostics` settings. */
export interface FitContext {
  /** detection threshold F/σ (default 3, as /diagnostics) */
  minSnr?: number
}

/** One narrow component of a line (two-component fits), narrower first. */
export interface LineComponent {
  flux: number
  error: number
  velocity: number
  velocityError: number
  sigma: number
  sigmaError: number
  sigmaIntrinsic: number
  gammaIntrinsic?: number
}

export interface DetectedLine {
  detected: true
  flux: number
  error: number
  snr: number
  ew?: number
  ewError?: number
  velocity: number
  velocityError: number
  sigma: number
  sigmaError: number
  sigmaInstrumental?: number
  sigmaIntrinsic: number
  gammaIntrinsic?: number
  gammaIntrinsicError?: number
  components?: LineComponent[]
}

export interface UndetectedLine {
  detected: false
  upperLimit: number
}

export type LineResult = DetectedLine | UndetectedLine

export interface NadDetected {
  detected: true
  ew: number
  ewError: number
  ewD2: number
  ewD2Error: number
  ewD1: number
  ewD1Error: number
  doubletRatio?: number
  doubletRatioError?: number
  logN?: number
  logNError?: number
  b?: number
  bError?: number
  velocity: number
  velocityError: number
  flags: string[]
  note: string
}

export interface NadUndetected {
  detected: false
  ewUpperLimit: number
  flags: string[]
  note: string
}

export type NadResult = NadDetected | NadUndetected

export type MeasuredLine = { flux: number; error: number } | { upperLimit: number }

export interface SpectrumFitResult {
  id: string
  lines: Record<string, LineResult>
  absorption: { nad?: NadResult }
  fit: { chi2: number; dof: number; components: number; broadHalpha: boolean }
  /** can be posted as a galaxy's lines / ew / fwhm */
  measurements: {
    lines: Partial<Record<LineId, MeasuredLine>>
    ew: Partial<Record<LineId, number>>
    fwhm: Partial<Record<LineId, number>>
  }
  flags: string[]
  /** the fitted model, to redraw it on the spectrum (shared/spectra/redraw.ts); absent when no window was fitted */
  model?: FitModelParameters
}

/** The fitted model by name: the windows' set-up (setupFit's arguments), the configuration chosen, the parameters. */
export interface FitModelParameters {
  setup: { broad: boolean; nad: boolean; components: 1 | 2 }
  config: { profile: ProfileKind; components: 1 | 2; broad: boolean; hasInstrument: boolean }
  parameters: Record<string, number>
}

