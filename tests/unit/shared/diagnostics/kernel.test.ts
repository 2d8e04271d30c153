import { describe, expect, it } from 'vitest'
import { createKernelInput, ExtinctionRangeError, FC, FLOAT_COLUMN_COUNT, IC, INT_COLUMN_COUNT, prepareSettings } from '../../../../shared/diagnostics/kernel.ts'
import { diagnoseColumns, diagnoseMany } from '../../../../shared/diagnostics/pipeline.ts'
import { LINE_INDEX } from '../../../../shared/vocabulary/lines.ts'
import { fluxesAt, galaxy, settingsWith } from './helpers.ts'
import type { LineId } from '../../../../shared/vocabulary/lines.ts'

describe('columnar kernel', () => {
  it('gives the same numbers as the object API (one source of truth)', () => {
    const gs = [galaxy('a', fluxesAt(-0.6, -0.3, -0.6, -1.8, 4), 30, { redshift: 0.05 }), galaxy('b', fluxesAt(0.1, 0.8, 0, -0.5, 5), 10)]
    const input = createKernelInput(gs.length)
    gs.forEach((g, i) => {
      for (const [id, v] of Object.entries(g.lines)) {
        const l = LINE_INDEX[id as LineId]
        input.kind[l][i] = 1
        input.value[l][i] = (v as { flux: number }).flux
        input.error[l][i] = (v as { error: number }).error
      }
      if (g.redshift !== undefined) input.redshift[i] = g.redshift
    })
    const s = settingsWith()
    const out = diagnoseColumns(input, s)
    const objs = diagnoseMany(gs, s)
    gs.forEach((_, i) => {
      expect(out.float[i * FLOAT_COLUMN_COUNT + FC.ebv]).toBe(objs[i].extinction.ebv)
      expect(out.float[i * FLOAT_COLUMN_COUNT + FC['ratio:niiHa']]).toBe(objs[i].ratios.niiHa)
      expect(out.int[i * INT_COLUMN_COUNT + IC['class.overall']]).toBe(['unclassified', 'star-forming', 'composite', 'agn', 'seyfert', 'liner', 'ambiguous'].indexOf(objs[i].classes.overall))
    })
  })
  it('precomputes k for every line and reports a law range error naming line and law', () => {
    const p = prepareSettings(settingsWith({ extinctionLaw: 'calzetti00', rv: 4.05 }))
    expect(p.k[LINE_INDEX.halpha]).toBeCloseTo(3.326, 3) // python3-extinction 0.4.6, via shared/science/README.md §1.4
    const e = new ExtinctionRangeError('oii_3726', 'calzetti00', new RangeError('x'))
    expect(e).toBeInstanceOf(RangeError)
    expect(e.message).toMatch(/oii_3726.*calzetti00/)
  })
})
