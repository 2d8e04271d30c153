import type { MetallicityKey } from '../vocabulary/calibrations.ts'

/** Which strong-line index a calibration uses (shared/science/README.md §5). */
export type MetallicityIndex = 'n2' | 'o3n2' | 'n2s2ha'

/** One strong-line calibration of 12 + log(O/H). */
export interface MetallicityCalibration {
  key: MetallicityKey
  index: MetallicityIndex
  /** 12 + log(O/H) as a function of the index (dex) */
  value: (index: number) => number
  /** d(12 + log O/H)/d(index) */
  slope: (index: number) => number
  /** whether the index (or the value, for D16) lies in the calibrated range */
  inRange: (index: number) => boolean
  source: string
}

const PP04 = 'Pettini & Pagel 2004, MNRAS 348, L59'
const M13 = 'Marino et al. 2013, A&A 559, A114'
const D16 = 'Dopita et al. 2016, Ap&SS 361, 61'

/** N2 linear: 12 + log(O/H) = 8.90 + 0.57 N2, −2.5 < N2 < −0.3 (Pettini & Pagel 2004, MNRAS 348, L59, eq. 1 eq. no. from memory, shared/science/README.md §12). */
export function n2Pp04(n2: number): number {
  return 8.9 + 0.57 * n2
}
/** N2 cubic: 9.37 + 2.03 N2 + 1.26 N2² + 0.32 N2³, −2.5 < N2 < −0.3 (Pettini & Pagel 2004, eq. 2 eq. no. from memory, shared/science/README.md §12). */
export function n2Pp04Cubic(n2: number): number {
  return 9.37 + n2 * (2.03 + n2 * (1.26 + 0.32 * n2))
}
/** O3N2: 8.73 − 0.32 O3N2, −1 < O3N2 < 1.9 (Pettini & Pagel 2004, eq. 3; lower bound from memory, shared/science/README.md §5, §12). */
export function o3n2Pp04(o3n2: number): number {
  return 8.73 - 0.32 * o3n2
}
/** N2: 8.743 + 0.462 N2, −1.6 < N2 < −0.2 (Marino et al. 2013, A&A 559, A114, eq. 4; range from memory, shared/science/README.md §12). */
export function n2M13(n2: number): number {
  return 8.743 + 0.462 * n2
}
/** O3N2: 8.533 − 0.214 O3N2, −1.1 < O3N2 < 1.7 (Marino et al. 2013, eq. 2; range from memory, shared/science/README.md §12). */
export function o3n2M13(o3n2: number): number {
  return 8.533 - 0.214 * o3n2
}
/**
 * 8.77 + y + 0.45(y + 0.3)⁵ with y = log([N II]/[S II]) + 0.264 log([N II]/Hα); near-linear up to
 * 12 + log(O/H) = 9.05 (Dopita et al. 2016, Ap&SS 361, 61, eqs. 1–2 eq. nos., volume/page from memory, shared/science/README.md §12).
 */
export function n2s2haD16(y: number): number {
  const s = y + 0.3
  return 8.77 + y + 0.45 * s * s * s * s * s
}

/** Weight of log([N II]/Hα) in the D16 index y (Dopita et al. 2016, Ap&SS 361, 61, eq. 1 — eq. no. from memory, shared/science/README.md §12). */
export const D16_NII_HA_WEIGHT = 0.264

/**
 * N2 = log([N II]6584/Hα) (Pettini & Pagel 2004, MNRAS 348, L59; shared/science/README.md §5).
 * @param nii6584  F([N II] 6584), dereddened when E(B−V) exists
 * @param halpha   F(Hα), same unit
 * @returns N2 in dex
 * @example n2Index(10, 100) // -1
 */
export function n2Index(nii6584: number, halpha: number): number {
  return Math.log10(nii6584 / halpha)
}

/**
 * O3N2 = log(([O III]5007/Hβ)/([N II]6584/Hα)) (Pettini & Pagel 2004; shared/science/README.md §5).
 * @param oiii5007  F([O III] 5007)
 * @param hbeta     F(Hβ)
 * @param nii6584   F([N II] 6584)
 * @param halpha    F(Hα), all in one unit
 * @returns O3N2 in dex
 * @example o3n2Index(100, 100, 10, 100) // 1
 */
export function o3n2Index(oiii5007: number, hbeta: number, nii6584: number, halpha: number): number {
  return Math.log10((oiii5007 / hbeta) / (nii6584 / halpha))
}

/**
 * D16 index y = log([N II]6584/[S II]6717+6731) + 0.264 log([N II]6584/Hα) (Dopita et al. 2016,
 * Ap&SS 361, 61, eq. 1 — eq. no. from memory, shared/science/README.md §5, §12).
 * @param nii6584  F([N II] 6584)
 * @param siiSum   F([S II] 6717) + F([S II] 6731)
 * @param halpha   F(Hα), all in one unit
 * @returns y in dex
 * @example n2s2haIndex(30, 30, 100) // ≈ -0.138040
 */
export function n2s2haIndex(nii6584: number, siiSum: number, halpha: number): number {
  return Math.log10(nii6584 / siiSum) + D16_NII_HA_WEIGHT * Math.log10(nii6584 / halpha)
}

/**
 * The N2 index log([N II]6584/Hα) → 12 + log(O/H) calibrations, all with their valid index ranges.
 * Values in dex (12 + log(O/H)); the indices are decimal logs of (dereddened) flux ratios.
 * @example METALLICITY_CALIBRATIONS[0].value(-1) // 8.33 (PP04 N2; shared/science/README.md §5)
 */
export const METALLICITY_CALIBRATIONS: readonly MetallicityCalibration[] = [
  { key: 'n2Pp04', index: 'n2', value: n2Pp04, slope: () => 0.57, inRange: (n) => n > -2.5 && n < -0.3, source: `${PP04}, N2 linear` },
  {
    key: 'n2Pp04Cubic', index: 'n2', value: n2Pp04Cubic, slope: (n) => 2.03 + n * (2.52 + 0.96 * n),
    inRange: (n) => n > -2.5 && n < -0.3, source: `${PP04}, N2 cubic`,
  },
  { key: 'o3n2Pp04', index: 'o3n2', value: o3n2Pp04, slope: () => -0.32, inRange: (i) => i > -1 && i < 1.9, source: `${PP04}, O3N2` },
  { key: 'n2M13', index: 'n2', value: n2M13, slope: () => 0.462, inRange: (n) => n > -1.6 && n < -0.2, source: `${M13}, eq. 4` },
  { key: 'o3n2M13', index: 'o3n2', value: o3n2M13, slope: () => -0.214, inRange: (i) => i > -1.1 && i < 1.7, source: `${M13}, eq. 2` },
  {
    key: 'n2s2haD16', index: 'n2s2ha', value: n2s2haD16, slope: (y) => {
      const s = (y + 0.3) * (y + 0.3)
      return 1 + 2.25 * s * s
    },
    inRange: (y) => n2s2haD16(y) <= 9.05, source: `${D16}, eq. 2`,
  },
]
