import { describe, expect, it } from 'vitest'
import type { z } from 'zod'
import { DENSITY_FIT_MAX_CM3, DENSITY_FIT_MIN_CM3 } from '../../../shared/diagnostics/density.ts'
import { FLOAT_COLUMNS } from '../../../shared/diagnostics/kernel-layout.ts'
import { METALLICITY_CALIBRATIONS } from '../../../shared/diagnostics/metallicity.ts'
import { ASSUMED_DENSITY_CM3, TEMPERATURE_MAX_K, TEMPERATURE_MIN_K } from '../../../shared/diagnostics/temperature.ts'
import { WHAN } from '../../../shared/diagnostics/whan.ts'
import { EXTINCTION_RANGE_ANGSTROM } from '../../../shared/extinction/index.ts'
import { GalaxyResultSchema } from '../../../shared/schemas/diagnostics-result.schema.ts'
import { GalaxyInputSchema, SettingsInputSchema } from '../../../shared/schemas/galaxy.schema.ts'
import { ColumnMappingSchema } from '../../../shared/schemas/intake.schema.ts'
import { GalaxyFilterSchema } from '../../../shared/schemas/query.schema.ts'
import { demarcationCurves } from '../../../shared/diagnostics/plotting.ts'
import {
  BALMER_DECREMENT_KEYS, BALMER_DECREMENTS, balmerDecrementLabel, curveLabel, curveName, curveTag, DEMARCATION_CURVE_LIST, diagramShortLabel,
  lineUcd, ratioDefinition,
  belowMinSnrFlag, calibrationLabel, CLASS_CODE, CLASS_DIAGRAMS, CLASS_KEYS, classAt, classCode, classColour, classLabel, classLabelAt,
  className, CLASSES, DENSITY_DOUBLETS, DENSITY_LIMIT_FLAGS, describeFlag, describeFlags, DIAGRAM_CLASSES, DIAGRAM_LABELS, DIAGRAMS,
  EXTINCTION_LAW_LIST, EXTINCTION_LAWS, extinctionLawLabel, FLAG_FAMILIES, SPECTRUM_FLAG_FAMILIES, IMFS, ionLabel, LIMIT_KINDS, LINE_IDS, lineLabel, LINES,
  METALLICITY_KEYS, NII_SUBTYPES, numberInWords, RATIO_KEYS, ratioLabel, ratioLimitFlag, RATIOS, ROW_FLAGS, SFR_CALIBRATION_LIST,
  SFR_CALIBRATIONS, TEMPERATURE_IONS,
} from '../../../shared/vocabulary/index.ts'

/** zod's own description of a schema, read through the wrappers a field is built with. */
type Def = { type: string; innerType?: z.ZodType; element?: z.ZodType; out?: z.ZodType; shape?: Record<string, z.ZodType>; valueType?: z.ZodType; keyType?: z.ZodType }
const defOf = (s: z.ZodType): Def => (s as unknown as { _zod: { def: Def } })._zod.def

function unwrap(s: z.ZodType): z.ZodType {
  const d = defOf(s)
  if (d.type === 'default' || d.type === 'optional' || d.type === 'nullable' || d.type === 'prefault') return unwrap(d.innerType!)
  if (d.type === 'pipe') return unwrap(d.out!)
  if (d.type === 'array') return unwrap(d.element!)
  return s
}
/** The values of the enum a field holds (behind optional, default, nullable, arrays and preprocessing). */
const enumOf = (s: z.ZodType): string[] => (unwrap(s) as unknown as { options: string[] }).options
/** The keys of an object field. */
const keysOf = (s: z.ZodType): string[] => Object.keys(defOf(unwrap(s)).shape ?? {})
const field = (s: z.ZodType, ...path: string[]): z.ZodType => path.reduce((o, k) => defOf(unwrap(o)).shape![k], s)

describe('zod schemas are built from the vocabulary', () => {
  it('line identifiers: galaxy input, CSV mapping and result', () => {
    for (const part of ['lines', 'ew', 'fwhm']) expect(keysOf(field(GalaxyInputSchema, part))).toEqual([...LINE_IDS])
    for (const part of ['lines', 'ew', 'fwhm']) expect(keysOf(field(ColumnMappingSchema, part))).toEqual([...LINE_IDS])
    expect(keysOf(field(GalaxyResultSchema, 'dereddened'))).toEqual([...LINE_IDS])
  })

  it('settings: extinction laws and SFR calibrations', () => {
    expect(enumOf(field(SettingsInputSchema, 'extinctionLaw'))).toEqual([...EXTINCTION_LAWS])
    expect(enumOf(field(SettingsInputSchema, 'sfrCalibration'))).toEqual([...SFR_CALIBRATIONS])
  })

  it('classes: list filters and the result, per diagram', () => {
    const filter: Record<string, string> = { overall: 'class', nii: 'classNii', sii: 'classSii', oi: 'classOi', whan: 'classWhan' }
    for (const d of CLASS_DIAGRAMS) {
      expect(enumOf(field(GalaxyFilterSchema, filter[d]))).toEqual([...DIAGRAM_CLASSES[d]])
      expect(enumOf(field(GalaxyResultSchema, 'classes', d))).toEqual([...DIAGRAM_CLASSES[d]])
      const probabilities = defOf(unwrap(field(GalaxyResultSchema, 'classes', 'classProbabilities', d)))
      expect(enumOf(probabilities.keyType!)).toEqual([...DIAGRAM_CLASSES[d]])
    }
    expect(enumOf(field(GalaxyResultSchema, 'classes', 'niiSubtype'))).toEqual([...NII_SUBTYPES])
  })

  it('ratios, limits, calibrations, IMFs and density flags of the result', () => {
    expect(keysOf(field(GalaxyResultSchema, 'ratioErrors'))).toEqual([...RATIO_KEYS])
    expect(keysOf(field(GalaxyResultSchema, 'ratios')).slice(0, RATIO_KEYS.length)).toEqual([...RATIO_KEYS])
    expect(keysOf(field(GalaxyResultSchema, 'ratioLimits'))).toEqual([...RATIO_KEYS])
    for (const k of RATIO_KEYS) expect(enumOf(field(GalaxyResultSchema, 'ratioLimits', k))).toEqual([...LIMIT_KINDS])
    expect(keysOf(field(GalaxyResultSchema, 'metallicity')).filter((k) => !/(Error|Percentiles)$/.test(k) && k !== 'flags')).toEqual([...METALLICITY_KEYS])
    expect(enumOf(field(GalaxyResultSchema, 'sfr', 'imf'))).toEqual([...IMFS])
    expect(keysOf(field(GalaxyResultSchema, 'density'))).toEqual([...DENSITY_DOUBLETS])
    expect(enumOf(field(GalaxyResultSchema, 'density', 'sii', 'flag'))).toEqual([...DENSITY_LIMIT_FLAGS])
    expect(keysOf(field(GalaxyResultSchema, 'temperature'))).toEqual([...TEMPERATURE_IONS])
    expect(enumOf(field(GalaxyResultSchema, 'extinction', 'source'))).toEqual([...BALMER_DECREMENT_KEYS])
    // the [N II] diagram's nearest curve is one of its two star-forming boundaries (shared/science/README.md §2.2)
    expect(enumOf(field(GalaxyResultSchema, 'distances', 'nii', 'nearest')).every((k) => DEMARCATION_CURVE_LIST.some((c) => c.key === k))).toBe(true)
  })

  it('the science modules keyed by the same names', () => {
    expect(FLOAT_COLUMNS.filter((c) => c.startsWith('ratio:')).map((c) => c.slice('ratio:'.length))).toEqual([...RATIO_KEYS])
    expect(METALLICITY_CALIBRATIONS.map((c) => c.key)).toEqual([...METALLICITY_KEYS])
    expect(Object.keys(EXTINCTION_RANGE_ANGSTROM)).toEqual([...EXTINCTION_LAWS])
    expect(SFR_CALIBRATION_LIST.every((c) => (IMFS as readonly string[]).includes(c.imf))).toBe(true)
    // every plotted demarcation curve is a vocabulary curve, labelled with its paper
    for (const c of demarcationCurves()) expect(c.label).toBe(curveLabel(c.key))
    expect(new Set(demarcationCurves().map((c) => c.key))).toEqual(new Set(DEMARCATION_CURVE_LIST.map((c) => c.key)))
  })
})

describe('names that stored data and the API depend on', () => {
  it('keep their keys and codes (public API, openapi/openapi.json)', () => {
    // stored class codes are positions in these lists (database columns, the columnar diagram endpoint)
    expect(DIAGRAM_CLASSES).toEqual({
      overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
      nii: ['star-forming', 'composite', 'agn', 'unclassified'],
      sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
      oi: ['star-forming', 'seyfert', 'liner', 'unclassified'],
      whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
    })
    expect(CLASS_KEYS).toEqual(['unclassified', 'star-forming', 'composite', 'agn', 'seyfert', 'liner', 'ambiguous', 'strong-agn', 'weak-agn', 'retired', 'passive'])
    expect(EXTINCTION_LAWS).toEqual(['ccm89', 'odonnell94', 'calzetti00', 'fitzpatrick99'])
    expect(RATIO_KEYS).toEqual(['niiHa', 'oiiiHb', 'siiHa', 'oiHa', 'siiDoublet', 'oiiDoublet'])
    expect(METALLICITY_KEYS).toEqual(['n2Pp04', 'n2Pp04Cubic', 'o3n2Pp04', 'n2M13', 'o3n2M13', 'n2s2haD16'])
    expect(SFR_CALIBRATIONS).toEqual(['kennicutt98', 'kennicuttEvans12'])
  })
})

describe('every entry has what its consumers show', () => {
  const HEX = /^#[0-9A-F]{6}$/

  it('every class code of every diagram has a label and a colour', () => {
    for (const c of CLASSES) {
      expect(c.label).not.toBe('')
      expect(c.colour).toMatch(HEX)
      expect(c.textColour).toMatch(HEX)
      expect(className(CLASS_CODE[c.key])).toBe(c.key)
    }
    for (const d of CLASS_DIAGRAMS) {
      const names = DIAGRAM_CLASSES[d]
      expect(names[names.length - 1]).toBe('unclassified')
      names.forEach((name, code) => {
        expect(classAt(d, code)).toBe(name)
        expect(classCode(d, name)).toBe(code)
        expect(classLabelAt(d, code)).toBe(CLASSES.find((c) => c.key === name)!.label)
        expect(classColour(name)).toMatch(HEX)
      })
      expect(classCode(d, 'quasar')).toBe(names.length - 1)
      expect(DIAGRAM_LABELS[d]).not.toBe('')
    }
    expect(classLabel(null)).toBe('—')
    expect(classLabel('quasar')).toBe('quasar')
  })

  it('lines, ratios, laws and calibrations have labels', () => {
    for (const l of LINES) expect(lineLabel(l.id)).toBe(l.label)
    for (const r of RATIOS) expect(ratioLabel(r.key)).toBe(r.label)
    for (const l of EXTINCTION_LAW_LIST) expect(extinctionLawLabel(l.key)).toBe(l.label)
    for (const k of [...METALLICITY_KEYS, ...SFR_CALIBRATIONS]) expect(calibrationLabel(k)).not.toBe(k)
    for (const k of [...DENSITY_DOUBLETS, ...TEMPERATURE_IONS]) expect(ionLabel(k)).toMatch(/^\[[A-Z][a-z]? I+\]$/)
    expect(lineLabel('hepsilon')).toBe('hepsilon')
    // IVOA UCD1+ words: em.line or one of its narrower words (the list from memory, shared/science/README.md §12)
    for (const l of LINES) expect(lineUcd(l.id)).toMatch(/^em\.line(\.[A-Za-z]+)?$/)
    for (const r of RATIOS) expect(ratioDefinition(r.key)).not.toBe('')
    for (const d of BALMER_DECREMENTS) expect(balmerDecrementLabel(d.key)).toBe(d.label)
    for (const c of DEMARCATION_CURVE_LIST) expect([curveLabel(c.key), curveName(c.key), curveTag(c.key)]).toEqual([c.label, c.name, c.tag])
    for (const d of CLASS_DIAGRAMS) expect(DIAGRAM_LABELS[d]).toContain(diagramShortLabel(d))
  })
})

describe('flags', () => {
  const FALLBACK = /^Note from the analysis/

  it('every kernel flag, line limit and ratio limit has a caution text', () => {
    for (const f of ROW_FLAGS) {
      const c = describeFlag(f)
      expect(c.text, f).not.toMatch(FALLBACK)
      expect(['caution', 'info']).toContain(c.severity)
    }
    for (const id of LINE_IDS) expect(describeFlag(belowMinSnrFlag(id)).text).toContain(lineLabel(id))
    for (const k of RATIO_KEYS) for (const kind of LIMIT_KINDS) expect(describeFlag(ratioLimitFlag(k, kind)).text).toContain(`${ratioLabel(k)} is ${kind === 'upper' ? 'an upper' : 'a lower'} limit`)
    for (const d of DIAGRAMS) expect(describeFlag(`missing-line:${d}`).text).toContain(DIAGRAM_LABELS[d])
    for (const k of METALLICITY_KEYS) expect(describeFlag(`${k}-out-of-range`).text).toContain(calibrationLabel(k))
    // every family is reached by some kernel flag or named flag builder
    const families = new Set(ROW_FLAGS.map((f) => f.split(':')[0]))
    const spectrumOnly = new Set<string>(SPECTRUM_FLAG_FAMILIES)
    for (const name of Object.keys(FLAG_FAMILIES)) if (name !== 'below-min-snr' && name !== 'ratio-limit' && !spectrumOnly.has(name)) expect(families, name).toContain(name)
  })

  it('caution texts quote the numbers the science modules use', () => {
    // the texts are built from the constants; a changed constant changes the words with it
    const te = describeFlag('te-out-of-range:oiii').text
    expect(te).toContain(`${numberInWords(TEMPERATURE_MIN_K)} and ${numberInWords(TEMPERATURE_MAX_K)} K`)
    expect(describeFlag('te-density-assumed:nii').text).toContain(`${numberInWords(ASSUMED_DENSITY_CM3)} cm⁻³`)
    expect(describeFlag('low-density-limit:sii').text).toContain(`${numberInWords(DENSITY_FIT_MIN_CM3)} cm⁻³`)
    expect(describeFlag('high-density-limit:oii').text).toContain(`${numberInWords(DENSITY_FIT_MAX_CM3)} cm⁻³`)
    expect(describeFlag('whan-passive-needs-ew-nii').text).toContain(`${numberInWords(WHAN.passiveMaxEw)} Å`)
    // and write them as the pages always did
    expect(te).toContain('between 5 000 and 30 000 K')
    expect(describeFlag('high-density-limit:sii').text).toContain('10⁵ cm⁻³')
  })

  it('explains fixed flags in plain words', () => {
    expect(describeFlag('balmer-below-intrinsic').text).toMatch(/set to 0/)
    expect(describeFlag('sfr-not-star-forming').severity).toBe('caution')
    expect(describeFlag('overall-without-oi').text).toMatch(/\[O I\] was not available/)
  })

  it('names the line, diagram, ratio or doublet a flag carries', () => {
    expect(describeFlag('below-min-snr:oiii_5007').text).toMatch(/\[O III\] 5007/)
    expect(describeFlag('limit-not-decisive:sii').text).toMatch(/\[S II\] diagram/)
    expect(describeFlag('ratio-limit:niiHa:upper').text).toMatch(/log \[N II\]\/Hα is an upper limit/)
    expect(describeFlag('ratio-limit:oiiiHb:lower').text).toMatch(/a lower limit/)
    expect(describeFlag('low-density-limit:oii').text).toMatch(/\[O II\]/)
    expect(describeFlag('low-density-limit').text).toMatch(/\[S II\]/)
    expect(describeFlag('te-density-assumed:oiii').text).toMatch(/\[O III\] temperature/)
  })

  it('reads calibration ranges by their key, known or not', () => {
    expect(describeFlag('n2Pp04-out-of-range').text).toMatch(/Pettini & Pagel 2004.*outside/)
    expect(describeFlag('r23New-out-of-range').text).toMatch(/^The r23New calibration was used outside/)
  })

  it('keeps unknown flags visible in words and drops repeats', () => {
    const c = describeFlag('brand-new-flag:xyz')
    expect(c.text).toBe('Note from the analysis: brand new flag xyz.')
    expect(c.flag).toBe('brand-new-flag:xyz')
    expect(describeFlags(['curve-crossing-region', 'curve-crossing-region'])).toHaveLength(1)
    expect(describeFlags(undefined)).toEqual([])
  })
})

describe('flags of spectrum fits', () => {
  it('every flag a fit sets has a caution text of its own, naming the line (shared/science/README.md §13, §14)', async () => {
    const { fitSpectrum, broadLineExample, sodiumExample, twoComponentExample } = await import('../../../shared/spectra/index.ts')
    const { describeFlag } = await import('../../../shared/vocabulary/flags.ts')
    const flags = new Set<string>()
    for (const example of [broadLineExample(1), sodiumExample(2), twoComponentExample(3)]) {
      const r = fitSpectrum(example.spectrum, { broadHalpha: 'auto', components: 'auto' })
      for (const f of r.flags) flags.add(f)
      for (const f of (r.absorption.nad as { flags?: string[] } | undefined)?.flags ?? []) flags.add(f)
    }
    expect(flags.size).toBeGreaterThan(0)
    for (const f of flags) expect(describeFlag(f).text, f).not.toMatch(/^Note from the analysis/)
    expect(describeFlag('not-covered:oi_6300').text).toContain('[O I] 6300')
    expect(describeFlag('not-covered:halpha_broad').text).toContain('±3 000 km/s')
    expect(describeFlag('blended:hei_5876').text).toContain('He I 5876')
  })
})
