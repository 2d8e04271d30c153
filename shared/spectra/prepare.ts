/**
 * From a spectrum to the pixels of a fit: good pixels, rest wavelengths in the spectrum's medium,
 * coverage of every line, the window of each covered complex with its side-band continuum
 * (shared/science/README.md §13.4, §13.5).
 */
import { flagName } from '../vocabulary/flags.ts'
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { ScienceInputError } from '../flags.ts'
import { airToVacuum } from './air-vacuum.ts'
import {
  BROAD_COVERAGE_KM_PER_S, BROAD_HALPHA_COMPLEX, COVERAGE_KM_PER_S, FIT_LINE_AIR_ANGSTROM, LINE_COMPLEXES, NAD, SIDEBAND_KM_PER_S, TIED_LINES,
  type FitLineId, type LineComplex,
} from './lines.ts'
import type { AbsorptionLine, FitPixels, FitWindow, WindowLine } from './model.ts'
import { pixelBounds } from './profiles.ts'
import { hasResolution, instrumentalSigmaAngstrom } from './resolution.ts'
import type { SpectrumInput } from './types.ts'
import { isCovered, isSpanCovered, lowerBound, sidebandContinuum } from './windows.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

/** A spectrum as typed arrays: σ = NaN and good = 0 for a bad pixel. */
export interface PreparedSpectrum {
  n: number
  lambda: Float64Array
  lo: Float64Array
  hi: Float64Array
  flux: Float64Array
  sigma: Float64Array
  good: Uint8Array
}

/**
 * Typed arrays from a spectrum object; a pixel is good when its flux is finite and its error
 * finite and > 0 (or its ivar > 0).
 *
 * @throws {ScienceInputError} unequal lengths, no or both of error/ivar, wavelengths not strictly increasing
 */
export function prepareSpectrum(s: SpectrumInput): PreparedSpectrum {
  const n = s.wavelength.length
  if (s.flux.length !== n) throw new ScienceInputError('/flux', 'flux must have as many values as wavelength')
  if ((s.error === undefined) === (s.ivar === undefined)) throw new ScienceInputError('', 'give exactly one of error and ivar')
  const errs = s.error ?? s.ivar as ArrayLike<number>
  if (errs.length !== n) throw new ScienceInputError(s.error ? '/error' : '/ivar', 'errors must have as many values as wavelength')
  const lambda = new Float64Array(n)
  const flux = new Float64Array(n)
  const sigma = new Float64Array(n)
  const good = new Uint8Array(n)
  const w = s.wavelength
  const f = s.flux
  for (let i = 0; i < n; i++) {
    lambda[i] = w[i]
    flux[i] = f[i]
  }
  for (let i = 1; i < n; i++) if (!(lambda[i] > lambda[i - 1])) throw new ScienceInputError('/wavelength', 'wavelengths must increase strictly')
  if (s.error) {
    const e = s.error
    for (let i = 0; i < n; i++) {
      const v = e[i]
      sigma[i] = typeof v === 'number' ? v : NaN
    }
  } else {
    const iv = s.ivar as ArrayLike<number>
    for (let i = 0; i < n; i++) sigma[i] = 1 / Math.sqrt(iv[i])
  }
  for (let i = 0; i < n; i++) {
    const sg = sigma[i]
    good[i] = Number.isFinite(flux[i]) && Number.isFinite(sg) && sg > 0 ? 1 : 0
  }
  const { lo, hi } = pixelBounds(lambda)
  return { n, lambda, lo, hi, flux, sigma, good }
}

/** Rest wavelength of a line in the spectrum's medium (the table is in air; README §0, §13.4). */
export function restWavelength(airAngstrom: number, medium: 'air' | 'vacuum'): number {
  return medium === 'vacuum' ? airToVacuum(airAngstrom) : airAngstrom
}

export interface FitSetup {
  pixels: FitPixels
  /** narrow lines (and He I 5876 with Na I D) that are covered and fitted */
  covered: FitLineId[]
  flags: string[]
  broadAllowed: boolean
  nadCovered: boolean
  hasInstrument: boolean
  /** 1 + z */
  zFactor: number
}

/** Fewest good pixels a window needs beyond its parameters. */
const MIN_SPARE_PIXELS = 5

/**
 * Coverage, windows and side-band continua of a spectrum.
 *
 * @param spec     the prepared arrays
 * @param input    the spectrum (redshift, medium, resolution)
 * @param wantBroad   a broad Hα component may be fitted (`broadHalpha` on or auto)
 * @param wantNad     Na I D is asked for
 * @param components  the most narrow components the fit will try (for the pixel count check)
 */
export function setupFit(spec: PreparedSpectrum, input: SpectrumInput, wantBroad: boolean, wantNad: boolean, components: number): FitSetup {
  const medium = input.wavelengthMedium ?? 'air'
  const zf = 1 + input.redshift
  const flags: string[] = []
  const hasInstrument = hasResolution(input.resolution)
  if (!hasInstrument) flags.push(flagName('no-instrumental-correction'))
  const expected = (air: number): number => zf * restWavelength(air, medium)
  const coveredLine = (id: FitLineId): boolean => isCovered(spec.lo, spec.hi, spec.good, expected(FIT_LINE_AIR_ANGSTROM[id]), COVERAGE_KM_PER_S)

  const haCovered = coveredLine('halpha')
  const broadCovered = haCovered && isCovered(spec.lo, spec.hi, spec.good, expected(FIT_LINE_AIR_ANGSTROM.halpha), BROAD_COVERAGE_KM_PER_S)
  const broadAllowed = wantBroad && broadCovered
  if (wantBroad && !broadCovered) flags.push(flagName('not-covered', 'halpha_broad'))
  const d2 = expected(NAD.d2.airAngstrom)
  const d1 = expected(NAD.d1.airAngstrom)
  const nadCovered = wantNad && isSpanCovered(spec.lo, spec.hi, spec.good, d2 * (1 - COVERAGE_KM_PER_S / C), d1 * (1 + COVERAGE_KM_PER_S / C))
  if (wantNad && !nadCovered) flags.push(flagName('not-covered', 'nad'))

  const complexes: LineComplex[] = []
  for (const cx of LINE_COMPLEXES) {
    if (broadAllowed && (cx.id === 'halpha' || cx.id === 'sii')) {
      if (cx.id === 'halpha') complexes.push(BROAD_HALPHA_COMPLEX)
      continue
    }
    if (cx.absorption && !wantNad) continue
    complexes.push(cx)
  }
  const covered: FitLineId[] = []
  const windows: FitWindow[] = []
  const parts: { idx: number[]; window: FitWindow }[] = []
  for (const cx of complexes) {
    const withNad = !!cx.absorption && nadCovered
    const lines = cx.lines.filter((id) => coveredLine(id))
    for (const id of cx.lines) if (!lines.includes(id) && (!cx.absorption || wantNad)) flags.push(flagName('not-covered', id))
    if (lines.length === 0 && !withNad) continue
    const rests = cx.lines.map((id) => restWavelength(FIT_LINE_AIR_ANGSTROM[id], medium))
    if (cx.absorption) rests.push(restWavelength(NAD.d2.airAngstrom, medium), restWavelength(NAD.d1.airAngstrom, medium))
    const blue = zf * Math.min(...rests) * (1 - cx.blueKmPerS / C)
    const red = zf * Math.max(...rests) * (1 + cx.redKmPerS / C)
    // the good pixels in [blue, red] (wavelengths ascending: two binary searches)
    const idx: number[] = []
    for (let i = lowerBound(spec.lambda, blue); i < spec.n && spec.lambda[i] <= red; i++) if (spec.good[i]) idx.push(i)
    const nParams = 2 + lines.length * components + (withNad ? 4 : 0) + 6
    if (idx.length < nParams + MIN_SPARE_PIXELS) {
      for (const id of lines) flags.push(flagName('not-covered', id))
      if (withNad) flags.push(flagName('not-covered', 'nad'))
      continue
    }
    // a side-band pixel lies ≥ 1200 km/s from every line: outside each (c (1 − s/C), c (1 + s/C))
    const nearLo = rests.map((r) => zf * r * (1 - SIDEBAND_KM_PER_S / C))
    const nearHi = rests.map((r) => zf * r * (1 + SIDEBAND_KM_PER_S / C))
    const m = idx.length
    const lam = new Float64Array(m)
    const fl = new Float64Array(m)
    const sg = new Float64Array(m)
    const side = new Uint8Array(m)
    for (let j = 0; j < m; j++) {
      const i = idx[j]
      lam[j] = spec.lambda[i]
      fl[j] = spec.flux[i]
      sg[j] = spec.sigma[i]
      let far = 1
      for (let c = 0; c < nearLo.length; c++) if (lam[j] > nearLo[c] && lam[j] < nearHi[c]) far = 0
      side[j] = far
    }
    const mid = 0.5 * (blue + red)
    const half = 0.5 * (red - blue)
    const cont = sidebandContinuum(lam, fl, sg, side, mid, half)
    const kept = idx.filter((_, j) => !cont.outlier[j])
    const windowLines: WindowLine[] = lines.map((id) => {
      const rest = restWavelength(FIT_LINE_AIR_ANGSTROM[id], medium)
      const tie = TIED_LINES.find((t) => t.line === id && lines.includes(t.parent))
      return {
        id, restAngstrom: rest, expectedAngstrom: zf * rest, sigmaInstAngstrom: instrumentalSigmaAngstrom(input.resolution, zf * rest),
        ...(tie ? { parent: tie.parent, ratio: tie.ratio } : {}),
      }
    })
    const absorption: AbsorptionLine[] = withNad
      ? (['d2', 'd1'] as const).map((key) => {
        const rest = restWavelength(NAD[key].airAngstrom, medium)
        return { key, restAngstrom: rest, expectedAngstrom: zf * rest, sigmaInstAngstrom: instrumentalSigmaAngstrom(input.resolution, zf * rest), f: NAD[key].f }
      })
      : []
    covered.push(...lines)
    const window: FitWindow = { id: cx.id, start: 0, end: 0, mid, half, lines: windowLines, absorption, continuum0: cont.c0, continuum1: cont.c1 }
    windows.push(window)
    parts.push({ idx: kept, window })
  }
  const n = parts.reduce((s, p) => s + p.idx.length, 0)
  const pixels: FitPixels = {
    n, lambda: new Float64Array(n), lo: new Float64Array(n), hi: new Float64Array(n), y: new Float64Array(n),
    sigma: new Float64Array(n), weight: new Float64Array(n), windows,
  }
  let j = 0
  for (const { idx, window } of parts) {
    window.start = j
    for (const i of idx) {
      pixels.lambda[j] = spec.lambda[i]
      pixels.lo[j] = spec.lo[i]
      pixels.hi[j] = spec.hi[i]
      pixels.y[j] = spec.flux[i]
      pixels.sigma[j] = spec.sigma[i]
      pixels.weight[j] = 1 / (spec.sigma[i] * spec.sigma[i])
      j++
    }
    window.end = j
  }
  return { pixels, covered, flags, broadAllowed, nadCovered: windows.some((w) => w.absorption.length > 0), hasInstrument, zFactor: zf }
}
