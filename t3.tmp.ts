import { syntheticGalaxies } from './tests/bench/synthetic.ts'
import { createKernelOutput, prepareSettings, runKernel, IC, INT_COLUMN_COUNT } from './shared/diagnostics/kernel.ts'
import { DEFAULT_SETTINGS } from './shared/diagnostics/settings.ts'
const N = 200000
let t = performance.now()
const input = syntheticGalaxies(N, 1)
console.log('gen', performance.now() - t)
const prep = prepareSettings(DEFAULT_SETTINGS)
const CH = 50000
const out = createKernelOutput(CH)
for (let rep = 0; rep < 3; rep++) {
  t = performance.now()
  for (let s = 0; s < N; s += CH) runKernel(input, out, prep, { thresholdSnr: true, errors: true }, s, Math.min(N, s + CH))
  const dt = (performance.now() - t) / 1000
  console.log('galaxies/s', (N / dt).toFixed(0))
}
const counts = new Array(11).fill(0)
for (let i = 0; i < CH; i++) counts[out.int[i * INT_COLUMN_COUNT + IC['class.overall']]]++
console.log(counts)
