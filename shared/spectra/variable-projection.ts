/**
 * Separable weighted least squares by variable projection, with the covariance of the full model.
 *
 * Method: Golub & Pereyra 1973, SIAM J. Numer. Anal. 10, 413 (review: Golub & Pereyra 2003, Inverse
 * Problems 19, R1); shared/science/README.md §13.7. When the model is linear in some parameters c
 * (continua, line fluxes) for fixed values of the others α (kinematics, Na I D equivalent widths),
 * χ²(α, c) is minimised over c exactly for every α (the projection, with c ≥ 0 where bounded) and the
 * iteration runs on α alone. The step uses Kaufman's approximation of the projected Jacobian
 * (Kaufman 1975, BIT 15, 49): with J = [B D] (B the columns of the free linear parameters, D those of
 * α), the reduced normal matrix is the Schur complement S = DᵀWD − DᵀWB (BᵀWB)⁻¹ BᵀWD and the gradient
 * g = DᵀW(y − m) (BᵀW(y − m) = 0 at the projection). Levenberg–Marquardt on α: (S + λ diag S) δ = g,
 * λ ÷10 after a better step and ×10 after a worse one (Marquardt 1963), bounds on α held or clipped
 * as in levenberg-marquardt.ts. Stop when the undamped Gauss–Newton step would gain less than
 * 10⁻¹² χ² (its predicted gain is the decrement gᵀS⁻¹g over the free parameters), or when no step helps:
 * a damped step is tried only while the gain it predicts, 2gᵀδ − δᵀSδ, is above that tolerance.
 *
 * The errors are those of the full model, not the conditional ones given α: at the solution the full
 * α = JᵀWJ over every parameter (linear and non-linear, one Jacobian) is assembled and inverted
 * (covarianceFromAlpha), as a Levenberg–Marquardt fit of all parameters would report.
 */
import { covarianceFromAlpha, dampedStep, type LeastSquaresResult } from './levenberg-marquardt.ts'

/** A separable least-squares problem with k parameters, of which `nonlinear` are iterated and the rest projected. */
export interface SeparableProblem {
  /** bounds (k); ±Infinity for none */
  lower: Float64Array
  upper: Float64Array
  /** the free non-linear parameters (indices into p) */
  nonlinear: Int32Array
  /** solve the linear parameters of p in place for its non-linear ones; χ² at the result */
  project(p: Float64Array): number
  /**
   * at the p of the last `project` call: the reduced normal matrix s (K×K row-major, K = nonlinear.length),
   * the gradient g = DᵀW(y − m) (K), and with `alpha` the full k×k JᵀWJ
   */
  reduced(p: Float64Array, s: Float64Array, g: Float64Array, alpha?: Float64Array): void
}

export interface ProjectionOptions {
  maxIterations?: number
  /** stop when the Gauss–Newton decrement gᵀS⁻¹g is below this fraction of χ² (default 1e-12) */
  relativeTolerance?: number
  /** compute the covariance at the end (default true; the Monte Carlo refits need only p) */
  covariance?: boolean
  /** also stop when an accepted step gains less than this fraction of χ² (default 0: off; for starts, not for results) */
  stallTolerance?: number
}

/**
 * Minimise χ² of a separable problem from the non-linear values of p0 (clipped into the bounds).
 *
 * @returns best parameters, χ², covariance of the full model (zeros when not asked for), iterations, convergence
 */
export function variableProjection(problem: SeparableProblem, p0: Float64Array, options: ProjectionOptions = {}): LeastSquaresResult {
  const maxIterations = options.maxIterations ?? 200
  const tol = options.relativeTolerance ?? 1e-12
  const wantCovariance = options.covariance ?? true
  const stall = options.stallTolerance ?? 0
  const { lower, upper, nonlinear } = problem
  const k = p0.length
  const nk = nonlinear.length
  const p = new Float64Array(k)
  for (let j = 0; j < k; j++) p[j] = Math.min(upper[j], Math.max(lower[j], p0[j]))
  const trial = new Float64Array(k)
  const s = new Float64Array(nk * nk)
  const g = new Float64Array(nk)
  const delta = new Float64Array(nk)
  const free = new Uint8Array(nk)
  const alpha = wantCovariance ? new Float64Array(k * k) : undefined
  let chi2 = problem.project(p)
  let atP = true
  let lambda = 1e-3
  let iterations = 0
  let converged = false
  let alphaAtP = false
  while (iterations < maxIterations) {
    iterations++
    problem.reduced(p, s, g, alpha)
    alphaAtP = true
    if (nk === 0) {
      converged = true
      break
    }
    for (let a = 0; a < nk; a++) {
      const j = nonlinear[a]
      free[a] = (p[j] <= lower[j] && g[a] < 0) || (p[j] >= upper[j] && g[a] > 0) ? 0 : 1
    }
    // the Gauss–Newton decrement gᵀS⁻¹g (free parameters): what an undamped step would gain; below the tolerance p is the minimum
    dampedStep(s, g, free, 0, delta)
    let decrement = 0
    for (let a = 0; a < nk; a++) decrement += g[a] * delta[a]
    if (!(decrement > tol * Math.max(chi2, 1))) {
      converged = true
      break
    }
    let accepted = false
    while (lambda < 1e12) {
      dampedStep(s, g, free, lambda, delta)
      let moved = false
      trial.set(p)
      for (let a = 0; a < nk; a++) {
        const j = nonlinear[a]
        trial[j] = Math.min(upper[j], Math.max(lower[j], p[j] + delta[a]))
        delta[a] = trial[j] - p[j]
        if (trial[j] !== p[j]) moved = true
      }
      if (!moved) break
      // the gain the quadratic model predicts for this step, 2gᵀδ − δᵀSδ: once below the tolerance a
      // smaller step cannot help beyond rounding, so p is the minimum (no more damped trials)
      let predicted = 0
      for (let a = 0; a < nk; a++) {
        let sd = 0
        for (let b = 0; b < nk; b++) sd += s[a * nk + b] * delta[b]
        predicted += delta[a] * (2 * g[a] - sd)
      }
      if (!(predicted > tol * Math.max(chi2, 1))) break
      const chi2Trial = problem.project(trial)
      atP = false
      if (chi2Trial <= chi2) {
        if (chi2 - chi2Trial < stall * chi2) converged = true
        chi2 = chi2Trial
        p.set(trial)
        atP = true
        lambda = Math.max(lambda / 10, 1e-12)
        accepted = true
        break
      }
      lambda *= 10
    }
    if (!accepted || converged) {
      converged = true
      break
    }
    alphaAtP = false
  }
  if (!atP) problem.project(p)
  if (alpha && !alphaAtP) problem.reduced(p, s, g, alpha)
  return { p, chi2, covariance: alpha ? covarianceFromAlpha(alpha, k) : new Float64Array(k * k), iterations, converged }
}
