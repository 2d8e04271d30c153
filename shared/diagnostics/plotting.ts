/**
 * Plotting helpers for the dashboard, built from the same curves and coefficients the classifier uses.
 */
import { extinctionK } from '../extinction/index.ts'
import type { ExtinctionLaw } from '../vocabulary/extinction-laws.ts'
import { AIR_WAVELENGTH_ANGSTROM } from '../vocabulary/lines.ts'
import { curveLabel, type DemarcationKey } from '../vocabulary/curves.ts'
import type { BptDiagram } from '../vocabulary/classes.ts'
import {
  KA03, KE01_NII, KE01_OI, KE01_SII, KE06_OI, KE06_SII, S07_NII, straightLineY, type HyperbolaCurve, type StraightLine,
} from './demarcation.ts'
import { doubletRatioFromDensity, SANDERS16_OII, SANDERS16_SII, type DoubletFit } from './density.ts'
import { WHAN } from './whan.ts'

export type { DemarcationKey }

/** One demarcation curve sampled for plotting (x, y in dex). */
export interface DemarcationCurve {
  diagram: BptDiagram
  key: DemarcationKey
  label: string
  x: number[]
  y: number[]
}

/** Lowest y (dex) to which the hyperbolas are sampled before they plunge to the asymptote. */
const PLOT_Y_MIN = -1.5
const PLOT_X_MAX = 1.0
const SAMPLES = 120

function sampleHyperbola(curve: HyperbolaCurve, xMin: number): { x: number[]; y: number[] } {
  const xMax = curve.x0 + curve.a / (PLOT_Y_MIN - curve.c) // where the curve reaches PLOT_Y_MIN
  const x: number[] = []
  const y: number[] = []
  for (let j = 0; j < SAMPLES; j++) {
    const xi = xMin + ((xMax - xMin) * j) / (SAMPLES - 1)
    x.push(xi)
    y.push(curve.a / (xi - curve.x0) + curve.c)
  }
  return { x, y }
}

function sampleLine(line: StraightLine, xFrom: number): { x: number[]; y: number[] } {
  return { x: [xFrom, PLOT_X_MAX], y: [straightLineY(line, xFrom), straightLineY(line, PLOT_X_MAX)] }
}

/**
 * Demarcation curves for the three diagrams: Ka03 (Kauffmann et al. 2003, MNRAS 346, 1055, eq. 1),
 * Ke01 (Kewley et al. 2001, ApJ 556, 121, eqs. 5–7), Ke06 (Kewley et al. 2006, MNRAS 372, 961) and
 * S07 (Schawinski et al. 2007, MNRAS 382, 1415). Hyperbolas are sampled on their left branch down to
 * y = −1.5; the straight Seyfert/LINER lines start where they meet Ke01 (shared/science/README.md §2.2).
 *
 * @param diagram  optional: only that diagram's curves
 * @returns the curves (x = log(line/Hα), y = log([O III]/Hβ), dex)
 * @example demarcationCurves('nii').map((c) => c.key) // ['ka03', 'ke01', 's07']
 */
export function demarcationCurves(diagram?: BptDiagram): DemarcationCurve[] {
  const curve = (d: BptDiagram, key: DemarcationKey, xy: { x: number[]; y: number[] }): DemarcationCurve => ({ diagram: d, key, label: curveLabel(key), ...xy })
  const all: DemarcationCurve[] = [
    curve('nii', 'ka03', sampleHyperbola(KA03, -2.5)),
    curve('nii', 'ke01', sampleHyperbola(KE01_NII, -2.5)),
    curve('nii', 's07', sampleLine(S07_NII, -0.1838)),
    curve('sii', 'ke01', sampleHyperbola(KE01_SII, -1.5)),
    curve('sii', 'ke06', sampleLine(KE06_SII, -0.3146)),
    curve('oi', 'ke01', sampleHyperbola(KE01_OI, -2.5)),
    curve('oi', 'ke06', sampleLine(KE06_OI, -1.1269)),
  ]
  return diagram ? all.filter((c) => c.diagram === diagram) : all
}

/** One WHAN boundary segment: x = log([N II]/Hα) in dex, y = EW(Hα) in Å (plot y on a log axis). */
export interface WhanLine {
  key: 'sf-agn' | 'strong-weak-agn' | 'retired' | 'passive'
  label: string
  x: number[]
  y: number[]
}

/**
 * WHAN boundaries (Cid Fernandes et al. 2011, MNRAS 413, 1687): x = −0.4 above W = 3 Å, W = 6 Å for
 * x ≥ −0.4, W = 3 Å and W = 0.5 Å across the diagram.
 *
 * @returns the segments, x in dex from −2.5 to 1, y in Å up to 1000
 * @example whanLines()[0].x // [-0.4, -0.4]
 */
export function whanLines(): WhanLine[] {
  const xMin = -2.5
  return [
    { key: 'sf-agn', label: 'star-forming / AGN', x: [WHAN.xSplit, WHAN.xSplit], y: [WHAN.retiredMaxEw, 1000] },
    { key: 'strong-weak-agn', label: 'strong / weak AGN', x: [WHAN.xSplit, PLOT_X_MAX], y: [WHAN.strongAgnMinEw, WHAN.strongAgnMinEw] },
    { key: 'retired', label: 'retired', x: [xMin, PLOT_X_MAX], y: [WHAN.retiredMaxEw, WHAN.retiredMaxEw] },
    { key: 'passive', label: 'passive', x: [xMin, PLOT_X_MAX], y: [WHAN.passiveMaxEw, WHAN.passiveMaxEw] },
  ]
}

function ratioCurve(fit: DoubletFit, temperatureK: number): { ne: number[]; ratio: number[] } {
  if (!(temperatureK > 0 && Number.isFinite(temperatureK))) throw new RangeError(`temperatureK must be > 0, got ${temperatureK}`)
  const ne: number[] = []
  const ratio: number[] = []
  for (let j = 0; j <= 100; j++) {
    const n = Math.pow(10, (5 * j) / 100) // 1 … 10⁵ cm⁻³
    ne.push(n)
    ratio.push(doubletRatioFromDensity(fit, n, temperatureK))
  }
  return { ne, ratio }
}

/**
 * [S II] 6717/6731 against n_e (1–10⁵ cm⁻³, 101 log-spaced points) at T_e, from the Sanders et al.
 * 2016 (ApJ 816, 23) fit with the n_e/√T scaling (shared/science/README.md §3).
 *
 * @param temperatureK  T_e in K
 * @returns n_e in cm⁻³ and the ratio
 * @example siiRatioCurve(1e4).ratio[0] // ≈ 1.4482
 */
export function siiRatioCurve(temperatureK: number): { ne: number[]; ratio: number[] } {
  return ratioCurve(SANDERS16_SII, temperatureK)
}

/**
 * [O II] 3729/3726 against n_e, as `siiRatioCurve` (Sanders et al. 2016).
 * @param temperatureK  T_e in K
 * @returns n_e in cm⁻³ and the ratio
 * @example oiiRatioCurve(1e4).ratio[0] // ≈ 1.4561
 */
export function oiiRatioCurve(temperatureK: number): { ne: number[]; ratio: number[] } {
  return ratioCurve(SANDERS16_OII, temperatureK)
}

/** Shift of an observed point for foreground dust, per diagram (dex). */
export interface ReddeningVectors {
  nii: { dx: number; dy: number }
  sii: { dx: number; dy: number }
  oi: { dx: number; dy: number }
}

/**
 * How E(B−V) of foreground dust moves an observed point on each diagram: a log ratio F₁/F₂ changes by
 * −0.4 (k₁ − k₂) E(B−V) (shared/science/README.md §1.2, §2.1). For [S II] 6717+6731 the mean k of the two lines
 * is used (k(6717) − k(6731) = 0.007, so the error is < 5×10⁻⁴ dex per magnitude of E(B−V) for any doublet ratio).
 *
 * @param law  extinction law
 * @param rv   R_V, dimensionless
 * @param ebv  E(B−V), mag
 * @returns dx, dy in dex per diagram
 * @example reddeningVector('ccm89', 3.1, 1).nii.dy // ≈ +0.054 (shared/science/README.md §2.1, sign: reddening)
 */
export function reddeningVector(law: ExtinctionLaw, rv: number, ebv: number): ReddeningVectors {
  const k = (id: keyof typeof AIR_WAVELENGTH_ANGSTROM) => extinctionK(law, AIR_WAVELENGTH_ANGSTROM[id], rv)
  const kHa = k('halpha')
  const dy = -0.4 * (k('oiii_5007') - k('hbeta')) * ebv
  const kS = 0.5 * (k('sii_6717') + k('sii_6731'))
  return {
    nii: { dx: -0.4 * (k('nii_6584') - kHa) * ebv, dy },
    sii: { dx: -0.4 * (kS - kHa) * ebv, dy },
    oi: { dx: -0.4 * (k('oi_6300') - kHa) * ebv, dy },
  }
}
