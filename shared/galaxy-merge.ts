import type { GalaxyInputDto } from './schemas/galaxy.schema.ts'

/** A stored galaxy record: the fields of the public API's galaxy, lines in units of `fluxUnit` erg s⁻¹ cm⁻². */
export interface StoredGalaxy {
  key: string
  redshift: number | null
  ra: number | null
  dec: number | null
  fluxUnit: number
  input: Pick<GalaxyInputDto, 'lines' | 'ew' | 'fwhm'>
}

type Line = GalaxyInputDto['lines'][keyof GalaxyInputDto['lines']]

/** A line value in another flux unit: the same physical flux, error and limit (erg s⁻¹ cm⁻²). */
function rescale(v: Line, factor: number): Line {
  if (!v || factor === 1) return v
  const out: Record<string, number> = {}
  for (const [k, x] of Object.entries(v)) out[k] = typeof x === 'number' ? x * factor : x
  return out as Line
}

/**
 * `onExisting: merge`: the stored record with the new one laid over it. Lines, equivalent widths and
 * FWHM given anew replace the stored ones of the same line; the others are kept. Redshift, RA and Dec
 * are kept unless given, and so is the flux unit. The result is in the new record's flux unit, so
 * kept lines are rescaled when the two units differ (the physical fluxes stay the same).
 */
export function mergeGalaxy(stored: StoredGalaxy, incoming: GalaxyInputDto): GalaxyInputDto {
  const unit = incoming.fluxUnit ?? stored.fluxUnit
  const factor = stored.fluxUnit / unit
  const lines: Record<string, Line> = {}
  for (const [id, v] of Object.entries(stored.input.lines ?? {})) lines[id] = rescale(v, factor)
  Object.assign(lines, incoming.lines)
  const overlay = <T extends object>(a: T | undefined, b: T | undefined) => (a || b ? { ...a, ...b } as T : undefined)
  const ew = overlay(stored.input.ew, incoming.ew)
  const fwhm = overlay(stored.input.fwhm, incoming.fwhm)
  const redshift = incoming.redshift ?? stored.redshift ?? undefined
  const ra = incoming.ra ?? stored.ra ?? undefined
  const dec = incoming.dec ?? stored.dec ?? undefined
  return {
    ...incoming, id: incoming.id, fluxUnit: unit, lines: lines as GalaxyInputDto['lines'],
    ...(redshift !== undefined ? { redshift } : {}), ...(ra !== undefined ? { ra } : {}), ...(dec !== undefined ? { dec } : {}),
    ...(ew ? { ew } : {}), ...(fwhm ? { fwhm } : {}),
  }
}
