import { describe, expect, it } from 'vitest'
import { isCleanText, isWellFormed, positiveInt4, textBlock, textLine } from '../../../../shared/schemas/text.ts'
import { GalaxyListQuerySchema } from '../../../../shared/schemas/query.schema.ts'

describe('text rules (shared/schemas/text.ts)', () => {
  it('a single line refuses C0, DEL and C1 controls, line breaks and tabs; keeps other Unicode', () => {
    for (const bad of ['a\u0000b', 'a\nb', 'a\tb', 'a\u001bb', 'a\u007fb', 'a\u0085b', 'a\u009fb']) expect(textLine().safeParse(bad).success, JSON.stringify(bad)).toBe(false)
    for (const ok of ['LNS-0000001', 'NGC 1068', 'Überraschung', '银河', '😀 nucleus', '']) expect(textLine().safeParse(ok).success, ok).toBe(true)
  })

  it('a block of text may hold \\n, \\r and \\t but no other control', () => {
    expect(textBlock().safeParse('line 1\r\nline 2\tend\n').success).toBe(true)
    for (const bad of ['a\u0000', 'a\u000b', 'a\u000c', 'a\u001b', 'a\u0085']) expect(textBlock().safeParse(bad).success, JSON.stringify(bad)).toBe(false)
  })

  it('unpaired surrogates are not Unicode text; pairs are', () => {
    expect(isWellFormed('\ud83d\ude00')).toBe(true)
    for (const bad of ['\ud800', 'a\udc00', '\udc00\ud800', 'x\ud83d']) {
      expect(isWellFormed(bad), JSON.stringify(bad)).toBe(false)
      expect(textLine().safeParse(bad).error?.issues[0].message).toBe('must be valid Unicode text (it holds an unpaired surrogate)')
    }
    expect(isCleanText('ok'), 'ok').toBe(true)
    expect(isCleanText('a\nb', true)).toBe(true)
    expect(isCleanText('a\nb')).toBe(false)
  })

  it('integers for integer columns stop at 2³¹ − 1', () => {
    expect(positiveInt4().parse('2147483647')).toBe(2147483647)
    for (const bad of ['2147483648', '0', '-1', '1.5', '', 'NaN', '1e20']) expect(positiveInt4().safeParse(bad).success, bad).toBe(false)
  })
})

describe('galaxy list query: range', () => {
  const range = (r: string) => GalaxyListQuerySchema.safeParse({ range: r })
  it('is exactly field:min:max with finite decimals, either bound empty', () => {
    expect(range('redshift:0:1').data?.range).toEqual([{ field: 'redshift', min: 0, max: 1 }])
    expect(range('ebv::0.5').data?.range).toEqual([{ field: 'ebv', min: null, max: 0.5 }])
    expect(range('sfrHalpha:1e38:').data?.range).toEqual([{ field: 'sfrHalpha', min: 1e38, max: null }])
    for (const bad of ['redshift:0:1:2:3', 'redshift:0', 'redshift', 'redshift: :1', 'redshift:0x10:', 'redshift:1e400:', 'redshift:NaN:', 'mass:0:1']) {
      const r = range(bad)
      expect(r.success, bad).toBe(false)
      expect(r.error?.issues[0].path, bad).toEqual(['range', 0])
    }
  })
})
