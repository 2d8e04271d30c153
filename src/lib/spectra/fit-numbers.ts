import type { FittedLine, SpectrumFitResult } from '../../api/spectra-types'
import { LINE_IDS, lineLabel } from '../../../shared/vocabulary/index.ts'
import { fmtMeasured } from '../../utils/format'

/** The fitted numbers beside the spectrum and the before/after table of a refit. */


/** The lines of a result in the vocabulary's order, lines the vocabulary lacks after them by wavelength-free name. */
export function orderedLineIds(lines: Record<string, unknown>): string[] {
  const known = LINE_IDS.filter((id) => id in lines) as string[]
  const rest = Object.keys(lines).filter((id) => !known.includes(id)).sort()
  return [...known, ...rest]
}

export interface FitNumberRow {
  id: string
  label: string
  detected: boolean
  flux: number | null
  fluxError: number | null
  upperLimit: number | null
  snr: number | null
  ew: number | null
  ewError: number | null
  velocity: number | null
  velocityError: number | null
  sigmaIntrinsic: number | null
  sigmaError: number | null
  /** "narrow 1", "narrow 2" under a two-component line */
  sub?: boolean
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null)

function rowOf(id: string, label: string, l: FittedLine): FitNumberRow {
  if (!l.detected) {
    return { id, label, detected: false, flux: null, fluxError: null, upperLimit: num(l.upperLimit), snr: null, ew: null, ewError: null, velocity: null, velocityError: null, sigmaIntrinsic: null, sigmaError: null }
  }
  return {
    id, label, detected: true, flux: num(l.flux), fluxError: num(l.error), upperLimit: null, snr: num(l.snr),
    ew: num(l.ew), ewError: num(l.ewError), velocity: num(l.velocity), velocityError: num(l.velocityError),
    sigmaIntrinsic: num(l.sigmaIntrinsic), sigmaError: num(l.sigmaError),
  }
}

/** One row per line (and one per component of a two-component line, below it). */
export function fitNumberRows(result: Pick<SpectrumFitResult, 'lines'>): FitNumberRow[] {
  const out: FitNumberRow[] = []
  for (const id of orderedLineIds(result.lines)) {
    const l = result.lines[id]
    out.push(rowOf(id, lineLabel(id), l))
    if (l.detected && l.components && l.components.length > 1) {
      l.components.forEach((c, k) => out.push({
        id: `${id}:${k + 1}`, label: `component ${k + 1}`, detected: true, sub: true,
        flux: num(c.flux), fluxError: num(c.error), upperLimit: null, snr: c.error > 0 ? c.flux / c.error : null,
        ew: null, ewError: null, velocity: num(c.velocity), velocityError: num(c.velocityError),
        sigmaIntrinsic: num(c.sigmaIntrinsic), sigmaError: num(c.sigmaError),
      }))
    }
  }
  return out
}

/**
 * The σ cell: "unresolved" for a detected line no wider than the instrument (its intrinsic σ is 0 and
 * its error only rounding at the bound), else σ ± error.
 */
export function sigmaText(r: Pick<FitNumberRow, 'detected' | 'sigmaIntrinsic' | 'sigmaError'>): string {
  if (r.detected && r.sigmaIntrinsic === 0) return 'unresolved'
  return fmtMeasured(r.sigmaIntrinsic, r.sigmaError)
}

/** χ²/dof of a fit, null without degrees of freedom. */
export function chi2PerDof(fit: { chi2: number | null; dof: number | null } | null | undefined): number | null {
  if (!fit || fit.chi2 === null || fit.dof === null || !(fit.dof > 0) || !Number.isFinite(fit.chi2)) return null
  return fit.chi2 / fit.dof
}

/** Number of detected emission lines. */
export function detectionCount(result: Pick<SpectrumFitResult, 'lines'>): number {
  return Object.values(result.lines).filter((l) => l.detected).length
}

export interface Compared { before: number | null; after: number | null; difference: number | null }

export interface CompareRow {
  id: string
  label: string
  detected: [boolean | null, boolean | null]
  /** difference of the flux as a fraction of the flux before */
  flux: Compared
  velocity: Compared
  sigma: Compared
}

function compared(before: number | null, after: number | null, relative = false): Compared {
  let difference: number | null = null
  if (before !== null && after !== null) difference = relative ? (before !== 0 ? (after - before) / Math.abs(before) : null) : after - before
  return { before, after, difference }
}

const fluxOf = (l: FittedLine | undefined) => (l ? (l.detected ? num(l.flux) : null) : null)

/** A row per line in either fit: flux (relative change), velocity and intrinsic σ (km/s) before and after. */
export function compareLines(before: Pick<SpectrumFitResult, 'lines'>, after: Pick<SpectrumFitResult, 'lines'>): CompareRow[] {
  const ids = orderedLineIds({ ...before.lines, ...after.lines })
  return ids.map((id) => {
    const a = before.lines[id], b = after.lines[id]
    return {
      id, label: lineLabel(id),
      detected: [a ? a.detected : null, b ? b.detected : null],
      flux: compared(fluxOf(a), fluxOf(b), true),
      velocity: compared(a?.detected ? num(a.velocity) : null, b?.detected ? num(b.velocity) : null),
      sigma: compared(a?.detected ? num(a.sigmaIntrinsic) : null, b?.detected ? num(b.sigmaIntrinsic) : null),
    }
  })
}

export interface CompareSummary {
  chi2dof: Compared
  components: [number | null, number | null]
  broadHalpha: [boolean | null, boolean | null]
  detections: Compared
}

export function compareSummary(before: SpectrumFitResult, after: SpectrumFitResult): CompareSummary {
  return {
    chi2dof: compared(chi2PerDof(before.fit), chi2PerDof(after.fit)),
    components: [num(before.fit.components), num(after.fit.components)],
    broadHalpha: [before.fit.broadHalpha, after.fit.broadHalpha],
    detections: compared(detectionCount(before), detectionCount(after)),
  }
}
