import { RESULT_FIELDS, type FieldGroup, type ResultField } from './registry.ts'
import { finite, rawValue, type GalaxyRecord } from './values.ts'

/** One column of the CSV and VOTable exports, with its unit (VOUnit) and UCD (IVOA UCD1+); made from the registry. */
export interface ExportColumn {
  name: string
  description: string
  unit: string | null
  ucd: string
  datatype: 'char' | 'double' | 'int'
  group: FieldGroup
  /** the registry field it shows */
  field: string
  get: (g: ExportGalaxy, r: unknown) => string | number | null
}
export type ExportGalaxy = GalaxyRecord

/** The export cell of a field: numbers finite or empty, fluxes in erg s⁻¹ cm⁻², flags as words. */
function exportGetter(f: ResultField): ExportColumn['get'] {
  const read = (g: ExportGalaxy, r: unknown) => rawValue(f, { galaxy: g, result: r })
  // the galaxy's own columns as stored
  if (f.from === 'galaxy') return (g, r) => read(g, r) as string | number | null
  switch (f.kind) {
    case 'number': return (g, r) => finite(read(g, r))
    case 'flux': return (g, r) => { const v = finite(read(g, r)); return v === null ? null : v * g.fluxUnit }
    case 'flags': return (g, r) => { const v = read(g, r); return Array.isArray(v) ? v.join(' ') : '' }
    default: return (g, r) => (read(g, r) as string | undefined) ?? null
  }
}

/** The export columns of a list of fields, in its order (those with an `export`). */
export const exportColumnsOf = (fields: readonly ResultField[]): ExportColumn[] => fields.filter((f) => f.export).map((f) => ({
  name: f.export!.name, description: f.export!.description, unit: f.unit, ucd: f.ucd, datatype: f.export!.datatype, group: f.group, field: f.key,
  get: exportGetter(f),
}))

export const EXPORT_COLUMNS: ExportColumn[] = exportColumnsOf(RESULT_FIELDS)
