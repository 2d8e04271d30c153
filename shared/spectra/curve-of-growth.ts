/**
 * Curve of growth of an absorption line with a Gaussian (Maxwellian) velocity distribution, and the
 * doublet-ratio solution for column density N and Doppler parameter b from two lines of one ion
 * (shared/science/README.md §14).
 *
 * Sources: Spitzer 1978, Physical Processes in the Interstellar Medium, ch. 3 (the curve of growth;
 * chapter from memory); Nachman & Hobbs 1973, ApJ 182, 481 (the doublet-ratio method; from memory).
 *   τ₀ = √π e² N f λ / (m_e c b) = √π r_e c N f λ / b                       (line-centre optical depth)
 *   W_λ = (λ b / c) F(τ₀),  F(τ₀) = ∫ (1 − exp(−τ₀ e^(−u²))) du over all u     (equivalent width)
 *   F → √π τ₀ for τ₀ ≪ 1, so N = W_λ m_e c² / (π e² f λ²) = 1.1296×10²⁰ W/(f λ²) cm⁻² (W, λ in Å)
 * with r_e = 2.8179403262×10⁻¹³ cm and c = 2.99792458×10¹⁰ cm s⁻¹ (CODATA 2018; checked against
 * scipy.constants in tests/fixtures/spectra/make_profile_fixture.py).
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { adaptiveGaussLegendre } from '../stats/integration.ts'
import { brentRoot } from '../stats/root-finding.ts'

/** Classical electron radius (cm), CODATA 2018. */
export const ELECTRON_RADIUS_CM = 2.8179403262e-13
const C_CM = SPEED_OF_LIGHT_KM_PER_S * 1e5
const SQRT_PI = Math.sqrt(Math.PI)

/** m_e c²/(π e²) with λ and W in Å: N = LINEAR_COG_CONSTANT · W/(f λ²) cm⁻² (≈ 1.1296e20). */
export const LINEAR_COG_CONSTANT = 1 / (Math.PI * ELECTRON_RADIUS_CM * 1e-8)

/** τ₀ per (N f λ/b) with N in cm⁻², λ in Å, b in km/s: √π r_e c · 10⁻⁸/10⁵ (≈ 1.497e-15). */
export const TAU0_CONSTANT = SQRT_PI * ELECTRON_RADIUS_CM * C_CM * 1e-13

/**
 * Column density from an equivalent width in the linear (optically thin) limit.
 *
 * @param ewAngstrom  rest-frame W (Å)
 * @param f           oscillator strength
 * @param lambdaAngstrom  rest wavelength (Å)
 * @returns N (cm⁻²)
 * @example linearColumnDensity(0.1, 0.6408, 5891.58) // ≈ 5.078e11 (shared/science/README.md §14)
 */
export function linearColumnDensity(ewAngstrom: number, f: number, lambdaAngstrom: number): number {
  return (LINEAR_COG_CONSTANT * ewAngstrom) / (f * lambdaAngstrom * lambdaAngstrom)
}

/**
 * Line-centre optical depth of a line with a Gaussian velocity distribution.
 *
 * @param n  column density (cm⁻²)
 * @param f  oscillator strength
 * @param lambdaAngstrom  rest wavelength (Å)
 * @param bKmPerS  Doppler parameter b = √2 σ_v (km/s)
 * @example centralOpticalDepth(1e12, 0.6408, 5891.58, 10) // ≈ 0.5653
 */
export function centralOpticalDepth(n: number, f: number, lambdaAngstrom: number, bKmPerS: number): number {
  return (TAU0_CONSTANT * n * f * lambdaAngstrom) / bKmPerS
}

const integrand = (u: number, tau0: number): number => -Math.expm1(-tau0 * Math.exp(-u * u))

/**
 * F(τ₀) = ∫_{−∞}^{∞} (1 − exp(−τ₀ e^(−u²))) du: the power series √π Σ (−1)^(k+1) τ₀^k/(k!√k) for
 * τ₀ ≤ 1 (term-by-term integration), adaptive Gauss–Legendre on [0, √ln(τ₀/10⁻¹⁸)] above. Checked
 * against scipy.integrate.quad (tests/fixtures/spectra/profiles.json).
 *
 * @param tau0  line-centre optical depth ≥ 0
 * @example curveOfGrowthIntegral(1e-8) // ≈ 1.7724538e-8 (√π τ₀)
 */
export function curveOfGrowthIntegral(tau0: number): number {
  if (!(tau0 > 0)) return 0
  if (tau0 <= 1) {
    let term = 1
    let sum = 0
    for (let k = 1; k <= 40; k++) {
      term *= tau0 / k
      const add = term / Math.sqrt(k)
      sum += k % 2 === 1 ? add : -add
      if (add < 1e-17 * sum) break
    }
    return SQRT_PI * sum
  }
  const u = Math.sqrt(Math.log(tau0 / 1e-18))
  return 2 * adaptiveGaussLegendre(integrand, 0, u, 1e-12, tau0)
}

/**
 * Rest-frame equivalent width of a line of column density N and Doppler parameter b.
 *
 * @returns W (Å)
 * @example equivalentWidth(1e10, 10, 0.6408, 5891.58) // ≈ 1.965e-3 (nearly linear: τ₀ = 0.0057)
 */
export function equivalentWidth(n: number, bKmPerS: number, f: number, lambdaAngstrom: number): number {
  const tau0 = centralOpticalDepth(n, f, lambdaAngstrom, bKmPerS)
  return ((lambdaAngstrom * bKmPerS) / SPEED_OF_LIGHT_KM_PER_S) * curveOfGrowthIntegral(tau0)
}

/** A doublet of one ion from the same lower level: the stronger line (larger f λ) first. */
export interface Doublet {
  strong: { f: number; lambdaAngstrom: number }
  weak: { f: number; lambdaAngstrom: number }
}

export interface DoubletSolution {
  /** 'solved': N and b from the ratio; 'linear': ratio ≥ optically thin value, N from the linear limit (a lower bound), b unknown; 'saturated': ratio at or below the saturated limit, N unknown */
  regime: 'solved' | 'linear' | 'saturated'
  /** cm⁻² (null when saturated) */
  n: number | null
  /** km/s (null unless solved) */
  b: number | null
  /** line-centre optical depth of the strong line (null unless solved) */
  tau0: number | null
}

/** Search range of the strong line's τ₀ in the doublet solution. */
export const TAU0_RANGE = Object.freeze([1e-6, 1e8] as const)

/**
 * Optically thin doublet ratio W_strong/W_weak = f_s λ_s² / (f_w λ_w²).
 *
 * @example linearDoubletRatio({ strong: { f: 0.6408, lambdaAngstrom: 5891.58 }, weak: { f: 0.3201, lambdaAngstrom: 5897.55 } }) // ≈ 1.9978
 */
export function linearDoubletRatio(d: Doublet): number {
  return (d.strong.f * d.strong.lambdaAngstrom ** 2) / (d.weak.f * d.weak.lambdaAngstrom ** 2)
}

/** W_strong/W_weak at the strong line's τ₀ (both lines share N and b). */
export function doubletRatioAt(d: Doublet, tau0Strong: number): number {
  const kappa = (d.weak.f * d.weak.lambdaAngstrom) / (d.strong.f * d.strong.lambdaAngstrom)
  return (d.strong.lambdaAngstrom * curveOfGrowthIntegral(tau0Strong)) / (d.weak.lambdaAngstrom * curveOfGrowthIntegral(kappa * tau0Strong))
}

/**
 * N and b from the two rest-frame equivalent widths of a doublet (doublet-ratio method): the ratio
 * fixes τ₀ (it falls monotonically from the thin value towards λ_s/λ_w as τ₀ grows), then
 * b = c W_s/(λ_s F(τ₀)) and N = τ₀ b/(TAU0_CONSTANT f_s λ_s).
 *
 * @param wStrong  W of the stronger line (Å), > 0
 * @param wWeak    W of the weaker line (Å), > 0
 * @param d        the doublet
 * @example solveDoublet(0.5, 0.25, { strong: { f: 0.6408, lambdaAngstrom: 5891.58 }, weak: { f: 0.3201, lambdaAngstrom: 5897.55 } }).regime // "linear"
 */
export function solveDoublet(wStrong: number, wWeak: number, d: Doublet): DoubletSolution {
  const ratio = wStrong / wWeak
  if (ratio >= doubletRatioAt(d, TAU0_RANGE[0])) {
    const n = (LINEAR_COG_CONSTANT * (wStrong + wWeak)) / (d.strong.f * d.strong.lambdaAngstrom ** 2 + d.weak.f * d.weak.lambdaAngstrom ** 2)
    return { regime: 'linear', n, b: null, tau0: null }
  }
  if (ratio <= doubletRatioAt(d, TAU0_RANGE[1])) return { regime: 'saturated', n: null, b: null, tau0: null }
  const lnTau = brentRoot((x) => doubletRatioAt(d, Math.exp(x)) - ratio, Math.log(TAU0_RANGE[0]), Math.log(TAU0_RANGE[1]), 1e-12)
  if (lnTau === null) return { regime: 'saturated', n: null, b: null, tau0: null }
  const tau0 = Math.exp(lnTau)
  const b = (SPEED_OF_LIGHT_KM_PER_S * wStrong) / (d.strong.lambdaAngstrom * curveOfGrowthIntegral(tau0))
  const n = (tau0 * b) / (TAU0_CONSTANT * d.strong.f * d.strong.lambdaAngstrom)
  return { regime: 'solved', n, b, tau0 }
}
