import { hashString, createRng, splitmix32 } from '../stats/rng.ts'
import { percentilesBySelection } from '../stats/percentiles.ts'
import { LINE_COUNT } from '../vocabulary/lines.ts'
import { LINE_DETECTED, LINE_UPPER_LIMIT, upperLimitFromError } from '../stats/limits.ts'
import { createKernelInput, createKernelOutput, runKernel, type KernelInput, type KernelOutput, type PreparedSettings } from './kernel.ts'
import { FLOAT_COLUMN_COUNT, FLOAT_COLUMN_IS_VALUE, INT, INT_COLUMN_COUNT } from './kernel-layout.ts'

/** Monte Carlo summary of one galaxy: percentiles of every float column and class counts. */
export interface MonteCarloSummary {
  draws: number
  /** p16, p50, p84 of float column c at 3c, 3c+1, 3c+2 (NaN when no draw was finite) */
  percentiles: Float64Array
  /** fraction of draws in each class code (index = CLASS_* code), per diagram */
  classFractions: Record<ClassColumn, Float64Array>
}

/** The class columns of the kernel whose Monte Carlo fractions are reported. */
const CLASS_COLUMNS = { nii: INT.classNii, sii: INT.classSii, oi: INT.classOi, whan: INT.classWhan, overall: INT.classOverall } as const
type ClassColumn = keyof typeof CLASS_COLUMNS

/**
 * Seed of one galaxy's draws: the settings seed mixed with a hash of the galaxy id, so a galaxy gets
 * the same draws alone or in any batch, in Node and in the browser.
 *
 * @param seed      settings.monteCarlo.seed (integer)
 * @param galaxyId  the pipeline's galaxy id
 * @returns a 32-bit seed
 * @example galaxySeed(1, 'LNS-0000001') === galaxySeed(1, 'LNS-0000001') // true
 */
export function galaxySeed(seed: number, galaxyId: string): number {
  return splitmix32((seed | 0) ^ hashString(galaxyId))
}

let inputBuffer: KernelInput | null = null
let outputBuffer: KernelOutput | null = null
let columnBuffer = new Float64Array(0)
const triple = new Float64Array(3)

/**
 * Monte Carlo of one galaxy (shared/science/README.md §9): every flux detected in the nominal run is drawn from
 * N(F, σ) independently (xoshiro128** + Box–Muller, seeded per galaxy), limits stay limits, and the
 * whole deterministic chain runs once per draw through the columnar kernel (E(B−V) clipped at 0 per
 * draw; a draw ≤ 0 leaves its ratios undefined and its diagrams unclassified).
 *
 * @param nominalInput  the columnar input holding the galaxy
 * @param row           its row
 * @param nominal       kernel output of the nominal (thresholded) run
 * @param prep          prepared settings
 * @param seed          per-galaxy seed (`galaxySeed`)
 * @param draws         N ≥ 1
 * @returns percentiles and class fractions
 */
export function monteCarloGalaxy(
  nominalInput: KernelInput, row: number, nominal: KernelOutput, prep: PreparedSettings, seed: number, draws: number,
): MonteCarloSummary {
  if (!inputBuffer || inputBuffer.n !== draws) {
    inputBuffer = createKernelInput(draws)
    outputBuffer = createKernelOutput(draws)
    columnBuffer = new Float64Array(draws)
  }
  const input = inputBuffer
  const out = outputBuffer as KernelOutput
  const rng = createRng(seed)
  const minSnr = prep.settings.minSnr
  const io = row * INT_COLUMN_COUNT
  for (let l = 0; l < LINE_COUNT; l++) {
    const state = nominal.int[io + INT.state[l]]
    const kind = input.kind[l]
    const value = input.value[l]
    const error = input.error[l]
    if (state === LINE_DETECTED) {
      const f = nominalInput.value[l][row]
      const e = nominalInput.error[l][row]
      kind.fill(1)
      error.fill(e)
      for (let j = 0; j < draws; j++) value[j] = f + e * rng.nextNormal()
    } else if (state === LINE_UPPER_LIMIT) {
      const u = nominalInput.kind[l][row] === 2 ? nominalInput.value[l][row] : upperLimitFromError(nominalInput.error[l][row], minSnr)
      kind.fill(2)
      value.fill(u)
    } else kind.fill(0)
  }
  input.redshift.fill(nominalInput.redshift[row])
  input.fluxUnit.fill(nominalInput.fluxUnit[row])
  input.ewHalpha.fill(nominalInput.ewHalpha[row])
  input.ewNii.fill(nominalInput.ewNii[row])
  input.fwhmBroad.fill(nominalInput.fwhmBroad[row])
  runKernel(input, out, prep, { thresholdSnr: false, errors: false })

  const percentiles = new Float64Array(3 * FLOAT_COLUMN_COUNT).fill(NaN)
  for (let c = 0; c < FLOAT_COLUMN_COUNT; c++) {
    if (!FLOAT_COLUMN_IS_VALUE[c]) continue
    let m = 0
    for (let j = 0; j < draws; j++) {
      const v = out.float[j * FLOAT_COLUMN_COUNT + c]
      if (v === v) columnBuffer[m++] = v
    }
    if (m === 0) continue
    percentilesBySelection(columnBuffer, m, triple)
    percentiles[3 * c] = triple[0]
    percentiles[3 * c + 1] = triple[1]
    percentiles[3 * c + 2] = triple[2]
  }
  const classFractions = {} as Record<ClassColumn, Float64Array>
  for (const [name, ci] of Object.entries(CLASS_COLUMNS) as [ClassColumn, number][]) {
    const counts = new Float64Array(11)
    for (let j = 0; j < draws; j++) counts[out.int[j * INT_COLUMN_COUNT + ci]]++
    for (let c = 0; c < counts.length; c++) counts[c] /= draws
    classFractions[name] = counts
  }
  return { draws, percentiles, classFractions }
}
