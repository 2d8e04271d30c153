import { FIT_LINE_AIR_ANGSTROM, NAD } from '../../../shared/spectra/lines.ts'
import { SPEED_OF_LIGHT_KM_PER_S } from '../../../shared/diagnostics/luminosity.ts'

/**
 * The line complexes the spectrum view zooms to: a chip per complex opens the observed window from
 * `blueKmPerS` below its bluest to `redKmPerS` above its reddest line. These are display windows
 * (wider than the lines so the continuum on both sides shows), not the fit's own windows.
 */

const C_KM_PER_S = SPEED_OF_LIGHT_KM_PER_S

export interface LineComplexView {
  id: string
  label: string
  /** air rest wavelengths of its lines (Å) */
  restAngstrom: readonly number[]
  blueKmPerS: number
  redKmPerS: number
}

const PAD = 1500
// the fit's own rest wavelengths (air, Å; shared/science/README.md §0, §14)
const A = FIT_LINE_AIR_ANGSTROM

/** Blue to red. */
export const LINE_COMPLEX_VIEWS: readonly LineComplexView[] = [
  { id: 'oii', label: '[O II] 3726,3729', restAngstrom: [A.oii_3726, A.oii_3729], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'hdelta', label: 'Hδ', restAngstrom: [A.hdelta], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'hgamma', label: 'Hγ', restAngstrom: [A.hgamma], blueKmPerS: PAD, redKmPerS: 1000 },
  { id: 'oiii_4363', label: '[O III] 4363', restAngstrom: [A.oiii_4363], blueKmPerS: 1000, redKmPerS: PAD },
  { id: 'hbeta', label: 'Hβ + [O III]', restAngstrom: [A.hbeta, A.oiii_4959, A.oiii_5007], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'nii_5755', label: '[N II] 5755', restAngstrom: [A.nii_5755], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'nad', label: 'Na I D + He I', restAngstrom: [A.hei_5876, NAD.d2.airAngstrom, NAD.d1.airAngstrom], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'oi', label: '[O I] 6300', restAngstrom: [A.oi_6300], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'halpha', label: 'Hα + [N II]', restAngstrom: [A.nii_6548, A.halpha, A.nii_6584], blueKmPerS: PAD, redKmPerS: PAD },
  { id: 'sii', label: '[S II] 6717,6731', restAngstrom: [A.sii_6717, A.sii_6731], blueKmPerS: PAD, redKmPerS: PAD },
]

/** With a broad Hα component the Hα window opens to ±5000 km/s, so its wings show (project choice). */
export const BROAD_HALPHA_KM_PER_S = 5000

export interface Window { from: number; to: number }

/**
 * The observed window of a complex at redshift z (Å).
 * @param broad  widen the Hα window for a broad component
 */
export function complexWindow(c: LineComplexView, z: number, broad = false): Window {
  const blue = broad && c.id === 'halpha' ? BROAD_HALPHA_KM_PER_S : c.blueKmPerS
  const red = broad && c.id === 'halpha' ? BROAD_HALPHA_KM_PER_S : c.redKmPerS
  const lo = Math.min(...c.restAngstrom) * (1 + z)
  const hi = Math.max(...c.restAngstrom) * (1 + z)
  return { from: lo * (1 - blue / C_KM_PER_S), to: hi * (1 + red / C_KM_PER_S) }
}

export interface ComplexChip { id: string; label: string; window: Window; covered: boolean }

/**
 * A chip per complex, `covered` when the spectrum reaches every line of it (its observed positions
 * lie inside [wavelengthMin, wavelengthMax]); windows are clipped to the spectrum.
 */
export function complexChips(z: number, wavelengthMin: number, wavelengthMax: number, broad = false): ComplexChip[] {
  return LINE_COMPLEX_VIEWS.map((c) => {
    const w = complexWindow(c, z, broad)
    const lines = c.restAngstrom.map((l) => l * (1 + z))
    const covered = lines.every((l) => l >= wavelengthMin && l <= wavelengthMax)
    return { id: c.id, label: c.label, covered, window: { from: Math.max(w.from, wavelengthMin), to: Math.min(w.to, wavelengthMax) } }
  })
}
