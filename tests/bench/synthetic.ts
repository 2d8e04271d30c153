/**
 * Synthetic (invented) galaxies for the benchmark only: a star-forming sequence, composites, Seyferts
 * and LINER-like nuclei with random dust E(B−V) 0–1, every line of the public API, noise consistent with the
 * errors and some weak auroral lines below S/N 3. Seeded, so every run sees the same sample.
 */
import { createKernelInput, type KernelInput } from '../../shared/diagnostics/kernel.ts'
import { extinctionK } from '../../shared/extinction/index.ts'
import { LINES, LINE_INDEX, type LineId } from '../../shared/vocabulary/lines.ts'
import { createRng } from '../../shared/stats/rng.ts'
import { doubletRatioFromDensity, SANDERS16_OII, SANDERS16_SII } from '../../shared/diagnostics/density.ts'
import { NII_TEMPERATURE_MODEL, OIII_TEMPERATURE_MODEL, temperatureRatio } from '../../shared/diagnostics/temperature.ts'

export function syntheticGalaxies(n: number, seed: number): KernelInput {
  const input = createKernelInput(n)
  const rng = createRng(seed)
  const u = (a: number, b: number) => a + (b - a) * rng.nextFloat()
  const k = LINES.map((l) => extinctionK('ccm89', l.airAngstrom, 3.1))
  const f = new Float64Array(LINES.length)
  const set = (id: LineId, v: number) => { f[LINE_INDEX[id]] = v }
  for (let i = 0; i < n; i++) {
    const kind = rng.nextFloat()
    let x: number, y: number, xs: number, xo: number, dec = 2.86
    if (kind < 0.5) { // star-forming
      x = u(-1.3, -0.45); y = 0.61 / (x - 0.05) + 1.3 - u(0.05, 0.4); xs = 0.6 * x - 0.2 + u(-0.1, 0.1); xo = x - 0.8 + u(-0.2, 0.2)
    } else if (kind < 0.65) { // composite
      x = u(-0.4, -0.1); const lo = 0.61 / (x - 0.05) + 1.3, hi = 0.61 / (x - 0.47) + 1.19; y = u(lo, hi); xs = u(-0.6, -0.3); xo = u(-1.8, -1.2)
    } else if (kind < 0.8) { // Seyfert
      x = u(-0.2, 0.3); y = u(0.6, 1.1); xs = u(-0.4, 0.1); xo = u(-1.0, -0.4); dec = 3.1
    } else { // LINER-like
      x = u(0.0, 0.4); y = u(-0.2, 0.3); xs = u(-0.1, 0.3); xo = u(-0.6, -0.1); dec = 3.1
    }
    const hb = 100 * Math.pow(10, u(-1, 1))
    const ha = dec * hb
    const t = u(8000, 16000)
    const ne = Math.pow(10, u(1, 3.3))
    set('halpha', ha); set('hbeta', hb); set('hgamma', 0.468 * hb); set('hdelta', 0.259 * hb)
    const o3 = hb * Math.pow(10, y)
    set('oiii_5007', o3); set('oiii_4959', o3 / 2.98)
    set('oiii_4363', (o3 * (1 + 1 / 2.98)) / temperatureRatio(OIII_TEMPERATURE_MODEL, t, ne))
    const n2 = ha * Math.pow(10, x)
    set('nii_6584', n2); set('nii_6548', n2 / 3.05)
    set('nii_5755', (n2 * (1 + 1 / 3.05)) / temperatureRatio(NII_TEMPERATURE_MODEL, t, ne))
    const s2 = ha * Math.pow(10, xs)
    const rs = doubletRatioFromDensity(SANDERS16_SII, ne, t)
    set('sii_6717', (s2 * rs) / (1 + rs)); set('sii_6731', s2 / (1 + rs))
    set('oi_6300', ha * Math.pow(10, xo))
    const o2 = 2.5 * hb
    const ro = doubletRatioFromDensity(SANDERS16_OII, ne, t)
    set('oii_3729', (o2 * ro) / (1 + ro)); set('oii_3726', o2 / (1 + ro))
    set('halpha_broad', kind < 0.65 ? 0.05 * ha : u(0.3, 3) * ha)
    const ebv = u(0, 1)
    for (let l = 0; l < LINES.length; l++) {
      const obs = f[l] * Math.pow(10, -0.4 * k[l] * ebv)
      const err = 0.03 * obs + 0.4
      input.kind[l][i] = 1
      input.value[l][i] = obs + err * rng.nextNormal()
      input.error[l][i] = err
    }
    input.redshift[i] = u(0.01, 0.3)
    input.fluxUnit[i] = 1e-17
    input.ewHalpha[i] = Math.pow(10, u(-0.5, 2))
    input.ewNii[i] = Math.pow(10, u(-0.5, 1.5))
    input.fwhmBroad[i] = u(1000, 5000)
  }
  return input
}
