import { describe, expect, it } from 'vitest'
import { DEFAULT_COLUMNS, GALAXY_COLUMNS } from '../../../../../src/components/galaxies/galaxy-columns'
import { LIST_ORDER, RESULT_FIELDS } from '../../../../../shared/results/registry.ts'
import { SORT_FIELD_NAMES } from '../../../../../shared/schemas/query.schema.ts'
import type { GalaxySummary } from '../../../../../src/api/types'

describe('galaxy table columns (from shared/results/registry.ts)', () => {
  it('one column per field with a table entry, in list order, sorting by the server\'s sort fields', () => {
    const fields = LIST_ORDER.filter((f) => f.table)
    expect(GALAXY_COLUMNS.map((c) => c.title)).toEqual(fields.map((f) => f.table!.label))
    for (const c of GALAXY_COLUMNS) if (c.sort) expect(SORT_FIELD_NAMES).toContain(c.sort)
    // the keys are what a browser has saved as its column choice: they stay as they were
    expect(GALAXY_COLUMNS.map((c) => c.key)).toEqual(['id', 'redshift', 'overall', 'nii', 'sii', 'oi', 'whan', 'ebv', 'av', 'neSii', 'teOiii',
      'n2Pp04', 'o3n2Pp04', 'sfrHalpha', 'niiHa', 'oiiiHb', 'siiHa', 'oiHa', 'flagCount'])
    expect(DEFAULT_COLUMNS).toEqual(['id', 'redshift', 'overall', 'whan', 'ebv', 'neSii', 'n2Pp04', 'sfrHalpha', 'flagCount'])
  })

  it('reads each value from the list item at the field\'s place', () => {
    const item = {
      id: 'LNS-1', redshift: 0.05, classes: { overall: 'seyfert', nii: 'agn', sii: 'seyfert', oi: 'liner', whan: 'strong-agn' },
      ebv: 0.31, ebvError: 0.04, av: 0.96, neSii: 210, teOiii: null, n2Pp04: 8.71, o3n2Pp04: 8.65, sfrHalpha: 1.2,
      ratios: { niiHa: 0.04, oiiiHb: 0.95, siiHa: -0.2, oiHa: -0.9 }, flagCount: 2,
    } as unknown as GalaxySummary
    const value = (key: string) => GALAXY_COLUMNS.find((c) => c.key === key)!.value(item)
    expect([value('nii'), value('niiHa'), value('teOiii'), value('flagCount')]).toEqual(['agn', 0.04, null, 2])
    const ebv = GALAXY_COLUMNS.find((c) => c.key === 'ebv')!
    expect([ebv.error, ebv.digits, ebv.numeric]).toEqual(['ebvError', 3, true])
    expect(RESULT_FIELDS.find((f) => f.key === ebv.error)!.list).toEqual(['ebvError'])
  })
})
