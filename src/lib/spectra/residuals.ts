/**
 * Residuals of a fit on the spectrum's pixels. The panel under the spectrum shows them in units of
 * the pixel's error, (data − model)/σ, so a good fit scatters within ±1 everywhere and a missed
 * line stands out whatever the flux level (common practice).
 */

type Values = ArrayLike<number | null>

const usable = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v)

/**
 * (flux − model)/error per pixel; null where the pixel is bad (no error or error ≤ 0), or the model
 * does not cover it (outside the fitted windows).
 * @param normalised  false: flux − model in flux units
 */
export function residuals(flux: Values, model: Values, error: Values, normalised = true): (number | null)[] {
  const n = flux.length
  const out = new Array<number | null>(n)
  for (let i = 0; i < n; i++) {
    const f = flux[i], m = model[i], e = error[i]
    if (!usable(f) || !usable(m) || !usable(e) || e <= 0) { out[i] = null; continue }
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

/** flux ± error, for the error band; null where either is missing. */
export function errorBand(flux: Values, error: Values): { lower: (number | null)[]; upper: (number | null)[] } {
  const n = flux.length
  const lower = new Array<number | null>(n), upper = new Array<number | null>(n)
  for (let i = 0; i < n; i++) {
    const f = flux[i], e = error[i]
    const ok = usable(f) && usable(e) && e > 0
    lower[i] = ok ? f - e : null
    upper[i] = ok ? f + e : null
  }
  return { lower, upper }
}

/** A component drawn on top of the continuum (how it adds to the model), null outside its window. */
export function onContinuum(component: Values, continuum: Values): (number | null)[] {
  const n = component.length
  const out = new Array<number | null>(n)
  for (let i = 0; i < n; i++) {
    const v = component[i], c = continuum[i]
    out[i] = usable(v) && usable(c) ? c + v : null
  }
  return out
}

/**
 * Where a component matters: pixels whose |value| reaches `fraction` of its peak |value|, widened by
 * `pad` pixels; elsewhere null, so a line's profile is not drawn as a flat line along the whole
 * continuum. Returns the input unchanged when every value is missing.
 */
export function trimComponent(values: Values, fraction = 1e-3, pad = 3): (number | null)[] {
  const n = values.length
  let peak = 0
  for (let i = 0; i < n; i++) { const v = values[i]; if (usable(v) && Math.abs(v) > peak) peak = Math.abs(v) }
  const out = new Array<number | null>(n).fill(null)
  if (peak === 0) {
    for (let i = 0; i < n; i++) { const v = values[i]; out[i] = usable(v) ? v : null }
    return out
  }
  const keep = new Uint8Array(n)
  for (let i = 0; i < n; i++) {
    const v = values[i]
    if (!usable(v) || Math.abs(v) < fraction * peak) continue
    for (let k = Math.max(0, i - pad); k <= Math.min(n - 1, i + pad); k++) keep[k] = 1
  }
  for (let i = 0; i < n; i++) { const v = values[i]; if (keep[i] && usable(v)) out[i] = v }
  return out
}
