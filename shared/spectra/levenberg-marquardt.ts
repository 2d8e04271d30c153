/**
 * Weighted Levenberg–Marquardt least squares with box bounds and the covariance matrix.
 *
 * Method: Marquardt 1963, J. Soc. Ind. Appl. Math. 11, 431, in the form of Press et al. 2007,
 * Numerical Recipes 3rd ed., §15.5 (section number from memory; shared/science/README.md §13.7):
 * χ² = Σ wᵢ (yᵢ − mᵢ(p))², α = JᵀWJ, β = JᵀW(y − m); each step solves (α + λ diag α) δ = β and
 * λ falls ×10 after a step that lowers χ² and rises ×10 after one that does not. The covariance is
 * α⁻¹ at the minimum, the pixel errors taken as true (no rescaling by χ²/dof).
 * Bounds: a parameter on a bound whose gradient points outward is held for that step, the rest of the
 * step is clipped into the box (projected steps, common practice).
 *
 * Why not the npm package `ml-levenberg-marquardt`: it has weights and bounds but returns no
 * covariance, takes the model one abscissa at a time (no per-window, pixel-integrated model with a
 * sparse Jacobian), and stops on an absolute χ² threshold meaningless for χ² ≈ number of pixels.
 * The Cholesky solves are plain loops on Float64Arrays (ml-matrix objects cost more than the arithmetic at
 * these sizes); the SVD pseudo-inverse for a matrix that is not positive definite is `ml-matrix`.
 */
import { Matrix, pseudoInverse } from 'ml-matrix'

/** A weighted least-squares problem with k parameters and n data. */
export interface LeastSquaresProblem {
  /** data (n) */
  y: Float64Array
  /** weights 1/σ² (n) */
  weight: Float64Array
  /** bounds (k); ±Infinity for none */
  lower: Float64Array
  upper: Float64Array
  /** rows [columnStart[j], columnEnd[j]) are the only ones where ∂m/∂p_j may be non-zero */
  columnStart: Int32Array
  columnEnd: Int32Array
  /** m(p) into out (n) */
  model(p: Float64Array, out: Float64Array): void
  /** ∂m/∂p_j into columns[j] (rows of its range), given m(p) just computed by `model` */
  jacobian(p: Float64Array, model: Float64Array, columns: Float64Array[]): void
}

export interface LeastSquaresOptions {
  maxIterations?: number
  /** stop when an accepted step lowers χ² by less than this fraction of χ² (default 1e-10) */
  relativeTolerance?: number
}

export interface LeastSquaresResult {
  p: Float64Array
  chi2: number
  /** k×k row-major covariance; a parameter the data do not constrain has zero variance and covariances */
  covariance: Float64Array
  iterations: number
  /** false when the iteration cap was reached */
  converged: boolean
}

/** χ² of a model against the data. */
export function chiSquare(y: Float64Array, weight: Float64Array, m: Float64Array): number {
  let s = 0
  for (let i = 0; i < y.length; i++) {
    const r = y[i] - m[i]
    s += weight[i] * r * r
  }
  return s
}

/** Fills α = JᵀWJ (k×k, row-major) and β = JᵀW(y − m), each pair summed over the rows both columns may touch. */
function normalEquations(problem: LeastSquaresProblem, columns: Float64Array[], m: Float64Array, alpha: Float64Array, beta: Float64Array): void {
  const { y, weight, columnStart, columnEnd } = problem
  const k = columns.length
  // each column's non-zero rows inside its range (a line's column is zero beyond its profile): zeros add nothing
  const first = new Int32Array(k)
  const last = new Int32Array(k)
  for (let a = 0; a < k; a++) {
    const ca = columns[a]
    let s = columnStart[a]
    let e = columnEnd[a]
    while (s < e && ca[s] === 0) s++
    while (e > s && ca[e - 1] === 0) e--
    first[a] = s
    last[a] = e
  }
  for (let a = 0; a < k; a++) {
    const ca = columns[a]
    const sa = first[a]
    const ea = last[a]
    let b0 = 0
    for (let i = sa; i < ea; i++) b0 += weight[i] * ca[i] * (y[i] - m[i])
    beta[a] = b0
    for (let b = a; b < k; b++) {
      const s = Math.max(sa, first[b])
      const e = Math.min(ea, last[b])
      let sum = 0
      if (s < e) {
        const cb = columns[b]
        for (let i = s; i < e; i++) sum += weight[i] * ca[i] * cb[i]
      }
      alpha[a * k + b] = sum
      alpha[b * k + a] = sum
    }
  }
}

/**
 * Cholesky factor L (lower, row-major m×m, in l) of the symmetric positive definite m×m row-major a;
 * false when a is not positive definite (a pivot ≤ 0). Plain arrays: the fit calls this for every step.
 */
export function choleskyFactor(a: ArrayLike<number>, m: number, l: Float64Array): boolean {
  for (let j = 0; j < m; j++) {
    let d = 0
    for (let k = 0; k < j; k++) {
      let s = 0
      for (let i = 0; i < k; i++) s += l[k * m + i] * l[j * m + i]
      const v = (a[j * m + k] - s) / l[k * m + k]
      l[j * m + k] = v
      d += v * v
    }
    d = a[j * m + j] - d
    if (!(d > 0)) return false
    l[j * m + j] = Math.sqrt(d)
    for (let k = j + 1; k < m; k++) l[j * m + k] = 0
  }
  return true
}

/** Solve L Lᵀ x = b for the factor of `choleskyFactor` (x may be b). */
export function choleskySolve(l: Float64Array, m: number, b: ArrayLike<number>, x: Float64Array): void {
  for (let i = 0; i < m; i++) {
    let s = b[i]
    for (let k = 0; k < i; k++) s -= l[i * m + k] * x[k]
    x[i] = s / l[i * m + i]
  }
  for (let i = m - 1; i >= 0; i--) {
    let s = x[i]
    for (let k = i + 1; k < m; k++) s -= l[k * m + i] * x[k]
    x[i] = s / l[i * m + i]
  }
}

/** Scratch of the dense solves, grown on demand (one fit at a time per thread). */
let scratchA = new Float64Array(0)
let scratchL = new Float64Array(0)
let scratchX = new Float64Array(0)
function scratchFor(m: number): void {
  if (scratchA.length >= m * m) return
  scratchA = new Float64Array(m * m)
  scratchL = new Float64Array(m * m)
  scratchX = new Float64Array(m)
}

/** The SVD pseudo-inverse of the m×m row-major a (ml-matrix), for a matrix that is not positive definite. */
function pseudoInverseOf(a: Float64Array, m: number, threshold?: number): Matrix {
  const mat = new Matrix(m, m)
  for (let r = 0; r < m; r++) for (let c = 0; c < m; c++) mat.set(r, c, a[r * m + c])
  return threshold === undefined ? pseudoInverse(mat) : pseudoInverse(mat, threshold)
}

/**
 * Solve (D α D + λ I) x = D β on the free parameters (D = diag α^(−1/2)), return δ = D x; held or
 * unconstrained parameters get δ = 0. Cholesky first, the SVD pseudo-inverse if α is not positive definite.
 */
export function dampedStep(alpha: Float64Array, beta: Float64Array, free: Uint8Array, lambda: number, delta: Float64Array): void {
  const k = beta.length
  const idx: number[] = []
  for (let j = 0; j < k; j++) {
    delta[j] = 0
    if (free[j] && alpha[j * k + j] > 0) idx.push(j)
  }
  const m = idx.length
  if (m === 0) return
  scratchFor(m)
  const d = idx.map((j) => 1 / Math.sqrt(alpha[j * k + j]))
  const a = scratchA
  const x = scratchX
  for (let r = 0; r < m; r++) {
    for (let c = r + 1; c < m; c++) {
      const v = alpha[idx[r] * k + idx[c]] * d[r] * d[c]
      a[r * m + c] = v
      a[c * m + r] = v
    }
    a[r * m + r] = 1 + lambda
    x[r] = beta[idx[r]] * d[r]
  }
  if (choleskyFactor(a, m, scratchL)) choleskySolve(scratchL, m, x, x)
  else {
    const sol = pseudoInverseOf(a, m).mmul(Matrix.columnVector(Array.from(x.subarray(0, m))))
    for (let r = 0; r < m; r++) x[r] = sol.get(r, 0)
  }
  for (let r = 0; r < m; r++) delta[idx[r]] = x[r] * d[r]
}

/**
 * Covariance α⁻¹ from the scaled matrix D α D (Cholesky, else the SVD pseudo-inverse); parameters
 * with α_jj = 0 (no influence on the model) get zero rows and columns.
 */
export function covarianceFromAlpha(alpha: Float64Array, k: number): Float64Array {
  const cov = new Float64Array(k * k)
  const idx: number[] = []
  for (let j = 0; j < k; j++) if (alpha[j * k + j] > 0) idx.push(j)
  const m = idx.length
  if (m === 0) return cov
  scratchFor(m)
  const d = idx.map((j) => 1 / Math.sqrt(alpha[j * k + j]))
  const a = scratchA
  for (let r = 0; r < m; r++) {
    a[r * m + r] = 1
    for (let c = r + 1; c < m; c++) {
      const v = alpha[idx[r] * k + idx[c]] * d[r] * d[c]
      a[r * m + c] = v
      a[c * m + r] = v
    }
  }
  if (choleskyFactor(a, m, scratchL)) {
    // column c of the inverse: solve L Lᵀ x = e_c
    const x = scratchX
    for (let c = 0; c < m; c++) {
      x.fill(0, 0, m)
      x[c] = 1
      choleskySolve(scratchL, m, x, x)
      for (let r = 0; r < m; r++) cov[idx[r] * k + idx[c]] = x[r] * d[r] * d[c]
    }
    return cov
  }
  const inv = pseudoInverseOf(a, m, 1e-12)
  for (let r = 0; r < m; r++) for (let c = 0; c < m; c++) cov[idx[r] * k + idx[c]] = inv.get(r, c) * d[r] * d[c]
  return cov
}

/**
 * Minimise χ² from the start p0 (clipped into the bounds).
 *
 * @param problem  data, weights, bounds, model and Jacobian
 * @param p0       starting parameters (k)
 * @param options  iteration cap (default 200), relative χ² tolerance (default 1e-10)
 * @returns best parameters, χ², covariance α⁻¹, iterations, convergence
 */
export function levenbergMarquardt(problem: LeastSquaresProblem, p0: Float64Array, options: LeastSquaresOptions = {}): LeastSquaresResult {
  const maxIterations = options.maxIterations ?? 200
  const tol = options.relativeTolerance ?? 1e-10
  const k = p0.length
  const n = problem.y.length
  const { lower, upper } = problem
  const p = new Float64Array(k)
  for (let j = 0; j < k; j++) p[j] = Math.min(upper[j], Math.max(lower[j], p0[j]))
  const columns = Array.from({ length: k }, () => new Float64Array(n))
  const alpha = new Float64Array(k * k)
  const beta = new Float64Array(k)
  const delta = new Float64Array(k)
  const free = new Uint8Array(k)
  const trial = new Float64Array(k)
  let m = new Float64Array(n)
  let mTrial = new Float64Array(n)
  problem.model(p, m)
  let chi2 = chiSquare(problem.y, problem.weight, m)
  let lambda = 1e-3
  let iterations = 0
  let converged = false
  while (iterations < maxIterations) {
    iterations++
    problem.jacobian(p, m, columns)
    normalEquations(problem, columns, m, alpha, beta)
    for (let j = 0; j < k; j++) free[j] = (p[j] <= lower[j] && beta[j] < 0) || (p[j] >= upper[j] && beta[j] > 0) ? 0 : 1
    let accepted = false
    let gain = 0
    while (lambda < 1e12) {
      dampedStep(alpha, beta, free, lambda, delta)
      let moved = false
      for (let j = 0; j < k; j++) {
        trial[j] = Math.min(upper[j], Math.max(lower[j], p[j] + delta[j]))
        if (trial[j] !== p[j]) moved = true
      }
      if (!moved) break
      problem.model(trial, mTrial)
      const chi2Trial = chiSquare(problem.y, problem.weight, mTrial)
      if (chi2Trial <= chi2) {
        gain = chi2 - chi2Trial
        chi2 = chi2Trial
        p.set(trial)
        const t = m
        m = mTrial
        mTrial = t
        lambda = Math.max(lambda / 10, 1e-12)
        accepted = true
        break
      }
      lambda *= 10
    }
    if (!accepted || gain <= tol * Math.max(chi2, 1)) {
      converged = true
      break
    }
  }
  problem.jacobian(p, m, columns)
  normalEquations(problem, columns, m, alpha, beta)
  return { p, chi2, covariance: covarianceFromAlpha(alpha, k), iterations, converged }
}
