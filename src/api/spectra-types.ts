import type { FitOptionsDto } from '../../shared/schemas/spectra.schema.ts'
import type { SpectrumFitResult } from '../../shared/spectra/types.ts'
import type { Job } from './types'

/**
 * Spectra, line fits and the fit-quality table as the server's routes answer them. The fit settings
 * and the fit result are the shared schema's and the science library's types; the project views
 * (upload report, fit-quality table, stored spectrum and model) are typed by hand after the shared
 * design until their schemas are on main, then they become `z.infer` of those (DEVELOPERS.md "Types").
 */

export type { SpectrumFitResult, LineResult as FittedLine, DetectedLine, UndetectedLine, NadResult, LineComponent as FittedComponent } from '../../shared/spectra/types.ts'

/** The fit settings (`settings.fit` of the assumptions, the `fit` of a trial refit), resolved. */
export type FitSettings = FitOptionsDto
export type FitProfile = FitSettings['profile']
export type FitComponents = FitSettings['components']
export type BroadHalpha = FitSettings['broadHalpha']
export type AbsorptionFeature = FitSettings['absorption'][number]

export type SpectralResolution = { fwhmAngstrom: number } | { fwhmKmPerS: number } | { resolvingPower: number } | null

/** The stored spectrum (error: null for a bad pixel). */
export interface SpectrumData {
  id: number
  galaxyId: string
  redshift: number
  wavelengthMedium: 'air' | 'vacuum'
  fluxUnit: number
  resolution: SpectralResolution
  fileName?: string
  source?: string
  createdAt?: string
  /** observed wavelengths (Å), ascending */
  wavelength: number[]
  flux: (number | null)[]
  /** 1σ per pixel; null for a bad pixel */
  error: (number | null)[]
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
  /** the assumptions revision it was stored under; null for a trial refit */
  revision: number | null
  /** the fit settings, resolved, and the detection threshold */
  settings: FitSettings & { minSnr?: number }
  methodVersion?: string
  result: SpectrumFitResult
  model: SpectrumModelCurves
}

export interface GalaxySpectrum { spectrum: SpectrumData; fit: SpectrumFit | null }

export type FitQualitySort = 'chi2dof' | '-chi2dof' | 'galaxyId' | '-galaxyId' | 'detections' | '-detections'

export interface FitQualityQuery { sort?: FitQualitySort; flag?: string; q?: string; page?: number; pageSize?: number }

export interface FitQualityRow {
  galaxyId: string
  spectrumId: number
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

/** What an upload did with one spectrum of a file. */
export type StoredAs = 'created' | 'replaced' | 'skipped'

/** One file of an upload (an entry of a zip is `archive.zip/path/in/archive`): its spectra, or why it was refused. */
export interface SpectrumUploadFile {
  name: string
  size: number
  spectra?: { galaxyId: string; pixels: number; source: string; spectrumId: number | null; stored: StoredAs }[]
  error?: { message: string; line?: number }
}

export interface SpectrumUpload {
  id: string
  createdAt?: string
  fileCount?: number
  spectrumCount?: number
  intakeId?: string | null
  files: SpectrumUploadFile[]
}

export interface SpectrumUploadAnswer { upload: SpectrumUpload; job: Job }

/** `bins` are the edges (one more than the counts). */
export interface BinnedCounts { bins: number[]; counts: number[] }

export interface Kinematics {
  fitted: number
  broadFraction: number | null
  velocity: BinnedCounts
  sigma: BinnedCounts
}
