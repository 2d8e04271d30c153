import { describe, expect, it } from 'vitest'
import { describeFlag, describeFlags } from '../../../../src/utils/flags'

describe('describeFlag', () => {
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

  it('reads calibration ranges by their key', () => {
    expect(describeFlag('n2Pp04-out-of-range').text).toMatch(/Pettini & Pagel 2004.*outside/)
  })

  it('keeps unknown flags visible in words', () => {
    const c = describeFlag('brand-new-flag:xyz')
    expect(c.text).toBe('Note from the analysis: brand new flag xyz.')
    expect(c.flag).toBe('brand-new-flag:xyz')
  })

  it('drops repeats', () => {
    expect(describeFlags(['curve-crossing-region', 'curve-crossing-region'])).toHaveLength(1)
    expect(describeFlags(undefined)).toEqual([])
  })
})
