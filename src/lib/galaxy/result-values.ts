import type { DiagramKey, GalaxyResult } from '../../api/types'
import { isNum } from '../../utils/format'

/** A displayed number: value, 1σ error and, with Monte Carlo, the 16th/84th percentiles. */
export interface ReadValue { value: number | null; error: number | null; p16?: number | null; p84?: number | null }

/**
 * A number and its siblings in the library's result shape: `key`, `keyError` and, with Monte Carlo,
 * `keyPercentiles: { p16, p50, p84 }` (shared/diagnostics/types.ts).
 */
export function readSibling(obj: unknown, key: string): ReadValue {
  if (!obj || typeof obj !== 'object') return { value: null, error: null }
  const o = obj as Record<string, unknown>
  const num = (v: unknown) => (isNum(v) ? v : null)
  const pct = o[`${key}Percentiles`] as Record<string, unknown> | undefined
  return { value: num(o[key]), error: num(o[`${key}Error`]), p16: num(pct?.p16), p84: num(pct?.p84) }
}

/** The flags attached to a nested result object, if it has any. */
export function nestedFlags(v: unknown): string[] {
  if (!v || typeof v !== 'object') return []
  const o = v as Record<string, unknown>
  const out: string[] = []
  if (Array.isArray(o.flags)) out.push(...o.flags.filter((f): f is string => typeof f === 'string'))
  if (typeof o.flag === 'string') out.push(o.flag)
  return out
}

export interface DiagramPoint { x: number | null; y: number | null; xLimit: 0 | 1 | -1; yLimit: 0 | 1 | -1 }

function limitOf(result: GalaxyResult | null | undefined, key: string): 0 | 1 | -1 {
  const marked = (result?.ratioLimits as Record<string, string> | undefined)?.[key]
  const flags = result?.flags ?? []
  if (marked === 'upper' || flags.includes(`ratio-limit:${key}:upper`)) return 1
  if (marked === 'lower' || flags.includes(`ratio-limit:${key}:lower`)) return -1
  return 0
}

const X_RATIO: Record<Exclude<DiagramKey, 'whan'>, string> = { nii: 'niiHa', sii: 'siiHa', oi: 'oiHa' }

/** Where one galaxy sits on each diagram; WHAN y is EW(Hα) in Å. */
export function galaxyPoints(result: GalaxyResult | null | undefined, ewHalpha: number | null | undefined): Record<DiagramKey, DiagramPoint> {
  const r: Record<string, unknown> = result?.ratios ?? {}
  const y = isNum(r.oiiiHb) ? r.oiiiHb : null
  const yLimit = limitOf(result, 'oiiiHb')
  const out = {} as Record<DiagramKey, DiagramPoint>
  for (const [d, key] of Object.entries(X_RATIO) as [Exclude<DiagramKey, 'whan'>, string][]) {
    out[d] = { x: isNum(r[key]) ? (r[key] as number) : null, y, xLimit: limitOf(result, key), yLimit }
  }
  out.whan = { x: out.nii.x, y: isNum(ewHalpha) && ewHalpha > 0 ? ewHalpha : null, xLimit: out.nii.xLimit, yLimit: 0 }
  return out
}
