/**
 * Residuals of a fit on the spectrum's pixels. The panel under the spectrum shows them in units of
 * the pixel's error, (data − model)/σ, so a good fit scatters within ±1 everywhere and a missed
 * line stands out whatever the flux level (common practice).
 */

type Values = ArrayLike<number | null>

/**
 * The curves drawn are Float64Arrays with NaN where there is nothing to draw (a bad pixel, a pixel
 * outside the fitted windows): plotly draws NaN as a gap, takes typed arrays without copying them,
 * and 4,000–50,000 pixels a curve cost no boxed numbers or nulls.
 */
export type Curve = Float64Array

const usable = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v)

/** Values as a curve: null and non-finite values become NaN. */
export function curveOf(values: Values): Curve {
  const n = values.length
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) { const v = values[i]; out[i] = usable(v) ? v : NaN }
  return out
}

/**
 * (flux − model)/error per pixel; NaN where the pixel is bad (no error or error ≤ 0), or the model
 * does not cover it (outside the fitted windows).
 * @param normalised  false: flux − model in flux units
 */
export function residuals(flux: Values, model: Values, error: Values, normalised = true): Curve {
  const n = flux.length
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const f = flux[i], m = model[i], e = error[i]
    if (!usable(f) || !usable(m) || !usable(e) || e <= 0) { out[i] = NaN; continue }
    out[i] = normalised ? (f - m) / e : f - m
  }
  return out
}

/** Σ((flux − model)/error)² and the number of pixels that entered it, over indices [start, end). */
export function chi2Of(flux: Values, model: Values, error: Values, start = 0, end = flux.length): { chi2: number; pixels: number } {
  let chi2 = 0, pixels = 0
  for (let i = Math.max(0, start); i < Math.min(end, flux.length); i++) {
    const f = flux[i], m = model[i], e = error[i]
    if (!usable(f) || !usable(m) || !usable(e) || e <= 0) continue
    const r = (f - m) / e
    chi2 += r * r
    pixels++
  }
  return { chi2, pixels }
}

/** flux ± error, for the error band; NaN where either is missing. */
export function errorBand(flux: Values, error: Values): { lower: Curve; upper: Curve } {
  const n = flux.length
  const lower = new Float64Array(n), upper = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const f = flux[i], e = error[i]
    const ok = usable(f) && usable(e) && e > 0
    lower[i] = ok ? f - e : NaN
    upper[i] = ok ? f + e : NaN
  }
  return { lower, upper }
}

/** A component drawn on top of the continuum (how it adds to the model), NaN outside its window. */
export function onContinuum(component: Values, continuum: Values): Curve {
  const n = component.length
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const v = component[i], c = continuum[i]
    out[i] = usable(v) && usable(c) ? c + v : NaN
  }
  return out
}

/**
 * Where a component matters: pixels whose |value| reaches `fraction` of its peak |value|, widened by
 * `pad` pixels; elsewhere NaN, so a line's profile is not drawn as a flat line along the whole
 * continuum. Returns every usable value when none differs from 0.
 */
export function trimComponent(values: Values, fraction = 1e-3, pad = 3): Curve {
  const n = values.length
  let peak = 0
  for (let i = 0; i < n; i++) { const v = values[i]; if (usable(v) && Math.abs(v) > peak) peak = Math.abs(v) }
  if (peak === 0) return curveOf(values)
  const out = new Float64Array(n).fill(NaN)
  // a pixel is kept when a pixel within `pad` of it reaches the threshold: the last such pixel seen, and the next
  const threshold = fraction * peak
  let lastHit = -Infinity
  for (let i = 0; i < n; i++) {
    const v = values[i]
    if (usable(v) && Math.abs(v) >= threshold) {
      // the `pad` pixels before this one that the last hit did not reach
      for (let k = Math.max(0, i - pad, lastHit + pad + 1); k < i; k++) { const w = values[k]; if (usable(w)) out[k] = w }
      lastHit = i
    }
    if (i - lastHit <= pad && usable(v)) out[i] = v
  }
  return out
}
