import type { FieldError } from '../http/problem.ts'

/**
 * Compute units of one galaxy's deterministic chain, in Monte Carlo draws: the object chain costs
 * ≈ 40 µs a galaxy and one draw ≈ 6 µs on one core (tests/bench/science.bench.ts measures both).
 */
export const GALAXY_COST = 10

/** Cost of a request in compute units: galaxies × (draws + GALAXY_COST); one unit ≈ one Monte Carlo draw of one galaxy. */
export const computeCost = (galaxies: number, draws: number) => galaxies * (Math.max(0, draws) + GALAXY_COST)

/**
 * Default budgets (COMPUTE_BUDGET, COMPUTE_ANON_BUDGET). With credentials 400 galaxies × 5,000 draws
 * fit (≈ 15 s of one core here); without, about 1 s of one core: 10,000 galaxies without Monte
 * Carlo, 1 galaxy with 5,000 draws, or 100 galaxies with 1,990.
 */
export const DEFAULT_COMPUTE_BUDGET = 2_500_000
export const DEFAULT_ANON_COMPUTE_BUDGET = 200_000

export interface Budgets {
  /** units allowed per request with a session or an API key */
  authenticated: number
  /** units allowed per request without credentials */
  anonymous: number
}

/**
 * The field at fault when `galaxies` galaxies with `draws` Monte Carlo draws each exceed `budget`,
 * or null when they fit. The message says the limit and, for anonymous callers, how to raise it.
 */
export function overBudget(galaxies: number, draws: number, budget: number, opts: { anonymous: boolean; authenticatedBudget: number; path: string }): FieldError | null {
  if (computeCost(galaxies, draws) <= budget) return null
  const maxDraws = Math.max(0, Math.floor(budget / galaxies) - GALAXY_COST)
  const maxGalaxies = Math.floor(budget / (Math.max(0, draws) + GALAXY_COST))
  let message = `galaxies × (draws + ${GALAXY_COST}) may be at most ${budget.toLocaleString('en-US')} per request${opts.anonymous ? ' without credentials' : ''}; `
    + (draws > 0 ? `that allows at most ${maxDraws} draws for ${galaxies} galaxies, or ${maxGalaxies} galaxies with ${draws} draws` : `that allows at most ${maxGalaxies} galaxies`)
  if (opts.anonymous && opts.authenticatedBudget > budget) message += `; signing in or sending an API key raises the limit to ${opts.authenticatedBudget.toLocaleString('en-US')}`
  return { path: opts.path, message }
}

/**
 * Compute units of one spectrum fit with the default options (≈ 60 ms of one core for a 4,000-pixel
 * spectrum with broad Hα `auto` and Na I D; shared/science/README.md §13.11 has the timings);
 * `components: "auto"` fits every model twice and more (≈ 2.5×), and each Monte Carlo refit costs a fit.
 */
export const SPECTRUM_FIT_COST = 10_000

/** Cost of a spectra-fit request: its fits, then the diagnostics of their measurements. */
export function spectraFitCost(spectra: number, fit: { components: 1 | 2 | 'auto'; monteCarlo: { draws: number } }, diagnosticsDraws: number): number {
  const perFit = SPECTRUM_FIT_COST * (fit.components === 'auto' ? 2.5 : 1) * (Math.max(0, fit.monteCarlo.draws) + 1)
  return spectra * perFit + computeCost(spectra, diagnosticsDraws)
}

/** The field at fault when a spectra-fit request exceeds `budget`, or null when it fits. */
export function spectraOverBudget(
  spectra: number, fit: { components: 1 | 2 | 'auto'; monteCarlo: { draws: number } }, diagnosticsDraws: number, budget: number,
  opts: { anonymous: boolean; authenticatedBudget: number },
): FieldError | null {
  const cost = spectraFitCost(spectra, fit, diagnosticsDraws)
  if (cost <= budget) return null
  const maxSpectra = Math.floor(budget / spectraFitCost(1, fit, diagnosticsDraws))
  const path = fit.monteCarlo.draws > 0 ? '/fit/monteCarlo/draws' : diagnosticsDraws > 0 ? '/settings/monteCarlo/draws' : '/spectra'
  let message = `${spectra} spectra cost ${Math.ceil(cost).toLocaleString('en-US')} compute units (${SPECTRUM_FIT_COST.toLocaleString('en-US')} a fit, ×2.5 with components "auto", × (fit Monte Carlo draws + 1)); `
    + `at most ${budget.toLocaleString('en-US')} per request${opts.anonymous ? ' without credentials' : ''}, which allows ${maxSpectra} spectra with these options`
  if (opts.anonymous && opts.authenticatedBudget > budget) message += `; signing in or sending an API key raises the limit to ${opts.authenticatedBudget.toLocaleString('en-US')}`
  return { path, message }
}
