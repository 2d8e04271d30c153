import { describe, expect, it } from 'vitest'
import { SettingsSchema, type GalaxyInputDto } from '../../../shared/schemas/galaxy.schema.ts'
import { buildResult, runChain, type ChainRun } from '../../../shared/diagnostics/pipeline.ts'
import { diagnoseMany, type GalaxyInput } from '../../../shared/science.ts'
import {
  CURRENT_LAYOUT, classFractionsOf, codesOf, decodeStored, layoutReader, measuresOf, percentilesOf, type StoredResult,
} from '../../../shared/results/stored-row.ts'
import { copyColumnReaders, documentMap, rowFromDocument } from '../../../shared/results/document-map.ts'
import { RESULTS_COLUMNS } from '../../../shared/results/storage.ts'
import { resultColumns } from '../../../server/services/result-columns.ts'
import { sameDocument } from '../../../server/services/stored-results.ts'
import { generateLanternSurvey } from '../../../server/seed/lantern.ts'

// Results are stored as the kernel's row (shared/results/stored-row.ts) and made into documents on
// read: these checks hold the rebuilt documents to the ones the chain builds, over an invented sample
// with every population, limits, broad lines and Monte Carlo draws.

const survey = generateLanternSurvey(600, 11).map(({ population: _p, ...g }) => g) as GalaxyInputDto[]
const f32 = (a: Float64Array) => Array.from(a, (v) => (Number.isFinite(v) ? Math.fround(v) : null))

/** Row i as the database returns it: real[] elements at float4 precision, NULL for no value. */
function stored(run: ChainRun, i: number): StoredResult {
  const mc = run.mc[i]
  return {
    measures: f32(measuresOf(run.out, i, run.input.fwhmBroad[i])),
    codes: codesOf(run.out, i, (l) => run.input.kind[l][i]).slice(),
    mcPercentiles: mc ? f32(percentilesOf(mc)) : null,
    mcClasses: mc ? f32(classFractionsOf(mc)) : null,
  }
}

describe('stored results', () => {
  for (const [label, settings] of [
    ['defaults', SettingsSchema.parse({})],
    ['Monte Carlo, Kennicutt & Evans (2012) SFR', SettingsSchema.parse({ monteCarlo: { draws: 40, seed: 3 }, sfrCalibration: 'kennicuttEvans12' })],
  ] as const) {
    it(`a stored row rebuilds the document the chain builds (${label})`, () => {
      const docs = diagnoseMany(survey as GalaxyInput[], settings)
      const run = runChain(survey as GalaxyInput[], settings)
      const reader = layoutReader(CURRENT_LAYOUT)
      for (let i = 0; i < survey.length; i++) {
        const d = decodeStored(survey[i].id, stored(run, i), reader, settings.monteCarlo.draws)
        const rebuilt = buildResult(d.input, d.out, 0, run.prep, d.mc)
        expect(sameDocument(rebuilt, docs[i]), survey[i].id).toBe(true)
      }
    })

    it(`the copy columns read off the kernel row equal those of the document (${label})`, () => {
      const docs = diagnoseMany(survey as GalaxyInput[], settings)
      const run = runChain(survey as GalaxyInput[], settings)
      const readers = copyColumnReaders(settings.sfrCalibration)
      for (let i = 0; i < survey.length; i++) {
        const fromDoc = resultColumns(survey[i], docs[i])
        const fromRow = Object.fromEntries(RESULTS_COLUMNS.map((c, k) => [c.column, readers[k](run.out, i, survey[i])]))
        expect(fromRow, survey[i].id).toEqual(fromDoc)
      }
    })

    it(`a document stored before the typed columns turns back into its row (${label})`, () => {
      const docs = diagnoseMany(survey as GalaxyInput[], settings)
      for (const doc of docs) {
        const row = rowFromDocument(JSON.parse(JSON.stringify(doc)), settings.sfrCalibration, settings.monteCarlo.draws)
        expect(row, doc.id).not.toBeNull()
        const rebuilt = buildResult(row!.input, row!.out, 0, runChain([], settings).prep, row!.mc)
        expect(sameDocument(rebuilt, doc), doc.id).toBe(true)
      }
    })
  }

  it('the document map knows where every stored number comes from', () => {
    const map = documentMap('kennicuttEvans12')
    expect(map.columnAt.get('extinction/ebv')).toBeDefined()
    expect(map.columnAt.get('sfr/sfrHalpha')).toBe(map.columnAt.get('sfr/sfrKe12'))
    expect(documentMap('kennicutt98').columnAt.get('sfr/sfrHalpha')).toBe(map.columnAt.get('sfr/sfrK98'))
    // a line's corrected flux and its upper limit are one kernel column
    expect(map.columnAt.get('dereddened/halpha/flux')).toBe(map.columnAt.get('dereddened/halpha/upperLimit'))
  })

  it('rows of an older layout are read by element name (a column it lacks reads as no value)', () => {
    const settings = SettingsSchema.parse({})
    const run = runChain(survey.slice(0, 20) as GalaxyInput[], settings)
    const docs = diagnoseMany(survey.slice(0, 20) as GalaxyInput[], settings)
    // an "older" layout: the floats reversed, without the [N II] temperature
    const floats = [...CURRENT_LAYOUT.floats].reverse().filter((n) => n !== 'teNii')
    const older = { ...CURRENT_LAYOUT, floats, scales: floats.map((n) => CURRENT_LAYOUT.scales[CURRENT_LAYOUT.floats.indexOf(n)]) }
    const reader = layoutReader(older)
    for (let i = 0; i < 20; i++) {
      const s = stored(run, i)
      const byName = new Map(CURRENT_LAYOUT.floats.map((n, k) => [n, s.measures[k]]))
      const d = decodeStored(survey[i].id, { ...s, measures: older.floats.map((n) => byName.get(n) ?? null) }, reader, 0)
      const rebuilt = buildResult(d.input, d.out, 0, run.prep, d.mc)
      expect(rebuilt.temperature.nii?.te ?? null).toBeNull()
      expect(sameDocument(rebuilt.extinction, docs[i].extinction)).toBe(true)
      expect(sameDocument(rebuilt.ratios, docs[i].ratios)).toBe(true)
    }
  })
})
