/**
 * Spectra, line fits and the fit-quality table as the server's routes answer them. Typed by hand
 * after the shared design until the spectrum schemas are on main; then these become `z.infer` of
 * those schemas (DEVELOPERS.md "Types").
 */

export type FitProfile = 'gaussian' | 'lorentzian' | 'voigt'
export type FitComponents = 1 | 2 | 'auto'
export type BroadHalpha = 'off' | 'on' | 'auto'
export type AbsorptionFeature = 'nad'

/** The fit settings (`settings.fit` of the assumptions, the `fit` of a trial refit). */
export interface FitSettings {
  profile: FitProfile
  components: FitComponents
  broadHalpha: BroadHalpha
  absorption: AbsorptionFeature[]
  monteCarlo: { draws: number; seed: number }
}

export type SpectralResolution = { fwhmAngstrom: number } | { fwhmKmPerS: number } | { resolvingPower: number } | null

export interface SpectrumData {
  id: string | number
  galaxyId: string
  redshift: number
  wavelengthMedium: 'air' | 'vacuum'
  fluxUnit: number
  resolution: SpectralResolution
  /** observed wavelengths (Å), ascending */
  wavelength: number[]
  flux: (number | null)[]
  /** 1σ per pixel; null for a bad pixel */
  error: (number | null)[]
}

export interface FittedComponent {
  flux: number
  error: number
  velocity: number
  velocityError: number
  sigma: number
  sigmaError: number
  sigmaIntrinsic: number
}

export interface DetectedLine {
  detected: true
  flux: number
  error: number
  snr: number
  ew?: number | null
  ewError?: number | null
  velocity: number
  velocityError: number
  sigma: number
  sigmaError: number
  sigmaInstrumental?: number | null
  sigmaIntrinsic: number
  components?: FittedComponent[]
}

export interface UndetectedLine { detected: false; upperLimit: number }

export type FittedLine = DetectedLine | UndetectedLine

export interface NaDAbsorption {
  detected: boolean
  ew?: number
  ewError?: number
  ewUpperLimit?: number
  doubletRatio?: number
  logN?: number
  logNError?: number
  b?: number
  bError?: number
  velocity?: number
  velocityError?: number
  flags?: string[]
  note?: string
}

export interface SpectrumFitResult {
  id: string
  lines: Record<string, FittedLine>
  absorption: { nad?: NaDAbsorption }
  fit: { chi2: number; dof: number; components: number; broadHalpha: boolean }
  flags: string[]
}

export type ModelComponentKind = 'narrow' | 'narrow2' | 'broad' | 'absorption'

export interface ModelComponent { line: string; kind: ModelComponentKind; values: (number | null)[] }

/** The model on the spectrum's pixels (null outside the fitted windows). */
export interface SpectrumModelCurves {
  continuum: (number | null)[]
  total: (number | null)[]
  components: ModelComponent[]
  windows: { name: string; from: number; to: number }[]
}

export interface SpectrumFit {
  /** the assumptions revision it was stored under; a trial refit has none */
  revision?: number | null
  settings: FitSettings
  result: SpectrumFitResult
  model: SpectrumModelCurves
}

export interface GalaxySpectrum { spectrum: SpectrumData; fit: SpectrumFit | null }

export type FitQualitySort = 'chi2dof' | '-chi2dof' | 'galaxyId' | '-galaxyId' | 'detections' | '-detections'

export interface FitQualityQuery { sort?: FitQualitySort; flag?: string; q?: string; page?: number; pageSize?: number }

export interface FitQualityRow {
  galaxyId: string
  spectrumId: string | number
  pixels: number
  wavelengthMin: number
  wavelengthMax: number
  revision: number | null
  chi2: number | null
  dof: number | null
  chi2dof: number | null
  components: number | null
  broadHalpha: boolean | null
  detections: number | null
  flags: string[]
}

export interface FitQualityPage { items: FitQualityRow[]; total: number; page: number; pageSize: number }

export interface SpectrumUploadDefaults {
  redshift?: number
  fluxUnit?: number
  wavelengthMedium?: 'air' | 'vacuum'
  resolution?: SpectralResolution
}

/** One file of an upload: the spectra read from it, or why it was refused. */
export interface SpectrumUploadFile {
  name: string
  size: number
  spectra?: { galaxyId: string; pixels: number; source: string }[]
  error?: { message: string; line?: number }
  /** what the upload did with a galaxy that had a spectrum already */
  skipped?: boolean
}

export interface SpectrumUpload { id: string; files: SpectrumUploadFile[] }

export interface SpectrumUploadAnswer { upload: SpectrumUpload; job: import('./types').Job }

/** `bins` are the edges (one more than the counts). */
export interface BinnedCounts { bins: number[]; counts: number[] }

export interface Kinematics {
  fitted: number
  broadFraction: number | null
  velocity: BinnedCounts
  sigma: BinnedCounts
}
