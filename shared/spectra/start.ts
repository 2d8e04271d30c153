/**
 * Starting kinematics of the narrow lines from moments of the continuum-subtracted spectrum
 * (shared/science/README.md §13.7): the flux-weighted centroid and second moment of the lines, stacked
 * in velocity, in windows that keep each line apart from its neighbours (common practice for a first
 * guess; the fit then refines it).
 *
 * Each line of a window is used out to half the distance to the nearest other line of the window
 * (emission or Na I D), at most 1000 km/s (the coverage half-width, README §13.5), and only when that
 * reach is at least 200 km/s ([O II] 3726/3729 are too close). The continuum is the window's side-band
 * start (README §13.5). Pass 1 keeps the lines with F/σ_F ≥ 3 and takes their stacked centroid; three
 * more passes recentre on it and measure out to min(reach, max(200 km/s, 3σ̂)). A Gaussian truncated
 * at ±hσ keeps the second moment σ² (1 − 2hφ(h)/erf(h/√2)) (closed form), which is divided out; the
 * pixels' own width adds Δ²/12 (Sheppard's correction, common practice) and the instrument σ_inst²,
 * both subtracted (flux-weighted over the lines) for the intrinsic σ.
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { COVERAGE_KM_PER_S } from './lines.ts'
import { erf } from './faddeeva.ts'
import { lowerBound } from './windows.ts'
import type { FitPixels } from './model.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

/** Shortest reach of a line's moments, km/s (project choice). */
export const MOMENT_MIN_REACH_KM_PER_S = 200
/** Least F/σ_F of a line that enters the moments (project choice, as `minSnr`'s default). */
export const MOMENT_MIN_SNR = 3
/** Measuring reach in units of the current σ estimate. */
const REACH_SIGMAS = 3

export interface KinematicMoments {
  /** stacked centroid, km/s from the systemic redshift */
  velocity: number
  /** observed second-moment σ, truncation corrected, km/s */
  sigmaObserved: number
  /** intrinsic σ: σ_obs² less the flux-weighted instrumental σ² and pixel Δ²/12, km/s (0 when not resolved) */
  sigmaIntrinsic: number
}

interface Feature {
  start: number
  end: number
  centre: number
  reach: number
  c0: number
  c1: number
  mid: number
  half: number
  /** σ_inst² + Δ²/12 in (km/s)² at the line */
  broadening2: number
}

/** Share of a Gaussian's second moment kept inside ±hσ: 1 − 2hφ(h)/erf(h/√2) (closed form). */
export function truncatedVarianceFraction(h: number): number {
  if (!(h > 0)) return 0
  const e = erf(h / Math.SQRT2)
  return 1 - (2 * h * Math.exp(-0.5 * h * h)) / Math.sqrt(2 * Math.PI) / e
}

/**
 * Moments of the narrow lines, or null when no line stands out (F/σ_F < 3 everywhere) or the moments
 * make no sense (non-positive flux or second moment, centroid beyond ±1000 km/s).
 *
 * @param pixels  the fit pixels and windows (prepare.ts)
 */
export function kinematicMoments(pixels: FitPixels): KinematicMoments | null {
  const { lambda, lo, hi, y, sigma } = pixels
  const features: Feature[] = []
  for (const w of pixels.windows) {
    const centres = [...w.lines.map((l) => l.expectedAngstrom), ...w.absorption.map((a) => a.expectedAngstrom)]
    for (const line of w.lines) {
      let sep = Infinity
      for (const c of centres) if (c !== line.expectedAngstrom) sep = Math.min(sep, Math.abs(c / line.expectedAngstrom - 1) * C)
      const reach = Math.min(COVERAGE_KM_PER_S, 0.5 * sep)
      if (reach < MOMENT_MIN_REACH_KM_PER_S || w.end <= w.start) continue
      const dv = (C * (hi[w.start] - lo[w.start])) / line.expectedAngstrom
      const inst = (C * line.sigmaInstAngstrom) / line.expectedAngstrom
      features.push({
        start: w.start, end: w.end, centre: line.expectedAngstrom, reach, c0: w.continuum0, c1: w.continuum1, mid: w.mid, half: w.half,
        broadening2: inst * inst + (dv * dv) / 12,
      })
    }
  }
  if (features.length === 0) return null
  const f = new Float64Array(features.length)
  const e2 = new Float64Array(features.length)
  const fu = new Float64Array(features.length)
  const fu2 = new Float64Array(features.length)
  /** per line: flux, its variance, first and second moment about v, out to its reach(v, line) */
  const measure = (v: number, reachOf: (ft: Feature) => number): void => {
    features.forEach((ft, i) => {
      const r = reachOf(ft)
      const a = ft.centre * (1 + (v - r) / C)
      const b = ft.centre * (1 + (v + r) / C)
      let s = 0, s2 = 0, s1 = 0, sq = 0
      for (let j = lowerBound(lambda, a, ft.start, ft.end); j < ft.end && lambda[j] <= b; j++) {
        const d = hi[j] - lo[j]
        const res = (y[j] - (ft.c0 + (ft.c1 * (lambda[j] - ft.mid)) / ft.half)) * d
        const u = C * (lambda[j] / ft.centre - 1) - v
        s += res
        s1 += res * u
        sq += res * u * u
        s2 += sigma[j] * sigma[j] * d * d
      }
      f[i] = s
      e2[i] = s2
      fu[i] = s1
      fu2[i] = sq
    })
  }
  measure(0, (ft) => ft.reach)
  const use = features.map((_, i) => f[i] > 0 && f[i] * f[i] >= MOMENT_MIN_SNR * MOMENT_MIN_SNR * e2[i])
  if (!use.some(Boolean)) return null
  const stack = (): { flux: number; shift: number; m2: number } => {
    let flux = 0, m1 = 0, m2 = 0
    features.forEach((_, i) => {
      if (!use[i]) return
      flux += f[i]
      m1 += fu[i]
      m2 += fu2[i]
    })
    return { flux, shift: m1 / flux, m2: m2 / flux - (m1 / flux) ** 2 }
  }
  let st = stack()
  if (!(st.flux > 0)) return null
  let v = st.shift
  let s = Math.sqrt(Math.max(st.m2, 0)) || MOMENT_MIN_REACH_KM_PER_S
  for (let pass = 0; pass < 3; pass++) {
    const reachOf = (ft: Feature): number => Math.min(ft.reach, Math.max(MOMENT_MIN_REACH_KM_PER_S, REACH_SIGMAS * s))
    measure(v, reachOf)
    st = stack()
    if (!(st.flux > 0) || !(st.m2 > 0)) return null
    v += st.shift
    // σ² k̄(σ) = m2, k̄ the flux-weighted share kept inside each line's reach
    let sigma2 = st.m2
    for (let it = 0; it < 20; it++) {
      const sg = Math.sqrt(sigma2)
      let kept = 0
      let flux = 0
      features.forEach((ft, i) => {
        if (!use[i]) return
        kept += f[i] * truncatedVarianceFraction(reachOf(ft) / sg)
        flux += f[i]
      })
      const next = st.m2 / Math.max(kept / flux, 0.05)
      if (Math.abs(next - sigma2) <= 1e-6 * sigma2) {
        sigma2 = next
        break
      }
      sigma2 = next
    }
    s = Math.sqrt(sigma2)
  }
  if (!(Math.abs(v) <= COVERAGE_KM_PER_S) || !Number.isFinite(s)) return null
  let flux = 0
  let broadening2 = 0
  features.forEach((ft, i) => {
    if (!use[i] || !(f[i] > 0)) return
    flux += f[i]
    broadening2 += f[i] * ft.broadening2
  })
  const intrinsic2 = s * s - broadening2 / flux
  return { velocity: v, sigmaObserved: s, sigmaIntrinsic: intrinsic2 > 0 ? Math.sqrt(intrinsic2) : 0 }
}
