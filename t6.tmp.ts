import { signedDistanceToHyperbola, KA03, KE01_NII } from './shared/diagnostics/demarcation.ts'
import { temperatureWithDensityIteration, OIII_TEMPERATURE_MODEL } from './shared/diagnostics/temperature.ts'
import { createLuminosityDistanceCache } from './shared/diagnostics/luminosity.ts'
import { createRng } from './shared/stats/rng.ts'
const M = 1_000_000
const rng = createRng(1)
const xs = new Float64Array(M), ys = new Float64Array(M), zs = new Float64Array(M), rs = new Float64Array(M)
for (let i = 0; i < M; i++) { xs[i] = -1.3 + 1.6 * rng.nextFloat(); ys[i] = -1 + 2 * rng.nextFloat(); zs[i] = 0.01 + 0.3 * rng.nextFloat(); rs[i] = 50 + 300 * rng.nextFloat() }
const d = new Float64Array(3)
function time(name: string, fn: () => number) { fn(); const t = performance.now(); const v = fn(); console.log(name, ((performance.now() - t) * 1e6 / M).toFixed(0), 'ns/call', v.toFixed(3)) }
time('distance ka03', () => { let s = 0; for (let i = 0; i < M; i++) s += signedDistanceToHyperbola(KA03, xs[i], ys[i], d); return s })
time('distance ke01', () => { let s = 0; for (let i = 0; i < M; i++) s += signedDistanceToHyperbola(KE01_NII, xs[i], ys[i], d); return s })
const sol = { temperatureK: null as number | null, neCm3: 0, densityAssumed: false }
time('te iteration', () => { let s = 0; for (let i = 0; i < M; i++) s += temperatureWithDensityIteration(OIII_TEMPERATURE_MODEL, rs[i], 1.1, sol).temperatureK ?? 0; return s })
const dl = createLuminosityDistanceCache(70, 0.3)
time('dl', () => { let s = 0; for (let i = 0; i < M; i++) s += dl(zs[i]); return s })
time('exp x16', () => { let s = 0; for (let i = 0; i < M; i++) for (let l = 0; l < 16; l++) s += Math.exp(0.92 * ys[i] * l * 0.1); return s })
time('log10 x8', () => { let s = 0; for (let i = 0; i < M; i++) for (let l = 0; l < 8; l++) s += Math.log10(rs[i] + l); return s })
time('pow x2', () => { let s = 0; for (let i = 0; i < M; i++) s += Math.pow(rs[i], 0.55) * Math.pow(zs[i], 2.06); return s })
