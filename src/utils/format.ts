/** Number formatting for tables and panels; every number shown goes through here. */

export function isNum(v: unknown): v is number {
  return typeof v === 'number' && Number.isFinite(v)
}

/** Fixed decimals for moderate values, scientific for very large or small ones; '—' for missing. */
export function fmt(v: unknown, digits = 3): string {
  if (!isNum(v)) return '—'
  const a = Math.abs(v)
  if (a !== 0 && (a >= 1e5 || a < 10 ** -digits)) return v.toExponential(Math.max(1, digits - 1))
  return v.toFixed(digits)
}

/** Always fixed decimals: for logarithms and other values where 0.000 reads better than 4e-4. */
export function fmtFixed(v: unknown, digits = 3): string {
  if (!isNum(v)) return '—'
  const s = v.toFixed(digits)
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s
}

/** value ± error with the error at the same number of decimals. */
export function fmtErr(v: unknown, err: unknown, digits = 3): string {
  if (!isNum(v)) return '—'
  return isNum(err) ? `${fmt(v, digits)} ± ${fmt(err, digits)}` : fmt(v, digits)
}

/** Integers with thin grouping (2 431). */
export function fmtInt(v: unknown): string {
  if (!isNum(v)) return '—'
  return Math.round(v).toLocaleString('en-GB').replace(/,/g, '\u2009')
}

export function fmtDate(iso: string | null | undefined): string {
  if (!iso) return '—'
  const d = new Date(iso)
  if (Number.isNaN(d.getTime())) return iso
  return d.toLocaleString('en-GB', { year: 'numeric', month: 'short', day: '2-digit', hour: '2-digit', minute: '2-digit' })
}

export function fmtRelative(iso: string | null | undefined, now = Date.now()): string {
  if (!iso) return 'never'
  const t = new Date(iso).getTime()
  if (Number.isNaN(t)) return iso
  const s = Math.round((now - t) / 1000)
  if (s < 60) return 'just now'
  if (s < 3600) return `${Math.round(s / 60)} min ago`
  if (s < 86400) return `${Math.round(s / 3600)} h ago`
  return `${Math.round(s / 86400)} d ago`
}

/**
 * A measurement and its 1σ error, both to the decimal of the error's last significant digit: two
 * digits when the error's leading digits are below 355, else one (the Particle Data Group's rounding
 * rule, Review of Particle Physics, "Introduction": common practice). "646.4 ± 1.3", "18.60 ± 0.09".
 */
export function fmtMeasured(v: unknown, err: unknown): string {
  if (!isNum(v)) return '—'
  if (!isNum(err) || err <= 0) return fmt(v, 3)
  const a = Math.abs(v)
  if (a >= 1e6 || (a !== 0 && a < 1e-4)) return fmtErr(v, err, 3)
  const decimals = measuredDecimals(err)
  return `${fmtFixed(v, decimals)} ± ${err.toFixed(decimals)}`
}

/** The value alone, to the decimal its error allows (as fmtMeasured writes it). */
export function fmtToError(v: unknown, err: unknown): string {
  return fmtMeasured(v, err).split(' ± ')[0]
}

/** Decimals of a value with this error: the error's last significant digit (PDG rule, as above). */
function measuredDecimals(err: number): number {
  const exponent = Math.floor(Math.log10(err))
  const digits = err / 10 ** exponent < 3.55 ? 2 : 1
  return Math.min(6, Math.max(0, digits - 1 - exponent))
}

/** Where an intake's records came from, in words. */
export function intakeSource(kind: string, fileName: string | null | undefined): string {
  if (kind === 'csv') return fileName ?? 'CSV file'
  if (kind === 'spectra') return fileName ? `Spectra: ${fileName}` : 'Spectra'
  return 'API batch'
}
