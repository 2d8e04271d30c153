import type { z } from 'zod'
import type { FitOptionsDto } from '../../shared/schemas/fit-options.schema.ts'
import type { ResolutionSchema } from '../../shared/schemas/spectra.schema.ts'
import type {
  LineFitSchema, SPECTRA_SORTS, SpectraListItemSchema, SpectraListQuerySchema, SpectraListSchema, SpectrumModelSchema,
  SpectrumUploadSchema, StoredAsSchema, StoredSpectrumSchema, UploadDefaults, UploadFileSchema,
} from '../../shared/schemas/project-spectra.schema.ts'
import type { ProjectOverviewSchema } from '../../shared/results/responses.ts'
import type { SpectrumFitResult } from '../../shared/spectra/types.ts'
import type { Job } from './types'

/**
 * Spectra, line fits and the fit-quality table as the server's routes answer them: `z.infer` of the
 * shared schemas (shared/schemas/project-spectra.schema.ts), the fit result as the science library
 * types it (the schema leaves it a record: it is the fit's own output).
 */

export type { DetectedLine, LineComponent as FittedComponent, LineResult as FittedLine, NadResult, SpectrumFitResult, UndetectedLine } from '../../shared/spectra/types.ts'

/** The fit settings (`settings.fit` of the assumptions, the `fit` of a trial refit), resolved. */
export type FitSettings = FitOptionsDto
export type FitProfile = FitSettings['profile']
export type FitComponents = FitSettings['components']
export type BroadHalpha = FitSettings['broadHalpha']

export type SpectralResolution = z.infer<typeof ResolutionSchema> | null

/** The stored spectrum (error: null for a bad pixel). */
export type SpectrumData = z.infer<typeof StoredSpectrumSchema>

/** The model on the spectrum's pixels (null outside the fitted windows). */
export type SpectrumModelCurves = z.infer<typeof SpectrumModelSchema>
export type ModelComponent = SpectrumModelCurves['components'][number]
export type ModelComponentKind = ModelComponent['kind']

export type SpectrumFit = Omit<z.infer<typeof LineFitSchema>, 'result'> & { result: SpectrumFitResult }

export interface GalaxySpectrum { spectrum: SpectrumData; fit: SpectrumFit | null }

export type FitQualitySort = (typeof SPECTRA_SORTS)[number]
export type FitQualityQuery = Partial<z.output<typeof SpectraListQuerySchema>>
export type FitQualityRow = z.infer<typeof SpectraListItemSchema>
export type FitQualityPage = z.infer<typeof SpectraListSchema>

export type SpectrumUploadDefaults = UploadDefaults

/** What an upload did with one spectrum of a file. */
export type StoredAs = z.infer<typeof StoredAsSchema>
/** One file of an upload (an entry of a zip is `archive.zip/path/in/archive`): its spectra, or why it was refused. */
export type SpectrumUploadFile = z.infer<typeof UploadFileSchema>
export type SpectrumUpload = z.infer<typeof SpectrumUploadSchema>
export interface SpectrumUploadAnswer { upload: SpectrumUpload; job: Job }

/** The overview's gas kinematics; `bins` are the edges (one more than the counts). */
export type Kinematics = z.infer<typeof ProjectOverviewSchema>['kinematics']
export type BinnedCounts = Kinematics['velocity']
