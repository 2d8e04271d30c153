import { describe, expect, it } from 'vitest'
import {
  hyperbolaY, isBelowHyperbola, KA03, KE01_NII, KE01_OI, KE01_SII, KE06_OI, KE06_SII, kauffmann2003Line, kewley2001NiiLine,
  kewley2001OiLine, kewley2001SiiLine, S07_NII, signedDistanceToHyperbola, signedDistanceToLine, straightLineY,
  distanceErrorAlongNormal, signedDistanceToLineError,
} from '../../../../shared/diagnostics/demarcation.ts'

describe('demarcation curves', () => {
  it('take the published values (shared/science/README.md §2.2)', () => {
    // Kauffmann et al. 2003, MNRAS 346, 1055, eq. 1; curve values via shared/science/README.md §2.2; 4 d.p.
    const ka = [[-1, 0.719], [-0.5, 0.1909], [-0.4, -0.0556], [-0.2, -1.14], [0, -10.9]]
    for (const [x, y] of ka) expect(kauffmann2003Line(x)).toBeCloseTo(y, 4)
    // Kewley et al. 2001, ApJ 556, 121, eqs. 5–7
    const ken = [[-1, 0.775], [-0.5, 0.5611], [-0.4, 0.4889], [-0.2, 0.2796], [0, -0.1079]]
    for (const [x, y] of ken) expect(kewley2001NiiLine(x)).toBeCloseTo(y, 4)
    for (const [x, y] of [[-1, 0.7545], [-0.5, 0.422], [0, -0.95]]) expect(kewley2001SiiLine(x)).toBeCloseTo(y, 4)
    for (const [x, y] of [[-2, 0.8123], [-1.5, 0.5278], [-1, -0.4505]]) expect(kewley2001OiLine(x)).toBeCloseTo(y, 4)
  })
  it('returns null at and right of the asymptote: the Ka03 trap at x = 0.10', () => {
    // shared/science/README.md §2.2: evaluating the formula at x = 0.10 gives +13.5 and would call the point star-forming
    expect(KA03.a / (0.1 - KA03.x0) + KA03.c).toBeCloseTo(13.5, 10)
    expect(kauffmann2003Line(0.1)).toBeNull()
    expect(kauffmann2003Line(0.05)).toBeNull()
    expect(isBelowHyperbola(KA03, 0.1, 0)).toBe(false)
    expect(isBelowHyperbola(KA03, 0.1, -50)).toBe(false)
    expect(hyperbolaY(KE01_OI, -0.59)).toBeNull()
  })
  it('meet at the intersections shared/science/README.md §2.2 lists', () => {
    // shared/science/README.md §2.2; 4 d.p. of x → curves agree to ~1e-3 there
    expect(Math.abs((kauffmann2003Line(-1.2805) as number) - (kewley2001NiiLine(-1.2805) as number))).toBeLessThan(2e-4)
    expect(kauffmann2003Line(-1.2805)).toBeCloseTo(0.8415, 3)
    expect(Math.abs(straightLineY(KE06_SII, -0.3146) - (kewley2001SiiLine(-0.3146) as number))).toBeLessThan(1e-3)
    expect(Math.abs(straightLineY(KE06_OI, -1.1269) - (kewley2001OiLine(-1.1269) as number))).toBeLessThan(1e-3)
    expect(Math.abs(straightLineY(S07_NII, -0.1838) - (kewley2001NiiLine(-0.1838) as number))).toBeLessThan(1e-3)
  })
})

describe('signed perpendicular distances (shared/science/README.md §2.6)', () => {
  it('reproduce the check values', () => {
    // shared/science/README.md §2.6; 4 d.p. → ±6e-5
    expect(Math.abs(signedDistanceToHyperbola(KE01_NII, 0.6, 0) - 0.6027)).toBeLessThan(6e-5)
    expect(Math.abs(signedDistanceToHyperbola(KA03, 0.6, 0) - 0.9761)).toBeLessThan(6e-5)
    expect(Math.abs(signedDistanceToLine(S07_NII, 0.6, 0) + 0.7448)).toBeLessThan(6e-5)
    expect(Math.abs(signedDistanceToHyperbola(KA03, -0.5515, -0.0267) + 0.1334)).toBeLessThan(6e-5)
    expect(Math.abs(signedDistanceToHyperbola(KE01_NII, -0.5515, -0.0267) + 0.4636)).toBeLessThan(6e-5)
  })
  it('gives +0.0070 dex for a point 0.01 dex above Ke01 at x = −0.30', () => {
    // shared/science/README.md §2.6 quotes (−0.30, 0.49885) → vertical +0.0100, perpendicular +0.0070; but
    // 0.49885 is Ke01(−0.40) + 0.01 (Ke01(−0.30) = 0.39779). The perpendicular 0.0070 matches x = −0.30
    // (slope −1.029 there: 0.01/√(1 + 1.029²) = 0.00697), so the test uses y = Ke01(−0.30) + 0.01.
    const y = (kewley2001NiiLine(-0.3) as number) + 0.01
    expect(Math.abs(signedDistanceToHyperbola(KE01_NII, -0.3, y) - 0.007)).toBeLessThan(6e-5)
    // and at the quoted point, x = −0.40: 0.01 · cos(atan 0.806) = 0.0078
    expect(signedDistanceToHyperbola(KE01_NII, -0.4, 0.49885)).toBeCloseTo(0.0078, 4)
  })
  it('finds the global minimum where several local minima exist (brute force comparison)', () => {
    // exact geometry, checked by dense sampling of the curve (common practice)
    const brute = (x: number, y: number) => {
      let best = Infinity
      for (let j = 1; j < 400000; j++) {
        const t = j * 5e-5
        best = Math.min(best, Math.hypot(x - (KA03.x0 - t), y - (KA03.c - KA03.a / t)))
      }
      return best
    }
    for (const [x, y] of [[-3, -5], [-1, -2], [-2, 0.5], [-0.2, 2], [0.3, -1]]) {
      expect(Math.abs(Math.abs(signedDistanceToHyperbola(KA03, x, y)) - brute(x, y)), `${x},${y}`).toBeLessThan(1e-6)
    }
  })
  it('is positive on the AGN side, including right of the asymptote', () => {
    expect(signedDistanceToHyperbola(KA03, 0.1, -5)).toBeGreaterThan(0)
    expect(signedDistanceToHyperbola(KE01_SII, -1, -1)).toBeLessThan(0)
    expect(signedDistanceToLine(KE06_OI, -1, 1)).toBeGreaterThan(0)
  })
})

describe('first-order errors of the distances (shared/science/README.md §2.6, §9)', () => {
  it('match the numerical gradient of the distance', () => {
    // σ_d² = (∂d/∂x σx)² + (∂d/∂y σy)² (first order, Bevington & Robinson 2003, ch. 3), gradient by central differences
    const h = 1e-6
    const grad = (f: (x: number, y: number) => number, x: number, y: number) =>
      [(f(x + h, y) - f(x - h, y)) / (2 * h), (f(x, y + h) - f(x, y - h)) / (2 * h)]
    const [lx, ly] = grad((x, y) => signedDistanceToLine(S07_NII, x, y), 0.3, 0.2)
    expect(signedDistanceToLineError(S07_NII, 0.1, 0.05)).toBeCloseTo(Math.hypot(lx * 0.1, ly * 0.05), 9)
    for (const [x, y] of [[0.6, 0], [-0.5515, -0.0267], [-1, 1.5]]) {
      const n = new Float64Array(3)
      signedDistanceToHyperbola(KE01_NII, x, y, n)
      const [gx, gy] = grad((a, b) => signedDistanceToHyperbola(KE01_NII, a, b), x, y)
      expect(distanceErrorAlongNormal(n[1], n[2], 0.1, 0.05), `${x},${y}`).toBeCloseTo(Math.hypot(gx * 0.1, gy * 0.05), 6)
    }
  })
})
