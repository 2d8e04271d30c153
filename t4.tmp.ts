import { syntheticGalaxies } from './tests/bench/synthetic.ts'
import { createKernelOutput, prepareSettings, runKernel } from './shared/diagnostics/kernel.ts'
import { DEFAULT_SETTINGS } from './shared/diagnostics/settings.ts'
const N = 100000
const input = syntheticGalaxies(N, 1)
const prep = prepareSettings(DEFAULT_SETTINGS)
const out = createKernelOutput(N)
for (let rep = 0; rep < 10; rep++) runKernel(input, out, prep, { thresholdSnr: true, errors: true })
