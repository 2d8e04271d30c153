import { writeFileSync } from 'node:fs'
import { syntheticGalaxies } from './tests/bench/synthetic.ts'
import { createKernelOutput, prepareSettings, runKernel, FC, FLOAT_COLUMN_COUNT } from './shared/diagnostics/kernel.ts'
import { DEFAULT_SETTINGS } from './shared/diagnostics/settings.ts'
const N = 2000
const input = syntheticGalaxies(N, 20261201)
const out = createKernelOutput(N)
runKernel(input, out, prepareSettings(DEFAULT_SETTINGS), { thresholdSnr: true, errors: true })
const parts: Float64Array[] = [...input.value, ...input.error, ...input.kind.map((k) => Float64Array.from(k)), input.redshift, input.fluxUnit, input.ewHalpha, input.ewNii, input.fwhmBroad]
const all = new Float64Array(parts.length * N); parts.forEach((p, j) => all.set(p, j * N))
writeFileSync('/tmp/sub.f64', new Uint8Array(all.buffer))
const te = new Float64Array(N), ne = new Float64Array(N), ete = new Float64Array(N)
for (let i = 0; i < N; i++) { te[i] = out.float[i * FLOAT_COLUMN_COUNT + FC['te.oiii']]; ete[i] = out.float[i * FLOAT_COLUMN_COUNT + FC['te.oiiiError']]; ne[i] = out.float[i * FLOAT_COLUMN_COUNT + FC['density.sii.ne']] }
writeFileSync('/tmp/sub_te.json', JSON.stringify({ te: Array.from(te), ete: Array.from(ete), ne: Array.from(ne) }))
import { temperatureWithDensityIteration, temperatureFromRatio, temperatureRatio, OIII_TEMPERATURE_MODEL } from './shared/diagnostics/temperature.ts'
const i = 1150, fo = i * FLOAT_COLUMN_COUNT
const R = (out.float[fo + FC['flux:oiii_5007']] + out.float[fo + FC['flux:oiii_4959']]) / out.float[fo + FC['flux:oiii_4363']]
const rs = out.float[fo + FC['ratio:siiDoublet']]
console.log('R', R, 'rs', rs, temperatureWithDensityIteration(OIII_TEMPERATURE_MODEL, R, rs))
for (const ne of [100, 1724, 2000]) { const T = temperatureFromRatio(OIII_TEMPERATURE_MODEL, R, ne) as number; console.log(ne, T, temperatureRatio(OIII_TEMPERATURE_MODEL, T, ne)) }
