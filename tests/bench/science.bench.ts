/**
 * Science benchmark (`npm run bench`): one run on 1,000,000 synthetic galaxies with the full line set.
 *   1. the whole deterministic chain through the columnar kernel on one thread (galaxies/s);
 *   2. Monte Carlo draws/s (the same kernel on N perturbed copies of a galaxy, plus percentiles);
 *   3. the same chain as vectorised numpy (tests/bench/science_numpy.py), run as a child process on the
 *      same galaxies, timed in the same run; prints the ratio and cross-checks the class counts;
 *   4. for reference, the object API (`diagnoseMany`) on 10,000 galaxies.
 * Synthetic data: tests/bench/synthetic.ts (invented numbers).
 */
import { execFileSync, spawnSync } from 'node:child_process'
import { closeSync, mkdtempSync, openSync, rmSync, writeSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { createKernelOutput, prepareSettings, runKernel, type KernelInput } from '../../shared/diagnostics/kernel.ts'
import { FLOAT, FLOAT_COLUMN_COUNT, INT, INT_COLUMN_COUNT } from '../../shared/diagnostics/kernel-layout.ts'
import { galaxySeed, monteCarloGalaxy } from '../../shared/diagnostics/monte-carlo.ts'
import { diagnoseMany } from '../../shared/diagnostics/pipeline.ts'
import { DEFAULT_SETTINGS } from '../../shared/diagnostics/settings.ts'
import { METALLICITY_KEYS } from '../../shared/vocabulary/calibrations.ts'
import { LINE_COUNT, LINE_IDS, type LineId } from '../../shared/vocabulary/lines.ts'
import type { GalaxyInput } from '../../shared/diagnostics/types.ts'
import { syntheticGalaxies } from './synthetic.ts'

const HERE = dirname(fileURLToPath(import.meta.url))
const N = Number(process.env.BENCH_GALAXIES ?? 1_000_000)
const CHUNK = 4096 // rows per kernel call: the output block (≈ 3 MB) stays in cache
const settings = DEFAULT_SETTINGS
const objectSettings = { ...DEFAULT_SETTINGS, allowNegative: true } // synthetic noise makes some weak lines negative
const prep = prepareSettings(settings)
const N2_PP04 = METALLICITY_KEYS.indexOf('n2Pp04')
const fmt = (x: number) => Math.round(x).toLocaleString('en-US')

console.log(`science bench: ${fmt(N)} synthetic galaxies, all 16 lines, node ${process.version}`)
let t = performance.now()
const input = syntheticGalaxies(N, 20261201)
console.log(`  synthetic data generated in ${((performance.now() - t) / 1000).toFixed(1)} s (not timed below)`)

// 1. deterministic chain
const out = createKernelOutput(CHUNK)
const options = { thresholdSnr: true, errors: true }
for (let w = 0; w < 5; w++) for (let s = 0; s < Math.min(N, 20_000); s += CHUNK) runKernel(input, out, prep, options, s, Math.min(N, s + CHUNK)) // JIT warm-up
const classColumns = { nii: INT.classNii, sii: INT.classSii, oi: INT.classOi, whan: INT.classWhan, overall: INT.classOverall }
const classCounts: Record<string, number[]> = {}
for (const k of Object.keys(classColumns)) classCounts[k] = new Array(11).fill(0)
let ebvSum = 0, teSum = 0, teN = 0, zSum = 0, zN = 0
let kernelSeconds = 0
for (let s = 0; s < N; s += CHUNK) {
  const e = Math.min(N, s + CHUNK)
  t = performance.now()
  runKernel(input, out, prep, options, s, e)
  kernelSeconds += (performance.now() - t) / 1000
  for (let i = 0; i < e - s; i++) {
    for (const [k, c] of Object.entries(classColumns)) classCounts[k][out.int[i * INT_COLUMN_COUNT + c]]++
    const fo = i * FLOAT_COLUMN_COUNT
    const ebv = out.float[fo + FLOAT.ebv]
    if (ebv === ebv) ebvSum += ebv
    const te = out.float[fo + FLOAT.teOiii]
    if (te === te) { teSum += te; teN++ }
    const z = out.float[fo + FLOAT.z[N2_PP04]]
    if (z === z) { zSum += z; zN++ }
  }
}
const galaxiesPerSecond = N / kernelSeconds
console.log(`  deterministic chain (columnar kernel, 1 thread): ${fmt(galaxiesPerSecond)} galaxies/s (${kernelSeconds.toFixed(2)} s)`)

// 2. Monte Carlo
const MC_GALAXIES = 200
const DRAWS = 2000
const nominal = createKernelOutput(MC_GALAXIES)
runKernel(input, nominal, prep, options, 0, MC_GALAXIES)
const rowInput: KernelInput = { ...input } // rows 0 … MC_GALAXIES of the same columns
monteCarloGalaxy(rowInput, 0, nominal, prep, 1, DRAWS) // warm-up
t = performance.now()
for (let g = 0; g < MC_GALAXIES; g++) monteCarloGalaxy(rowInput, g, nominal, prep, galaxySeed(1, `g${g}`), DRAWS)
const mcSeconds = (performance.now() - t) / 1000
const drawsPerSecond = (MC_GALAXIES * DRAWS) / mcSeconds
console.log(`  Monte Carlo: ${fmt(drawsPerSecond)} draws/s (${MC_GALAXIES} galaxies × ${DRAWS} draws, percentiles included)`)

// 4. object API on 10,000 galaxies (what the server calls)
const OBJ = Math.min(10_000, N)
const galaxies: GalaxyInput[] = []
for (let i = 0; i < OBJ; i++) {
  const lines: GalaxyInput['lines'] = {}
  for (let l = 0; l < LINE_COUNT; l++) lines[LINE_IDS[l] as LineId] = { flux: input.value[l][i], error: input.error[l][i] }
  galaxies.push({ id: `LNS-${String(i).padStart(7, '0')}`, redshift: input.redshift[i], fluxUnit: 1e-17, lines,
    ew: { halpha: input.ewHalpha[i], nii_6584: input.ewNii[i] }, fwhm: { halpha_broad: input.fwhmBroad[i] } })
}
diagnoseMany(galaxies.slice(0, 1000), objectSettings)
t = performance.now()
diagnoseMany(galaxies, objectSettings)
const objectPerSecond = OBJ / ((performance.now() - t) / 1000)
console.log(`  object API diagnoseMany: ${fmt(objectPerSecond)} galaxies/s (${fmt(OBJ)} galaxies, results as objects)`)

// 3. numpy on the same galaxies
function pythonWithNumpy(): string | null {
  for (const py of ['/usr/bin/python3', 'python3']) {
    const r = spawnSync(py, ['-c', 'import numpy'], { stdio: 'ignore' })
    if (r.status === 0) return py
  }
  return null
}
const py = pythonWithNumpy()
if (!py) {
  console.log('  numpy: no python3 with numpy found; skipped')
} else {
  const dir = mkdtempSync(join(tmpdir(), 'ratiograph-bench-'))
  try {
    const file = join(dir, 'galaxies.f64')
    const fd = openSync(file, 'w')
    const write = (a: Float64Array) => writeSync(fd, new Uint8Array(a.buffer, a.byteOffset, a.byteLength))
    for (let l = 0; l < LINE_COUNT; l++) write(input.value[l])
    for (let l = 0; l < LINE_COUNT; l++) write(input.error[l])
    for (let l = 0; l < LINE_COUNT; l++) write(Float64Array.from(input.kind[l]))
    for (const a of [input.redshift, input.fluxUnit, input.ewHalpha, input.ewNii, input.fwhmBroad]) write(a)
    closeSync(fd)
    const raw = execFileSync(py, [join(HERE, 'science_numpy.py'), file, String(N)], { encoding: 'utf8', maxBuffer: 1 << 20 })
    const res = JSON.parse(raw.trim().split('\n').pop() as string) as {
      numpy: string; python: string; seconds: number; summary: Record<string, number[] | number>
    }
    const numpyPerSecond = N / res.seconds
    console.log(`  numpy ${res.numpy} (python ${res.python}, ${py}): ${fmt(numpyPerSecond)} galaxies/s (${res.seconds.toFixed(2)} s)`)
    console.log(`  ratio TypeScript / numpy: ${(galaxiesPerSecond / numpyPerSecond).toFixed(2)}×`)
    // cross-check that both ran the same chain
    let worst = 0
    for (const k of Object.keys(classCounts)) {
      const theirs = res.summary[k] as number[]
      for (let c = 0; c < 11; c++) worst = Math.max(worst, Math.abs(theirs[c] - classCounts[k][c]))
    }
    const meanTe = teSum / teN
    const theirTe = (res.summary.te_o3 as number) / (res.summary.n_te_o3 as number)
    console.log(`  cross-check: largest class-count difference ${worst} of ${fmt(N)}; mean E(B−V) ${(ebvSum / N).toFixed(6)} vs ${((res.summary.ebv as number) / N).toFixed(6)}; ` +
      `mean T_e[O III] ${meanTe.toFixed(2)} vs ${theirTe.toFixed(2)} K; n2Pp04 count ${zN} vs ${res.summary.n_n2Pp04}`)
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}
console.log(`  targets: ≥ 1,000,000 galaxies/s on one thread — ${galaxiesPerSecond >= 1e6 ? 'met' : 'NOT met'}`)
