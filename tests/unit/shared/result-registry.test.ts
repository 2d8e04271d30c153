import { describe, expect, it } from 'vitest'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { getTableConfig } from 'drizzle-orm/pg-core'
import { DIAGRAM_CLASSES } from '../../../shared/vocabulary/classes.ts'
import type { GalaxyInputDto } from '../../../shared/schemas/galaxy.schema.ts'
import { GalaxyFilterSchema, GalaxyListQuerySchema, RANGE_FIELD_NAMES, SORT_FIELD_NAMES } from '../../../shared/schemas/query.schema.ts'
import { diagnoseMany, type GalaxyInput, type GalaxyResult } from '../../../shared/science.ts'
import { SettingsSchema } from '../../../shared/schemas/galaxy.schema.ts'
import { FIELD_GROUPS, LIST_ORDER, RESULT_FIELDS, resultField } from '../../../shared/results/registry.ts'
import { EXPORT_COLUMNS } from '../../../shared/results/export-columns.ts'
import { RESULTS_COLUMNS } from '../../../shared/results/storage.ts'
import { galaxySummary } from '../../../shared/results/list.ts'
import { at } from '../../../shared/results/values.ts'
import { GalaxySummarySchema } from '../../../shared/results/responses.ts'
import { galaxies, results } from '../../../server/db/schema.ts'
import { LIMIT_BITS, resultColumns } from '../../../server/services/result-columns.ts'

// The registry (shared/results/registry.ts) is the one list of result fields; these checks walk it
// and find every field where it must appear. tests/api/result-registry.test.ts does the same
// against the running app and its database.

const g: GalaxyInputDto = {
  id: 'REG-1', redshift: 0.05, fluxUnit: 1e-17, ew: { halpha: 24.5 },
  lines: {
    halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, nii_6584: { flux: 60, error: 3 }, oiii_5007: { flux: 50, error: 3 },
    sii_6717: { flux: 40, error: 2 }, sii_6731: { flux: 30, error: 2 }, oi_6300: { flux: 6, error: 1 },
  },
}
/** The same with [O III] not detected: an upper limit on the ratio's numerator. */
const limited: GalaxyInputDto = { ...g, id: 'REG-2', lines: { ...g.lines, oiii_5007: { upperLimit: 9 } } }
const settings = SettingsSchema.parse({})
const [r, rLimited] = diagnoseMany([g, limited] as GalaxyInput[], settings) as GalaxyResult[]

describe('the registry itself', () => {
  it('keys and export names are unique, and every field is exported or says why not', () => {
    const keys = RESULT_FIELDS.map((f) => f.key)
    expect(new Set(keys).size).toBe(keys.length)
    const names = RESULT_FIELDS.flatMap((f) => (f.export ? [f.export.name] : []))
    expect(new Set(names).size).toBe(names.length)
    for (const f of RESULT_FIELDS) expect(!!f.export !== !!f.notExported, f.key).toBe(true)
    // the two filter columns that are inputs, not derived quantities: a new field without an export is a decision, not an accident
    expect(RESULT_FIELDS.filter((f) => !f.export).map((f) => f.key)).toEqual(['ewHalpha', 'snrMin'])
  })

  it('what lists filter and sort by is stored; what the table shows is in the list item', () => {
    for (const f of RESULT_FIELDS) {
      if (f.sort || f.range || f.classParam || f.histogram) expect(f.stored, f.key).toBeDefined()
      if (f.table) expect(f.list, f.key).toBeDefined()
      if (f.table?.error) expect(resultField(f.table.error).list, f.key).toBeDefined()
      if (f.kind === 'class') expect([f.diagram, f.classParam], f.key).not.toContain(undefined)
      if (f.stored?.bits) expect(f.kind).toBe('limit')
      expect(Object.keys(FIELD_GROUPS)).toContain(f.group)
    }
    expect(LIST_ORDER).toHaveLength(RESULT_FIELDS.length)
  })
})

describe('storage', () => {
  const columnType = { real: 'PgReal', smallint: 'PgSmallInt', text: 'PgText', 'double precision': 'PgDoublePrecision' } as const
  const results_ = getTableConfig(results)
  const galaxies_ = getTableConfig(galaxies)

  it('every stored field has its column in server/db/schema.ts, of its type; every results copy column belongs to a field', () => {
    for (const f of RESULT_FIELDS.filter((x) => x.stored)) {
      const table = f.stored!.table === 'results' ? results_ : galaxies_
      const col = table.columns.find((c) => c.name === f.stored!.column)
      expect(col, `${f.key}: ${f.stored!.table}.${f.stored!.column}`).toBeDefined()
      expect(col!.columnType, f.key).toBe(columnType[f.stored!.type])
      expect(col!.notNull, f.key).toBe(f.stored!.table === 'results' ? !!f.stored!.notNull : col!.notNull)
    }
    // (drizzle names columns declared without a name by their keys; the database by snake_case)
    const bookkeeping = ['galaxyId', 'projectId', 'revision', 'methodVersion', 'computedAt', 'result', 'layout', 'measures', 'measuresExact', 'codes', 'mcPercentiles', 'mcClasses']
    const copies = results_.columns.map((c) => c.name).filter((n) => !bookkeeping.includes(n))
    expect(copies.sort()).toEqual(RESULTS_COLUMNS.map((c) => c.column).sort())
  })

  it('the stored copies of a real result hold its values (observed ratios, S/N, limit bits, class codes)', () => {
    const row = resultColumns(g, r)
    // shared/science/README.md §2.1: log ratios of observed fluxes (Baldwin, Phillips & Terlevich 1981, PASP 93, 5)
    expect(row.x_nii).toBeCloseTo(Math.log10(60 / 300), 6) // −0.69897
    expect(row.y_oiii).toBeCloseTo(Math.log10(50 / 80), 6) // −0.20412
    expect(row.x_sii).toBeCloseTo(Math.log10((40 + 30) / 300), 6) // −0.63202
    expect(row.x_oi).toBeCloseTo(Math.log10(6 / 300), 6) // −1.69897
    // S/N = flux / 1σ error (common practice); the lower of Hα (50) and Hβ (26.67)
    expect(row.snr_min).toBeCloseTo(80 / 3, 6)
    expect(row.ew_halpha).toBe(24.5) // the input as given
    expect(row.limits).toBe(0)
    expect(row.flag_count).toBe(r.flags.length)
    for (const d of Object.keys(DIAGRAM_CLASSES) as Array<keyof typeof DIAGRAM_CLASSES>) {
      expect(DIAGRAM_CLASSES[d][row[`class_${d}`] as number]).toBe(r.classes[d]) // the code is the index (shared/vocabulary/classes.ts)
    }
    expect(row.ebv).toBe(r.extinction.ebv)
    expect(row.ne_sii).toBe(r.density.sii!.ne)
    // shared/science/README.md §9: a limit in the numerator makes an upper limit on the ratio
    expect(rLimited.ratioLimits.oiiiHb).toBe('upper')
    const lim = resultColumns(limited, rLimited)
    expect(lim.limits).toBe(LIMIT_BITS.oiiiHb.upper)
    expect(LIMIT_BITS).toEqual({ niiHa: { upper: 1, lower: 2 }, oiiiHb: { upper: 64, lower: 128 }, siiHa: { upper: 4, lower: 8 }, oiHa: { upper: 16, lower: 32 } })
  })
})

describe('exports', () => {
  it('every exported field is a CSV/VOTable column, in registry order, with its unit and UCD', () => {
    const exported = RESULT_FIELDS.filter((f) => f.export)
    expect(EXPORT_COLUMNS.map((c) => c.name)).toEqual(exported.map((f) => f.export!.name))
    for (const f of exported) {
      const c = EXPORT_COLUMNS.find((x) => x.name === f.export!.name)!
      expect([c.unit, c.ucd, c.datatype, c.field], f.key).toEqual([f.unit, f.ucd, f.export!.datatype, f.key])
      // IVOA UCD1+: words of letters, digits and dots joined by semicolons
      expect(c.ucd, f.key).toMatch(/^[A-Za-z][\w.-]*(;[A-Za-z][\w.-]*)*$/)
    }
  })

  it('cells of a real result: ratios, fluxes in erg s⁻¹ cm⁻² (× fluxUnit), classes, limits and flags', () => {
    const row = { key: g.id, redshift: 0.05, ra: null, dec: null, fluxUnit: 1e-17 }
    const cell = (name: string, res: unknown = r) => EXPORT_COLUMNS.find((c) => c.name === name)!.get(row, res)
    expect(cell('galaxy_id')).toBe('REG-1')
    expect(cell('niiHa')).toBeCloseTo(Math.log10(0.2), 12) // README §2.1
    const ha = r.dereddened.halpha as { flux: number }
    expect(cell('halpha_flux_corr')).toBeCloseTo(ha.flux * 1e-17, 30)
    expect(cell('class_nii')).toBe(r.classes.nii)
    expect(cell('oiiiHb_limit')).toBeNull()
    expect(cell('oiiiHb_limit', rLimited)).toBe('upper')
    expect(cell('oiii_5007_upper_limit', rLimited)).toBeCloseTo((rLimited.dereddened.oiii_5007 as { upperLimit: number }).upperLimit * 1e-17, 30)
    expect(cell('flags')).toBe(r.flags.join(' '))
  })
})

describe('lists', () => {
  it('sort and range fields are the registry\'s, and the query schema takes each', () => {
    expect(SORT_FIELD_NAMES).toEqual(LIST_ORDER.filter((f) => f.sort).map((f) => f.key))
    expect(RANGE_FIELD_NAMES).toEqual(LIST_ORDER.filter((f) => f.range).map((f) => f.key))
    for (const k of SORT_FIELD_NAMES) {
      expect(GalaxyListQuerySchema.parse({ sort: k }).sort).toBe(k)
      expect(GalaxyListQuerySchema.parse({ sort: `-${k}` }).sort).toBe(`-${k}`)
    }
    expect(GalaxyListQuerySchema.safeParse({ sort: 'ebvError' }).success).toBe(false)
    for (const k of RANGE_FIELD_NAMES) expect(GalaxyFilterSchema.parse({ range: `${k}:1:2` }).range).toEqual([{ field: k, min: 1, max: 2 }])
    expect(GalaxyFilterSchema.safeParse({ range: 'teNii:1:2' }).success).toBe(false)
    for (const f of RESULT_FIELDS.filter((x) => x.classParam)) {
      const name = DIAGRAM_CLASSES[f.diagram!][0]
      expect((GalaxyFilterSchema.parse({ [f.classParam!]: name }) as Record<string, unknown>)[f.classParam!]).toEqual([name])
    }
  })

  it('the list item has every list field at its place, with the result\'s value, and fits its schema', () => {
    const item = galaxySummary({ key: g.id, redshift: 0.05, result: JSON.parse(JSON.stringify(r)) })
    for (const f of RESULT_FIELDS.filter((x) => x.list)) {
      const v = at(item, f.list!)
      if (f.kind === 'flags') expect(v, f.key).toBe(r.flags.length)
      else if (f.from === 'galaxy') expect(v, f.key).toBe(f.key === 'id' ? 'REG-1' : 0.05)
      else expect(v, f.key).toEqual(at(r, f.path) ?? null)
    }
    expect(item).toMatchObject({ id: 'REG-1', classes: { nii: r.classes.nii }, ratios: { niiHa: r.ratios.niiHa }, ebvError: r.extinction.ebvError })
    expect(GalaxySummarySchema.parse(item)).toEqual(item)
  })
})

describe('OpenAPI (the committed openapi/openapi.json, which tests/api/openapi.test.ts keeps current)', () => {
  const doc = JSON.parse(readFileSync(join(import.meta.dirname, '../../../openapi/openapi.json'), 'utf8'))
  const schemas = doc.components.schemas
  const list = doc.paths['/api/v1/projects/{projectId}/galaxies'].get
  const param = (name: string) => list.parameters.find((p: { name: string }) => p.name === name)

  it('the list item schema has every list field; the sort, range and class parameters every such field', () => {
    for (const f of RESULT_FIELDS.filter((x) => x.list)) {
      let node = schemas.GalaxySummary
      for (const k of f.list!) { expect(node.properties, `${f.key}: ${f.list!.join('.')}`).toHaveProperty(k); node = node.properties[k] }
      expect(node.description, f.key).toBeTruthy()
    }
    for (const k of SORT_FIELD_NAMES) expect(param('sort').schema.enum).toEqual(expect.arrayContaining([k, `-${k}`]))
    for (const k of RANGE_FIELD_NAMES) expect(param('range').schema.description).toContain(k)
    for (const f of RESULT_FIELDS.filter((x) => x.classParam)) expect(param(f.classParam!).schema.items.enum, f.key).toEqual([...DIAGRAM_CLASSES[f.diagram!]])
  })

  it('the list, the detail and the overview answer with named schemas', () => {
    const ok = (path: string) => doc.paths[path].get.responses['200'].content['application/json'].schema.$ref
    expect(ok('/api/v1/projects/{projectId}/galaxies')).toBe('#/components/schemas/GalaxyPage')
    expect(ok('/api/v1/projects/{projectId}/galaxies/{galaxyId}')).toBe('#/components/schemas/GalaxyDetail')
    expect(ok('/api/v1/projects/{projectId}/overview')).toBe('#/components/schemas/ProjectOverview')
    for (const f of RESULT_FIELDS.filter((x) => x.histogram)) expect(schemas.ProjectOverview.properties.histograms.properties, f.key).toHaveProperty(f.key)
  })
})
