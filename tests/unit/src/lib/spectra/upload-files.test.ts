import { describe, expect, it } from 'vitest'
import { errorsByFile, fileProblem, fmtBytes, mergeFiles, MAX_SPECTRUM_FILE_BYTES } from '../../../../../src/lib/spectra/upload-files'

describe('spectrum upload files', () => {
  it('takes FITS, text tables and zips up to 64 MB', () => {
    for (const name of ['a.fits', 'b.FIT', 'c.fts', 'd.csv', 'e.txt', 'f.dat', 'g.tsv', 'h.ascii', 'all.zip']) expect(fileProblem({ name, size: 10 })).toBeNull()
    expect(fileProblem({ name: 'notes.pdf', size: 10 })).toMatch(/^not a spectrum file/)
    expect(fileProblem({ name: 'noext', size: 10 })).toMatch(/^not a spectrum file/)
    expect(fileProblem({ name: 'big.fits', size: MAX_SPECTRUM_FILE_BYTES + 1 })).toBe('larger than 64 MB')
    expect(fileProblem({ name: 'empty.csv', size: 0 })).toBe('the file is empty')
  })

  it('keeps one file per name, the last chosen', () => {
    const merged = mergeFiles([{ name: 'a', v: 1 }, { name: 'b', v: 1 }], [{ name: 'a', v: 2 }, { name: 'c', v: 1 }])
    expect(merged).toEqual([{ name: 'a', v: 2 }, { name: 'b', v: 1 }, { name: 'c', v: 1 }])
  })

  it('groups a refused upload\'s errors by file', () => {
    const m = errorsByFile([
      { path: '/files/0', message: 'no wavelength column' },
      { path: '/files/2/spectra/0/wavelength/12', message: 'must be ascending' },
      { path: '/defaults/redshift', message: 'must be ≥ 0' },
    ])
    expect(m.get(0)).toEqual(['no wavelength column'])
    expect(m.get(2)).toEqual(['spectra/0/wavelength/12: must be ascending'])
    expect(m.get(-1)).toEqual(['must be ≥ 0'])
  })

  it('writes sizes', () => {
    expect(fmtBytes(512)).toBe('512 B')
    expect(fmtBytes(840 * 1024)).toBe('840 kB')
    expect(fmtBytes(12.34 * 1024 * 1024)).toBe('12.3 MB')
  })
})
