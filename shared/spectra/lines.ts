/**
 * The lines a spectrum fit measures, grouped into complexes fitted in one window each, and the
 * Na I D doublet (shared/science/README.md §13.5, §14).
 *
 * Rest wavelengths are in air: the 15 narrow lines of the public API from shared/vocabulary/lines.ts (NIST values;
 * shared/science/README.md §0), He I 5876 and Na I D from the same database as usually quoted (from memory;
 * shared/science/README.md §12).
 * Fixed doublet ratios are those of the T_e diagnostics (`OIII_5007_TO_4959`, `NII_6584_TO_6548` in temperature.ts;
 * README §4, §12).
 */
import { AIR_WAVELENGTH_ANGSTROM, FIT_ONLY_LINES, type LineId } from '../vocabulary/lines.ts'
import { NII_6584_TO_6548, OIII_5007_TO_4959 } from '../diagnostics/temperature.ts'

/** Emission lines a fit reports: the narrow lines of the public API plus He I 5876 (fitted beside Na I D). */
export type FitLineId = Exclude<LineId, 'halpha_broad'> | 'hei_5876'

/** He I 5876 (air, Å), from the line vocabulary (shared/vocabulary/lines.ts). */
export const HEI_5876_AIR_ANGSTROM = FIT_ONLY_LINES[0].airAngstrom

/** Rest air wavelength (Å) of every line a fit can report. */
export const FIT_LINE_AIR_ANGSTROM: Readonly<Record<FitLineId, number>> = {
  ...(Object.fromEntries(Object.entries(AIR_WAVELENGTH_ANGSTROM).filter(([id]) => id !== 'halpha_broad')) as Record<Exclude<LineId, 'halpha_broad'>, number>),
  hei_5876: HEI_5876_AIR_ANGSTROM,
}

/** A line whose flux is a fixed fraction of another line's, in every component. */
export interface TiedLine {
  line: FitLineId
  parent: FitLineId
  /** F(parent)/F(line) */
  ratio: number
}

/** [O III] 4959 = 5007/2.98 and [N II] 6548 = 6584/3.05 (shared/science/README.md §4, §13.6). */
export const TIED_LINES: readonly TiedLine[] = [
  { line: 'oiii_4959', parent: 'oiii_5007', ratio: OIII_5007_TO_4959 },
  { line: 'nii_6548', parent: 'nii_6584', ratio: NII_6584_TO_6548 },
]

/** Na I D (air, Å) and oscillator strengths: Morton 2003, ApJS 149, 205 (values from memory; shared/science/README.md §12, §14). */
export const NAD = Object.freeze({
  d2: Object.freeze({ airAngstrom: 5889.95, f: 0.6408 }),
  d1: Object.freeze({ airAngstrom: 5895.92, f: 0.3201 }),
})

/**
 * A group of lines fitted in one window: from `blueKmPerS` below the bluest to `redKmPerS` above the
 * reddest rest wavelength (project choice, shared/science/README.md §13.5).
 */
export interface LineComplex {
  id: string
  lines: readonly FitLineId[]
  blueKmPerS: number
  redKmPerS: number
  /** the window holds the Na I D absorption doublet */
  absorption?: boolean
}

/** Half-width of an ordinary window beyond its outer lines, km/s. */
export const WINDOW_KM_PER_S = 2500
/** Blue reach of the Hα window when a broad Hα component may be fitted, km/s. */
export const BROAD_WINDOW_BLUE_KM_PER_S = 6000
/** Pixels at least this far from every line of a complex are its continuum side bands, km/s. */
export const SIDEBAND_KM_PER_S = 1200

const W = WINDOW_KM_PER_S

/** The complexes of a fit, blue to red. [O I] 6300's window stops 1500 km/s redward to keep [O I] 6363 out. */
export const LINE_COMPLEXES: readonly LineComplex[] = [
  { id: 'oii', lines: ['oii_3726', 'oii_3729'], blueKmPerS: W, redKmPerS: W },
  { id: 'hdelta', lines: ['hdelta'], blueKmPerS: W, redKmPerS: W },
  { id: 'hgamma', lines: ['hgamma', 'oiii_4363'], blueKmPerS: W, redKmPerS: W },
  { id: 'hbeta', lines: ['hbeta', 'oiii_4959', 'oiii_5007'], blueKmPerS: W, redKmPerS: W },
  { id: 'nii_5755', lines: ['nii_5755'], blueKmPerS: W, redKmPerS: W },
  { id: 'nad', lines: ['hei_5876'], blueKmPerS: W, redKmPerS: W, absorption: true },
  { id: 'oi', lines: ['oi_6300'], blueKmPerS: W, redKmPerS: 1500 },
  { id: 'halpha', lines: ['nii_6548', 'halpha', 'nii_6584'], blueKmPerS: W, redKmPerS: W },
  { id: 'sii', lines: ['sii_6717', 'sii_6731'], blueKmPerS: W, redKmPerS: W },
]

/**
 * With a broad Hα component allowed, Hα, [N II] and [S II] share one window reaching 6000 km/s blueward
 * (the broad line's wings run under [S II]).
 */
export const BROAD_HALPHA_COMPLEX: LineComplex = {
  id: 'halpha', lines: ['nii_6548', 'halpha', 'nii_6584', 'sii_6717', 'sii_6731'], blueKmPerS: BROAD_WINDOW_BLUE_KM_PER_S, redKmPerS: W,
}

/** Coverage half-width for a narrow line and for broad Hα, km/s (shared/science/README.md §13.5). */
export const COVERAGE_KM_PER_S = 1000
export const BROAD_COVERAGE_KM_PER_S = 3000
