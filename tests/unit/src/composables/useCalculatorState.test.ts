import { describe, expect, it } from 'vitest'
import { buildInput, exampleState, queryFromState, stateFromQuery } from '../../../../src/composables/useCalculatorState'

describe('calculator link state', () => {
  it('round-trips through the query string', () => {
    const s = exampleState()
    s.lines.oiii_5007 = { flux: '9', error: '', limit: true }
    s.law = 'calzetti00'
    const q = queryFromState(s)
    expect(q.halpha).toBe('300,6')
    expect(q.oiii_5007).toBe('<9')
    expect(q.law).toBe('calzetti00')
    const back = stateFromQuery(q as Record<string, string>)
    expect(back).toEqual(s)
  })

  it('gives null without any line, so the page can show its example', () => {
    expect(stateFromQuery({ z: '0.1' })).toBeNull()
  })

  it('builds the API galaxy shape and reports fields that are not numbers yet', () => {
    const s = exampleState()
    s.lines.oiii_5007 = { flux: '9', error: '', limit: true }
    s.lines.oi_6300 = { flux: 'abc', error: '1', limit: false }
    s.lines.nii_6584 = { flux: '75', error: '', limit: false }
    const { galaxy, settings, invalid } = buildInput(s)
    expect(galaxy).toMatchObject({ id: 'LNS-example', redshift: 0.05, ew: { halpha: 24.5 } })
    const lines = galaxy.lines as Record<string, unknown>
    expect(lines.halpha).toEqual({ flux: 300, error: 6 })
    expect(lines.oiii_5007).toEqual({ upperLimit: 9 })
    expect(lines.oi_6300).toBeUndefined()
    expect(lines.nii_6584).toBeUndefined()
    expect(invalid['oi_6300.flux']).toBe('not a number')
    expect(invalid['nii_6584.error']).toBe('an error is needed')
    expect(settings).toEqual({ extinctionLaw: 'ccm89' })
  })
})
