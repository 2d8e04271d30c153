/**
 * The columnar kernel against values from outside the code: the check values of
 * shared/science/README.md (from the papers and the Debian libraries named there) and the fixtures
 * tests/fixtures/science/extinction.json (python3-extinction 0.4.6) and numerics.json (python3-scipy
 * 1.10.1). Each row is run through `runKernel` itself and read back through the typed column layout.
 */
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { CLASS_AGN, CLASS_COMPOSITE, CLASS_LINER, CLASS_PASSIVE, CLASS_RETIRED, CLASS_SEYFERT, CLASS_STAR_FORMING, CLASS_STRONG_AGN, CLASS_WEAK_AGN } from '../../../../shared/vocabulary/classes.ts'
import { DENSITY_HIGH_LIMIT, DENSITY_LOW_LIMIT, DENSITY_OK } from '../../../../shared/diagnostics/density.ts'
import { createKernelInput, createKernelOutput, ExtinctionRangeError, FLAG_STRIDE, prepareSettings, runKernel } from '../../../../shared/diagnostics/kernel.ts'
import { FLOAT, FLOAT_COLUMN_COUNT, FLOAT_COLUMNS, INT, INT_COLUMN_COUNT, INT_COLUMNS, RATIO_INDEX } from '../../../../shared/diagnostics/kernel-layout.ts'
import { METALLICITY_KEYS, type MetallicityKey } from '../../../../shared/vocabulary/calibrations.ts'
import { FLAG_BIT, FLAG_WORDS } from '../../../../shared/vocabulary/flags.ts'
import { LINE_INDEX, type LineId } from '../../../../shared/vocabulary/lines.ts'
import { LINE_UPPER_LIMIT, RATIO_UPPER } from '../../../../shared/stats/limits.ts'
import { settingsWith } from './helpers.ts'
import type { DiagnosticSettings } from '../../../../shared/diagnostics/types.ts'

/** One galaxy of a kernel run: fluxes (S/N 1000 unless an error is given) or `{ limit }`, and the other inputs. */
interface Row {
  lines: Partial<Record<LineId, number | { flux: number; error: number } | { limit: number }>>
  redshift?: number
  fluxUnit?: number
  ewHalpha?: number
  ewNii?: number
  fwhmBroad?: number
}

/** Run rows through the kernel; read them back by typed column. */
function runRows(rows: Row[], settings: DiagnosticSettings = settingsWith()) {
  const input = createKernelInput(rows.length)
  rows.forEach((row, i) => {
    for (const [id, v] of Object.entries(row.lines)) {
      const l = LINE_INDEX[id as LineId]
      if (typeof v === 'number') {
        input.kind[l][i] = 1
        input.value[l][i] = v
        input.error[l][i] = v / 1000
      } else if (v && 'limit' in v) {
        input.kind[l][i] = 2
        input.value[l][i] = v.limit
      } else if (v) {
        input.kind[l][i] = 1
        input.value[l][i] = v.flux
        input.error[l][i] = v.error
      }
    }
    if (row.redshift !== undefined) input.redshift[i] = row.redshift
    if (row.fluxUnit !== undefined) input.fluxUnit[i] = row.fluxUnit
    if (row.ewHalpha !== undefined) input.ewHalpha[i] = row.ewHalpha
    if (row.ewNii !== undefined) input.ewNii[i] = row.ewNii
    if (row.fwhmBroad !== undefined) input.fwhmBroad[i] = row.fwhmBroad
  })
  const out = createKernelOutput(rows.length)
  runKernel(input, out, prepareSettings(settings), { thresholdSnr: true, errors: true })
  return {
    float: (i: number, c: number) => out.float[i * FLOAT_COLUMN_COUNT + c],
    int: (i: number, c: number) => out.int[i * INT_COLUMN_COUNT + c],
    flag: (i: number, name: string) => {
      const b = FLAG_BIT[name]
      return (out.flags[i * FLAG_STRIDE + (b >>> 5)] & (1 << (b & 31))) !== 0
    },
    belowSnr: (i: number) => out.flags[i * FLAG_STRIDE + FLAG_WORDS],
  }
}
const runRow = (row: Row, settings?: DiagnosticSettings) => {
  const r = runRows([row], settings)
  return { float: (c: number) => r.float(0, c), int: (c: number) => r.int(0, c), flag: (f: string) => r.flag(0, f), belowSnr: () => r.belowSnr(0) }
}
/** |actual − expected| within half a unit of the last digit written in the check value. */
const near = (actual: number, expected: number, halfUnit: number, what = '') => expect(Math.abs(actual - expected), what).toBeLessThan(halfUnit)
const relNear = (actual: number, expected: number, rel: number, what = '') =>
  expect(Math.abs(actual - expected) / Math.abs(expected), what).toBeLessThan(rel)
/** Fluxes at x = log([N II]/Hα), y = log([O III]/Hβ) with Hα/Hβ = 2.86 (no dust). Invented numbers. */
const bptLines = (x: number, y: number) => ({ halpha: 286, hbeta: 100, nii_6584: 286 * 10 ** x, oiii_5007: 100 * 10 ** y })

interface ExtinctionCase { law: string; rv: number; wavelengthAngstrom: number[]; k: number[] }
const extinctionFixture = JSON.parse(readFileSync(new URL('../../../fixtures/science/extinction.json', import.meta.url), 'utf8')) as { cases: ExtinctionCase[] }
/** k(λ) of python3-extinction 0.4.6 (tests/fixtures/science/extinction.json) at a line's air wavelength. */
function fixtureK(law: string, rv: number, wavelength: number): number {
  const c = extinctionFixture.cases.find((x) => x.law === law && x.rv === rv) as ExtinctionCase
  const j = c.wavelengthAngstrom.indexOf(wavelength)
  expect(j, `${law} ${rv} at ${wavelength}`).toBeGreaterThanOrEqual(0)
  return c.k[j]
}
interface TemperatureCase { model: 'oiii' | 'nii'; neCm3: number; ratio: number[]; temperatureK: number[] }
interface DensityCase { fit: 'sii' | 'oii'; temperatureK: number; ratio: number[]; neCm3: number[] }
const numerics = JSON.parse(readFileSync(new URL('../../../fixtures/science/numerics.json', import.meta.url), 'utf8')) as {
  temperature: TemperatureCase[]; density: DensityCase[]
}

describe('column layout', () => {
  it('numbers every column once, families in their key order', () => {
    // structure of kernel-layout.ts (project convention)
    expect(new Set(FLOAT_COLUMNS).size).toBe(FLOAT_COLUMN_COUNT)
    expect(new Set(INT_COLUMNS).size).toBe(INT_COLUMN_COUNT)
    expect(FLOAT_COLUMNS[FLOAT.flux[LINE_INDEX.oiii_5007]]).toBe('flux:oiii_5007')
    expect(FLOAT_COLUMNS[FLOAT.z[METALLICITY_KEYS.indexOf('o3n2M13')]]).toBe('z:o3n2M13')
    expect(INT_COLUMNS[INT.limit[RATIO_INDEX.oiHa]]).toBe('limit:oiHa')
  })
})

describe('dust through the kernel (shared/science/README.md §1.2)', () => {
  it('gives the §1.2 E(B−V) and A_V of Hα/Hβ = 4.00 for every law', () => {
    // Cardelli, Clayton & Mathis 1989 (ApJ 345, 245); O'Donnell 1994 (ApJ 422, 158); Calzetti et al. 2000
    // (ApJ 533, 682); Fitzpatrick 1999 (PASP 111, 63): k values of python3-extinction 0.4.6, E(B−V) of the
    // foreground screen with Case B 2.86 (Osterbrock & Ferland 2006, Table 4.4), shared/science/README.md §1.2 table; 4 d.p.
    const table: Array<[DiagnosticSettings['extinctionLaw'], number, number]> = [
      ['ccm89', 3.1, 0.3392], ['odonnell94', 3.1, 0.3183], ['calzetti00', 4.05, 0.2864], ['fitzpatrick99', 3.1, 0.2897],
    ]
    for (const [law, rv, ebv] of table) {
      const r = runRow({ lines: { halpha: 400, hbeta: 100 } }, settingsWith({ extinctionLaw: law, rv }))
      near(r.float(FLOAT.ebv), ebv, 6e-5, law)
      expect(r.int(INT.source)).toBe(1)
    }
    // A_V = R_V E(B−V): CCM89 1.0515, Calzetti 1.1598 (shared/science/README.md §1.2)
    near(runRow({ lines: { halpha: 400, hbeta: 100 } }).float(FLOAT.av), 1.0515, 6e-5)
    near(runRow({ lines: { halpha: 400, hbeta: 100 } }, settingsWith({ extinctionLaw: 'calzetti00', rv: 4.05 })).float(FLOAT.av), 1.1598, 6e-5)
  })
  it('gives 0.5648 for Hα/Hβ = 5.00 and 0.2577 with the AGN intrinsic 3.1 (CCM89, R_V = 3.1)', () => {
    // shared/science/README.md §1.2 "Also" line; AGN ratio 3.1: Halpern & Steiner 1983, ApJL 269, L37 (§1.1)
    near(runRow({ lines: { halpha: 500, hbeta: 100 } }).float(FLOAT.ebv), 0.5648, 6e-5)
    near(runRow({ lines: { halpha: 400, hbeta: 100 } }, settingsWith({ intrinsicBalmer: 3.1 })).float(FLOAT.ebv), 0.2577, 6e-5)
  })
  it('clips a decrement below Case B to 0 with balmer-below-intrinsic', () => {
    // shared/science/README.md §1.2 (common practice): Hα/Hβ = 2.5 < 2.86 → no correction
    const r = runRow({ lines: { halpha: 250, hbeta: 100, oiii_5007: 300 } })
    expect(r.float(FLOAT.ebv)).toBe(0)
    expect(r.flag('balmer-below-intrinsic')).toBe(true)
    expect(r.float(FLOAT.flux[LINE_INDEX.oiii_5007])).toBe(300)
  })
  it('dereddens with k(λ) of python3-extinction: F_corr = F 10^(0.4 k E(B−V))', () => {
    // foreground screen, shared/science/README.md §1.2; k from tests/fixtures/science/extinction.json (python3-extinction 0.4.6,
    // CCM89 R_V = 3.1): E(B−V) = 2.5/(k_Hβ − k_Hα) log(4/2.86)
    const kHa = fixtureK('ccm89', 3.1, 6562.8), kHb = fixtureK('ccm89', 3.1, 4861.33), kO3 = fixtureK('ccm89', 3.1, 5006.84)
    const ebv = (2.5 / (kHb - kHa)) * Math.log10(4 / 2.86)
    const r = runRow({ lines: { halpha: 400, hbeta: 100, oiii_5007: 300 } })
    relNear(r.float(FLOAT.ebv), ebv, 1e-9)
    relNear(r.float(FLOAT.flux[LINE_INDEX.oiii_5007]), 300 * 10 ** (0.4 * kO3 * ebv), 1e-9)
    relNear(r.float(FLOAT.flux[LINE_INDEX.halpha]) / r.float(FLOAT.flux[LINE_INDEX.hbeta]), 2.86, 1e-9) // corrected to Case B
  })
  it('falls back to Hγ/Hβ without Hα (balmer-from-hgamma)', () => {
    // shared/science/README.md §1.2 fallback (project choice): E = 2.5/(k_Hγ − k_Hβ) log(0.468/ratio); intrinsic 0.468 from
    // Osterbrock & Ferland 2006, Table 4.4 (§1.1); k from extinction.json (python3-extinction 0.4.6, CCM89 R_V = 3.1)
    const kHg = fixtureK('ccm89', 3.1, 4340.47), kHb = fixtureK('ccm89', 3.1, 4861.33)
    const r = runRow({ lines: { hbeta: 100, hgamma: 40 } })
    relNear(r.float(FLOAT.ebv), (2.5 / (kHg - kHb)) * Math.log10(0.468 / 0.4), 1e-9)
    expect(r.int(INT.source)).toBe(2)
    expect(r.flag('balmer-from-hgamma')).toBe(true)
  })
  it('propagates the E(B−V) error to first order', () => {
    // shared/science/README.md §9: σ_E = C/ln 10 √((σα/Fα)² + (σβ/Fβ)²), C = 2.5/(k_Hβ − k_Hα) (closed form; k python3-extinction)
    const kHa = fixtureK('ccm89', 3.1, 6562.8), kHb = fixtureK('ccm89', 3.1, 4861.33)
    const r = runRow({ lines: { halpha: { flux: 400, error: 8 }, hbeta: { flux: 100, error: 4 } } })
    relNear(r.float(FLOAT.ebvError), (2.5 / (kHb - kHa) / Math.LN10) * Math.hypot(0.02, 0.04), 1e-9)
  })
})

describe('S/N threshold (shared/science/README.md §9)', () => {
  it('turns F/σ < minSnr into the upper limit minSnr·σ and the ratio into an upper limit', () => {
    // project convention, shared/science/README.md §9: F = 29, σ = 10 (S/N 2.9 < 3) → U = 30
    const r = runRow({ lines: { ...bptLines(-0.5, 0), nii_6584: { flux: 29, error: 10 } } })
    expect(r.int(INT.state[LINE_INDEX.nii_6584])).toBe(LINE_UPPER_LIMIT)
    expect(r.float(FLOAT.flux[LINE_INDEX.nii_6584])).toBe(30)
    expect(r.int(INT.limit[RATIO_INDEX.niiHa])).toBe(RATIO_UPPER)
    near(r.float(FLOAT.ratio[RATIO_INDEX.niiHa]), Math.log10(30 / 286), 1e-12)
    expect(r.belowSnr()).toBe(1 << LINE_INDEX.nii_6584)
  })
})

describe('classes at the published demarcation values (shared/science/README.md §2.2–2.5)', () => {
  it('[N II]: either side of Kauffmann et al. 2003 and Kewley et al. 2001 at x = −0.4', () => {
    // Ka03(−0.4) = −0.0556 (Kauffmann et al. 2003, MNRAS 346, 1055, eq. 1), Ke01(−0.4) = 0.4889 (Kewley et al. 2001,
    // ApJ 556, 121, eq. 5): shared/science/README.md §2.2 check values; classes §2.3
    const r = runRows([bptLines(-0.4, -0.0756), bptLines(-0.4, -0.0356), bptLines(-0.4, 0.4689), bptLines(-0.4, 0.5089)].map((lines) => ({ lines })))
    expect([0, 1, 2, 3].map((i) => r.int(i, INT.classNii))).toEqual([CLASS_STAR_FORMING, CLASS_COMPOSITE, CLASS_COMPOSITE, CLASS_AGN])
  })
  it('[N II]: Seyfert or LINER subtype by Schawinski et al. 2007, y = 1.05 x + 0.45', () => {
    // Schawinski et al. 2007, MNRAS 382, 1415 (shared/science/README.md §2.2, §2.3): at x = 0.2 the line is at 0.66
    const r = runRows([{ lines: bptLines(0.2, 0.68) }, { lines: bptLines(0.2, 0.64) }])
    expect([r.int(0, INT.niiSubtype), r.int(1, INT.niiSubtype)]).toEqual([CLASS_SEYFERT, CLASS_LINER])
    expect(r.flag(0, 'beyond-asymptote:nii-ka03')).toBe(true) // x = 0.2 ≥ 0.05 (§2.2)
  })
  it('[S II] and [O I]: Kewley et al. 2001 eqs. 6–7, then Kewley et al. 2006 Seyfert/LINER', () => {
    // Ke01 [S II](−0.5) = 0.4220, Ke01 [O I](−1.5) = 0.5278 (shared/science/README.md §2.2); Ke06 lines y = 1.89 x + 0.76,
    // y = 1.18 x + 1.30 (Kewley et al. 2006, MNRAS 372, 961)
    const sii = (xs: number, y: number) => ({ halpha: 286, hbeta: 100, oiii_5007: 100 * 10 ** y, sii_6717: 0.55 * 286 * 10 ** xs, sii_6731: 0.45 * 286 * 10 ** xs })
    const oi = (xo: number, y: number) => ({ halpha: 286, hbeta: 100, oiii_5007: 100 * 10 ** y, oi_6300: 286 * 10 ** xo })
    const r = runRows([sii(-0.5, 0.40), sii(-0.5, 0.44), sii(0.0, -0.5), oi(-1.5, 0.50), oi(-1.5, 0.56), oi(-0.3, 0.5)].map((lines) => ({ lines })))
    expect([0, 1, 2].map((i) => r.int(i, INT.classSii))).toEqual([CLASS_STAR_FORMING, CLASS_SEYFERT, CLASS_LINER]) // −0.5 < 1.89·0 + 0.76
    expect([3, 4, 5].map((i) => r.int(i, INT.classOi))).toEqual([CLASS_STAR_FORMING, CLASS_SEYFERT, CLASS_LINER]) // 0.5 < 1.18·(−0.3) + 1.30
    expect(r.flag(5, 'beyond-asymptote:oi-ke01')).toBe(true) // −0.3 ≥ −0.59 (§2.2)
  })
  it('WHAN: the Cid Fernandes et al. 2011 check points', () => {
    // Cid Fernandes et al. 2011, MNRAS 413, 1687; shared/science/README.md §2.5 checks
    const r = runRows([
      { lines: bptLines(-0.395, 0), ewHalpha: 6.05 }, { lines: bptLines(-0.55, 0), ewHalpha: 42 }, { lines: bptLines(-0.2, 0), ewHalpha: 2.2, ewNii: 3 },
      { lines: bptLines(-0.2, 0), ewHalpha: 0.3, ewNii: 0.2 }, { lines: bptLines(0.15, 0), ewHalpha: 4.5 },
    ])
    expect([0, 1, 2, 3, 4].map((i) => r.int(i, INT.classWhan))).toEqual([CLASS_STRONG_AGN, CLASS_STAR_FORMING, CLASS_RETIRED, CLASS_PASSIVE, CLASS_WEAK_AGN])
  })
})

describe('distances to the demarcation lines (shared/science/README.md §2.6)', () => {
  it('gives the §2.6 check values at (0.60, 0.00) and picks the nearer curve', () => {
    // shared/science/README.md §2.6 (project convention): Ke01 +0.6027, Ka03 +0.9761, S07 −0.7448; 4 d.p.
    const r = runRow({ lines: bptLines(0.6, 0) })
    near(r.float(FLOAT.niiKe01), 0.6027, 6e-5)
    near(r.float(FLOAT.niiKa03), 0.9761, 6e-5)
    near(r.float(FLOAT.niiS07), -0.7448, 6e-5)
    expect(r.int(INT.niiNearest)).toBe(2) // Ke01
    expect(r.float(FLOAT.niiNearestDistance)).toBe(r.float(FLOAT.niiKe01))
    // first-order error of a straight-line distance, √((m σx)² + σy²)/√(1 + m²), σ of each log ratio √2·10⁻³/ln 10
    // (shared/science/README.md §2.6, §9; closed form)
    const s = (Math.SQRT2 * 1e-3) / Math.LN10
    relNear(r.float(FLOAT.niiS07Error), Math.hypot(1.05 * s, s) / Math.hypot(1, 1.05), 1e-9)
  })
  it('gives +0.0070 dex for a point 0.01 dex above Ke01 at x = −0.30', () => {
    // shared/science/README.md §2.6: perpendicular +0.0070 (see demarcation.test.ts for the x of that check)
    near(runRow({ lines: bptLines(-0.3, 0.61 / (-0.3 - 0.47) + 1.19 + 0.01) }).float(FLOAT.niiKe01), 0.007, 6e-5)
  })
})

describe('electron density (Sanders et al. 2016, ApJ 816, 23; shared/science/README.md §3)', () => {
  const doublets = (sii: number, oii: number) => ({ lines: { sii_6717: 100 * sii, sii_6731: 100, oii_3729: 100 * oii, oii_3726: 100 } })
  it('gives the §3 check values and the limit statuses', () => {
    // shared/science/README.md §3 checks at 10⁴ K: [S II] R = 1.0 → 496.2, 1.2 → 203.8; [O II] 1.2 → 200.0 cm⁻³;
    // limits R(1) = 1.4482 and R(10⁵) = 0.4378 for [S II]
    const r = runRows([doublets(1.0, 1.2), doublets(1.2, 1.2), doublets(1.45, 1.2), doublets(0.43, 1.2)])
    near(r.float(0, FLOAT.neSii), 496.2, 0.05)
    near(r.float(1, FLOAT.neSii), 203.8, 0.05)
    near(r.float(0, FLOAT.neOii), 200.0, 0.05)
    expect([0, 2, 3].map((i) => r.int(i, INT.densitySii))).toEqual([DENSITY_OK, DENSITY_LOW_LIMIT, DENSITY_HIGH_LIMIT])
    expect(r.flag(2, 'low-density-limit:sii')).toBe(true)
    expect(Number.isNaN(r.float(3, FLOAT.neSii))).toBe(true)
  })
  it('gives 607.7 cm⁻³ for [S II] R = 1.0 at 15 000 K', () => {
    // n_e ∝ (T/10⁴)^½ at fixed R (shared/science/README.md §3 check at 15 000 K)
    near(runRow(doublets(1.0, 1.2), settingsWith({ electronTemperature: 15000 })).float(FLOAT.neSii), 607.7, 0.05)
  })
  it('agrees with scipy brentq on the forward fit (numerics.json)', () => {
    // tests/fixtures/science/numerics.json (python3-scipy 1.10.1 brentq on R(n_e (10⁴/T)^½)), shared/science/README.md §3
    for (const c of numerics.density) {
      const r = runRows(c.ratio.map((R) => c.fit === 'sii' ? doublets(R, 1.2) : doublets(1.0, R)), settingsWith({ electronTemperature: c.temperatureK }))
      c.neCm3.forEach((ne, j) => relNear(r.float(j, c.fit === 'sii' ? FLOAT.neSii : FLOAT.neOii), ne, 1e-9, `${c.fit} R ${c.ratio[j]} T ${c.temperatureK}`))
    }
  })
})

describe('electron temperature (Osterbrock & Ferland 2006, eqs. 5.4–5.5; shared/science/README.md §4)', () => {
  const oiii = (R: number): Row => ({ lines: { oiii_5007: 75 * R, oiii_4959: 25 * R, oiii_4363: 100 } })
  const nii = (R: number): Row => ({ lines: { nii_6584: 75 * R, nii_6548: 25 * R, nii_5755: 100 } })
  it('gives the §4 check values at the assumed n_e = 100 cm⁻³', () => {
    // shared/science/README.md §4 checks: ratio 200 → 10 180 K, 100 → 12 959 K; without [S II] n_e = 100 (project choice)
    const r = runRows([oiii(200), oiii(100)])
    near(r.float(0, FLOAT.teOiii), 10180, 0.5)
    near(r.float(1, FLOAT.teOiii), 12959, 0.5)
    expect(r.float(0, FLOAT.teOiiiNeUsed)).toBe(100)
    expect(r.flag(0, 'te-density-assumed:oiii')).toBe(true)
  })
  it('takes 4959 as 5007/2.98 when it is missing', () => {
    // fixed ratio 2.98 (Storey & Zeippen 2000, MNRAS 312, 813 — from memory, shared/science/README.md §4, §12): 5007 = 298
    // gives the sum 398, over 4363 = 1.99 the ratio 200 → 10 180 K (§4 check)
    const r = runRow({ lines: { oiii_5007: 298, oiii_4363: 1.99 } })
    near(r.float(FLOAT.teOiii), 10180, 0.5)
    expect(r.flag('te-from-fixed-doublet-ratio:oiii')).toBe(true)
  })
  it('agrees with scipy brentq for both ions at n_e = 100 cm⁻³ (numerics.json)', () => {
    // tests/fixtures/science/numerics.json (python3-scipy 1.10.1 brentq), shared/science/README.md §4; to 1e-6 K
    for (const c of numerics.temperature.filter((x) => x.neCm3 === 100)) {
      const r = runRows(c.ratio.map(c.model === 'oiii' ? oiii : nii))
      c.temperatureK.forEach((t, j) => near(r.float(j, c.model === 'oiii' ? FLOAT.teOiii : FLOAT.teNii), t, 1e-6, `${c.model} R ${c.ratio[j]}`))
    }
  })
})

describe('metallicity of a star-forming nucleus (shared/science/README.md §5)', () => {
  const z = (r: { float: (c: number) => number }, key: MetallicityKey) => r.float(FLOAT.z[METALLICITY_KEYS.indexOf(key)])
  it('gives the §5 check values at N2 = −1.0 and O3N2 = 0', () => {
    // Pettini & Pagel 2004, MNRAS 348, L59; Marino et al. 2013, A&A 559, A114; shared/science/README.md §5 checks:
    // N2 = −1.0 → 8.330, 8.280 (cubic), 8.281 (M13); O3N2 = 0 → 8.730, 8.533. Hα/Hβ = 2.86: no dust.
    const r = runRow({ lines: bptLines(-1, -1) })
    expect(r.int(INT.classOverall)).toBe(CLASS_STAR_FORMING)
    near(z(r, 'n2Pp04'), 8.33, 5e-4)
    near(z(r, 'n2Pp04Cubic'), 8.28, 5e-4)
    near(z(r, 'n2M13'), 8.281, 5e-4)
    near(z(r, 'o3n2Pp04'), 8.73, 5e-4)
    near(z(r, 'o3n2M13'), 8.533, 5e-4)
  })
  it('gives 8.771 at D16 y = 0', () => {
    // Dopita et al. 2016, Ap&SS 361, 61 (shared/science/README.md §5 check): y = log([N II]/[S II]) + 0.264 N2 = 0 with N2 = −1
    const siiSum = 28.6 / 10 ** 0.264
    const r = runRow({ lines: { ...bptLines(-1, -1), sii_6717: 0.55 * siiSum, sii_6731: 0.45 * siiSum } })
    near(z(r, 'n2s2haD16'), 8.771, 5e-4)
  })
})

describe('luminosity, SFR and black-hole mass (shared/science/README.md §6, §7)', () => {
  const CM_PER_MPC = 3.0856775814913673e24 // IAU 2012 au and 2015 parsec (shared/science/README.md §6)
  it('gives the §6 check values for F_corr(Hα) = 10⁻¹⁴ erg s⁻¹ cm⁻²', () => {
    // Hogg 1999 (astro-ph/9905116) D_L(0.05) = 222.2891 Mpc; L = 5.912e40 erg/s; SFR 0.467 (Kennicutt 1998, ARA&A 36, 189,
    // eq. 2) and 0.318 (Kennicutt & Evans 2012, ARA&A 50, 531); at z = 0.1: 2.535e41, 2.003, 1.361 (shared/science/README.md §6)
    const r = runRows([0.05, 0.1].map((redshift) => ({ lines: { halpha: 286, hbeta: 100 }, redshift, fluxUnit: 1e-14 / 286 })))
    near(r.float(0, FLOAT.luminosityDistance), 222.2891, 5e-5)
    near(r.float(0, FLOAT.lHalpha), 5.912e40, 5e36)
    near(r.float(0, FLOAT.sfrK98), 0.467, 5e-4)
    near(r.float(0, FLOAT.sfrKe12), 0.318, 5e-4)
    near(r.float(1, FLOAT.lHalpha), 2.535e41, 5e37)
    near(r.float(1, FLOAT.sfrK98), 2.003, 5e-4)
    near(r.float(1, FLOAT.sfrKe12), 1.361, 5e-4)
  })
  it('gives the Greene & Ho 2005 check masses from the broad Hα flux', () => {
    // Greene & Ho 2005, ApJ 630, 122 (eq. 6 from memory, shared/science/README.md §7, §12): L = 10⁴³ erg/s, FWHM 3000 km/s →
    // 6.822e7 M☉; L = 10⁴², 1000 km/s → 2.000e6. Flux from L with D_L(0.05) = 222.2891 Mpc (§6 check).
    const unit = 1 / (4 * Math.PI * (222.2891 * CM_PER_MPC) ** 2)
    const r = runRows([{ lines: { halpha_broad: 1e43 }, redshift: 0.05, fluxUnit: unit, fwhmBroad: 3000 },
      { lines: { halpha_broad: 1e42 }, redshift: 0.05, fluxUnit: unit, fwhmBroad: 1000 }])
    near(r.float(0, FLOAT.bhMass), 6.822e7, 5e3)
    near(r.float(1, FLOAT.bhMass), 2.0e6, 5e2)
    // σ(log M) = 0.55 (σ_F/F)/ln 10 with S/N 1000 (shared/science/README.md §7, closed form)
    relNear(r.float(0, FLOAT.bhLog10MassError), (0.55 * 1e-3) / Math.LN10, 1e-9)
  })
})

describe('prepared settings', () => {
  it('holds the §1.4 k(λ) of every law', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4; 3 d.p.
    const ccm = prepareSettings(settingsWith()).k
    near(ccm[LINE_INDEX.halpha], 2.535, 5e-4)
    near(ccm[LINE_INDEX.hbeta], 3.609, 5e-4)
    near(ccm[LINE_INDEX.oiii_5007], 3.473, 5e-4)
    near(ccm[LINE_INDEX.oi_6300], 2.661, 5e-4)
    near(ccm[LINE_INDEX.oii_3726], 4.772, 5e-4)
    near(prepareSettings(settingsWith({ extinctionLaw: 'calzetti00', rv: 4.05 })).k[LINE_INDEX.halpha], 3.326, 5e-4)
    near(prepareSettings(settingsWith({ extinctionLaw: 'fitzpatrick99' })).k[LINE_INDEX.hbeta], 3.615, 5e-4)
  })
  it('reports a law range error naming line and law', () => {
    // shared/science/README.md §1.3 (project choice: 422 naming the line and law, never extrapolated)
    const e = new ExtinctionRangeError('oii_3726', 'calzetti00', new RangeError('x'))
    expect(e).toBeInstanceOf(RangeError)
    expect(e.message).toMatch(/oii_3726.*calzetti00/)
  })
})
