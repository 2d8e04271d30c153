/**
 * Seeded synthetic spectra with known truth, for tests and invented demo data (shared/science/README.md
 * §13.11). Emission lines are drawn with the fit's own pixel-averaged profiles; Na I D is built
 * independently of the fit: the optical depth of a Gaussian velocity distribution (README §14),
 * exp(−τ) on a grid ten times finer than the pixels, convolved with the instrumental Gaussian, then
 * averaged over each pixel. Noise: Gaussian with the stated σ, from the repository's seeded generator
 * (xoshiro128** + Box–Muller, shared/stats/rng.ts).
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { createRng } from '../stats/rng.ts'
import { centralOpticalDepth, equivalentWidth } from './curve-of-growth.ts'
import { FIT_LINE_AIR_ANGSTROM, NAD, TIED_LINES, type FitLineId } from './lines.ts'
import type { ProfileKind } from './model.ts'
import { restWavelength } from './prepare.ts'
import { gaussianPixels, lorentzianPixels, pixelBounds, voigtPixels } from './profiles.ts'
import { instrumentalSigmaAngstrom } from './resolution.ts'
import type { Resolution, SpectrumInput } from './types.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

/** One emission component of one line; give a line twice for two components. */
export interface SyntheticLine {
  id: FitLineId | 'halpha_broad'
  /** integrated flux (flux units × Å) */
  flux: number
  /** km/s from the systemic redshift */
  velocity?: number
  /** intrinsic Gaussian σ (km/s); ignored for Lorentzian profiles */
  sigma?: number
  /** intrinsic Lorentzian HWHM (km/s) for Lorentzian and Voigt profiles */
  gamma?: number
}

export interface SyntheticOptions {
  id?: string
  seed: number
  redshift: number
  /** observed-frame linear grid (Å) */
  wavelength: { start: number; end: number; step: number }
  medium?: 'air' | 'vacuum'
  /** continuum level (flux density) at `pivot` and its change per 1000 Å */
  continuum: { level: number; slope?: number; pivot?: number }
  /** 1σ noise per pixel (flux density); 0 for a noiseless spectrum */
  noise: number
  resolution?: Resolution
  profile?: ProfileKind
  lines: SyntheticLine[]
  /** add [O III] 4959 and [N II] 6548 at the fixed ratios from each 5007 / 6584 entry (default true) */
  tieDoublets?: boolean
  /** Na I D absorption: log10 N (cm⁻²), b (km/s), velocity (km/s) */
  nad?: { logN: number; b: number; velocity?: number }
}

export interface SyntheticSpectrum {
  spectrum: SpectrumInput & { wavelength: number[]; flux: number[]; error: number[] }
  /** noiseless model */
  model: Float64Array
  /** every emission component drawn (with the tied doublet partners), and the true Na I D widths */
  truth: { lines: SyntheticLine[]; nad?: { logN: number; b: number; velocity: number; ewD2: number; ewD1: number } }
}

/**
 * A seeded synthetic spectrum.
 *
 * @example syntheticSpectrum({ seed: 1, redshift: 0, wavelength: { start: 6500, end: 6620, step: 1 }, continuum: { level: 10 }, noise: 0, lines: [] }).spectrum.flux[0] // 10
 */
export function syntheticSpectrum(o: SyntheticOptions): SyntheticSpectrum {
  const medium = o.medium ?? 'air'
  const profile = o.profile ?? 'gaussian'
  const zf = 1 + o.redshift
  const n = Math.floor((o.wavelength.end - o.wavelength.start) / o.wavelength.step + 1e-9) + 1
  const lambda = new Float64Array(n)
  for (let i = 0; i < n; i++) lambda[i] = o.wavelength.start + i * o.wavelength.step
  const { lo, hi } = pixelBounds(lambda)
  const pivot = o.continuum.pivot ?? 0.5 * (lambda[0] + lambda[n - 1])
  const cont = new Float64Array(n)
  for (let i = 0; i < n; i++) cont[i] = o.continuum.level * (1 + ((o.continuum.slope ?? 0) * (lambda[i] - pivot)) / 1000)

  const lines: SyntheticLine[] = []
  for (const l of o.lines) {
    lines.push(l)
    if (o.tieDoublets === false) continue
    const tie = TIED_LINES.find((t) => t.parent === l.id)
    if (tie) lines.push({ ...l, id: tie.line, flux: l.flux / tie.ratio })
  }
  const model = new Float64Array(n)
  const buf = new Float64Array(n)
  for (const l of lines) {
    const air = FIT_LINE_AIR_ANGSTROM[l.id === 'halpha_broad' ? 'halpha' : l.id]
    const expected = zf * restWavelength(air, medium)
    const lc = expected * (1 + (l.velocity ?? 0) / C)
    const si = instrumentalSigmaAngstrom(o.resolution, expected)
    const sl = (lc * (l.sigma ?? 0)) / C
    const gl = (lc * (l.gamma ?? 0)) / C
    if (profile === 'gaussian') gaussianPixels(lo, hi, 0, n, lc, Math.sqrt(sl * sl + si * si), buf)
    else if (profile === 'lorentzian') si > 0 ? voigtPixels(lo, hi, 0, n, lc, si, gl, buf) : lorentzianPixels(lo, hi, 0, n, lc, gl, buf)
    else voigtPixels(lo, hi, 0, n, lc, Math.sqrt(sl * sl + si * si), gl, buf)
    for (let i = 0; i < n; i++) model[i] += l.flux * buf[i]
  }
  let nadTruth: SyntheticSpectrum['truth']['nad']
  const absorbed = new Float64Array(n)
  if (o.nad) {
    const v = o.nad.velocity ?? 0
    nadAbsorption(lambda, lo, hi, zf, medium, o.nad.logN, o.nad.b, v, o.resolution, absorbed)
    const lamVac = (key: 'd2' | 'd1'): number => restWavelength(NAD[key].airAngstrom, 'vacuum')
    nadTruth = {
      logN: o.nad.logN, b: o.nad.b, velocity: v,
      ewD2: equivalentWidth(10 ** o.nad.logN, o.nad.b, NAD.d2.f, lamVac('d2')),
      ewD1: equivalentWidth(10 ** o.nad.logN, o.nad.b, NAD.d1.f, lamVac('d1')),
    }
  }
  for (let i = 0; i < n; i++) model[i] += cont[i] * (1 - absorbed[i])
  const rng = createRng(o.seed)
  const flux: number[] = new Array(n)
  const error: number[] = new Array(n)
  for (let i = 0; i < n; i++) {
    flux[i] = model[i] + (o.noise > 0 ? o.noise * rng.nextNormal() : 0)
    error[i] = o.noise > 0 ? o.noise : 1
  }
  return {
    spectrum: {
      id: o.id ?? `synthetic-${o.seed}`, redshift: o.redshift, wavelengthMedium: medium, wavelength: Array.from(lambda), flux, error,
      ...(o.resolution ? { resolution: o.resolution } : {}),
    },
    model,
    truth: { lines, ...(nadTruth ? { nad: nadTruth } : {}) },
  }
}

/** Fraction of the continuum absorbed by Na I D in each pixel: 1 − exp(−τ) on a fine grid, convolved with the instrument, pixel-averaged. */
function nadAbsorption(
  lambda: Float64Array, lo: Float64Array, hi: Float64Array, zf: number, medium: 'air' | 'vacuum', logN: number, b: number, velocity: number,
  resolution: Resolution | undefined, out: Float64Array,
): void {
  const lines = (['d2', 'd1'] as const).map((key) => {
    const rest = restWavelength(NAD[key].airAngstrom, medium)
    // τ₀ uses the physical (vacuum) wavelength; the line sits at its wavelength in the spectrum's medium
    const tau0 = centralOpticalDepth(10 ** logN, NAD[key].f, restWavelength(NAD[key].airAngstrom, 'vacuum'), b)
    return { centre: zf * rest * (1 + velocity / C), tau0 }
  })
  const reach = 8 * b + 6 * (resolution ? C * instrumentalSigmaAngstrom(resolution, lines[0].centre) / lines[0].centre : 0) + 50
  const a = lines[0].centre * (1 - reach / C)
  const z = lines[1].centre * (1 + reach / C)
  const step = (hi[0] - lo[0]) / 10
  const m = Math.max(2, Math.ceil((z - a) / step))
  const fine = new Float64Array(m)
  for (let i = 0; i < m; i++) {
    const x = a + (i + 0.5) * step
    let tau = 0
    for (const l of lines) {
      const dv = C * (x / l.centre - 1)
      tau += l.tau0 * Math.exp(-(dv / b) * (dv / b))
    }
    fine[i] = -Math.expm1(-tau)
  }
  const sInst = resolution ? instrumentalSigmaAngstrom(resolution, lines[0].centre) : 0
  let conv = fine
  if (sInst > 0) {
    const half = Math.ceil((6 * sInst) / step)
    const kernel = new Float64Array(2 * half + 1)
    let norm = 0
    for (let k = -half; k <= half; k++) norm += kernel[k + half] = Math.exp(-0.5 * ((k * step) / sInst) ** 2)
    conv = new Float64Array(m)
    for (let i = 0; i < m; i++) {
      let s = 0
      for (let k = -half; k <= half; k++) {
        const j = i + k
        if (j >= 0 && j < m) s += kernel[k + half] * fine[j]
      }
      conv[i] = s / norm
    }
  }
  for (let i = 0; i < lambda.length; i++) {
    if (hi[i] < a || lo[i] > z) continue
    let s = 0
    let cnt = 0
    for (let j = Math.max(0, Math.floor((lo[i] - a) / step)); j < m; j++) {
      const x = a + (j + 0.5) * step
      if (x >= hi[i]) break
      if (x >= lo[i]) {
        s += conv[j]
        cnt++
      }
    }
    out[i] = cnt ? s / cnt : 0
  }
}

/** A narrow-line galaxy with broad Hα (invented; for demos and tests). */
export function broadLineExample(seed: number): SyntheticSpectrum {
  return syntheticSpectrum({
    seed, id: `broad-${seed}`, redshift: 0.035, wavelength: { start: 4700, end: 7100, step: 1.2 }, continuum: { level: 20, slope: -0.05 }, noise: 0.6,
    resolution: { fwhmAngstrom: 2.5 },
    lines: [
      { id: 'hbeta', flux: 120, sigma: 140 }, { id: 'oiii_5007', flux: 900, sigma: 140 }, { id: 'oi_6300', flux: 60, sigma: 140 },
      { id: 'halpha', flux: 420, sigma: 140 }, { id: 'nii_6584', flux: 380, sigma: 140 }, { id: 'sii_6717', flux: 110, sigma: 140 },
      { id: 'sii_6731', flux: 95, sigma: 140 }, { id: 'halpha_broad', flux: 2600, sigma: 1700, velocity: 150 },
    ],
  })
}

/** Two narrow kinematic components (a core and a blueshifted wider wing; invented). */
export function twoComponentExample(seed: number): SyntheticSpectrum {
  const core = 90
  const wing = 320
  const lines: SyntheticLine[] = []
  for (const [id, f] of [['hbeta', 100], ['oiii_5007', 600], ['halpha', 330], ['nii_6584', 260], ['sii_6717', 70], ['sii_6731', 60]] as const) {
    lines.push({ id, flux: f, sigma: core, velocity: 0 }, { id, flux: 0.6 * f, sigma: wing, velocity: -250 })
  }
  return syntheticSpectrum({
    seed, id: `two-${seed}`, redshift: 0.021, wavelength: { start: 4750, end: 6950, step: 1 }, continuum: { level: 15 }, noise: 0.4,
    resolution: { resolvingPower: 2500 }, lines,
  })
}

/** Na I D absorption with He I 5876 emission (invented). */
export function sodiumExample(seed: number): SyntheticSpectrum {
  return syntheticSpectrum({
    seed, id: `nad-${seed}`, redshift: 0.028, wavelength: { start: 5800, end: 6200, step: 0.8 }, continuum: { level: 30, slope: 0.02 }, noise: 0.25,
    resolution: { fwhmAngstrom: 2.0 }, lines: [{ id: 'hei_5876', flux: 25, sigma: 120 }], nad: { logN: 13.2, b: 90, velocity: -120 },
  })
}
