import { syntheticGalaxies } from './tests/bench/synthetic.ts'
import { createKernelOutput, prepareSettings, runKernel } from './shared/diagnostics/kernel.ts'
import { DEFAULT_SETTINGS } from './shared/diagnostics/settings.ts'
const N = 100000
const input = syntheticGalaxies(N, 1)
const prep = prepareSettings(DEFAULT_SETTINGS)
const out = createKernelOutput(N)
for (const errors of [true, false, true, false]) {
  const t = performance.now()
  for (let rep = 0; rep < 5; rep++) runKernel(input, out, prep, { thresholdSnr: true, errors })
  console.log(errors, (5 * N / ((performance.now() - t) / 1000)).toFixed(0))
}
const noZ = { ...input, redshift: new Float64Array(N).fill(NaN) }
let t = performance.now()
for (let rep = 0; rep < 5; rep++) runKernel(noZ, out, prep, { thresholdSnr: true, errors: true })
console.log('noZ', (5 * N / ((performance.now() - t) / 1000)).toFixed(0))
const fixedZ = { ...input, redshift: new Float64Array(N).fill(0.1) }
t = performance.now()
for (let rep = 0; rep < 5; rep++) runKernel(fixedZ, out, prep, { thresholdSnr: true, errors: true })
console.log('fixedZ', (5 * N / ((performance.now() - t) / 1000)).toFixed(0))
t = performance.now()
for (let rep = 0; rep < 5; rep++) { out.float.fill(NaN); out.int.fill(0) }
console.log('fill only', (5 * N / ((performance.now() - t) / 1000)).toFixed(0))
