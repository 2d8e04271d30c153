import { describe, expect, it } from 'vitest'
import { fileProblem, fmtBytes, isRefused, MAX_SPECTRA_PER_UPLOAD, mergeFiles, refusedFiles, SPECTRUM_EXTENSIONS } from '../../../../../src/lib/spectra/upload-files'
import { SPECTRA_PER_UPLOAD_MAX, SPECTRUM_FILE_EXTENSIONS } from '../../../../../shared/schemas/project-spectra.schema.ts'

describe('spectrum upload files', () => {
  it('takes what the server reads: its spectrum files and zips of them', () => {
    expect([...SPECTRUM_EXTENSIONS]).toEqual([...SPECTRUM_FILE_EXTENSIONS, '.zip'])
    expect(MAX_SPECTRA_PER_UPLOAD).toBe(SPECTRA_PER_UPLOAD_MAX)
    for (const name of ['a.fits', 'b.FIT', 'c.fts', 'd.csv', 'e.txt', 'f.dat', 'g.tsv', 'h.ascii', 'all.zip']) expect(fileProblem({ name, size: 10 })).toBeNull()
    expect(fileProblem({ name: 'notes.pdf', size: 10 })).toMatch(/^not a spectrum file/)
    expect(fileProblem({ name: 'noext', size: 10 })).toMatch(/^not a spectrum file/)
    // the size limit is the server's setting (413 above it)
    expect(fileProblem({ name: 'big.fits', size: 200 * 1024 * 1024 })).toBeNull()
    expect(fileProblem({ name: 'empty.csv', size: 0 })).toBe('the file is empty')
  })

  it('keeps one file per name, the last chosen', () => {
    const merged = mergeFiles([{ name: 'a', v: 1 }, { name: 'b', v: 1 }], [{ name: 'a', v: 2 }, { name: 'c', v: 1 }])
    expect(merged).toEqual([{ name: 'a', v: 2 }, { name: 'b', v: 1 }, { name: 'c', v: 1 }])
  })

  it('reads which files a refused upload names, zip entries by their path in the zip', () => {
    const errors = [
      { path: '/files/0', message: 'a.fits: not a FITS file: the first card is not SIMPLE' },
      { path: '/files/2/spectra/0/redshift', message: 'spectra.zip/b.csv: no redshift for b: the file has none (Z or REDSHIFT)' },
      { path: '/files/2/spectra/1/id', message: 'spectra.zip/b.csv: galaxy ID "x": too long' },
      { path: '/defaults', message: 'must be JSON text' },
    ]
    const r = refusedFiles(errors)
    expect(r).toEqual([
      { index: -1, name: null, messages: ['must be JSON text'] },
      { index: 0, name: 'a.fits', messages: ['not a FITS file: the first card is not SIMPLE'] },
      { index: 2, name: 'spectra.zip/b.csv', messages: ['no redshift for b: the file has none (Z or REDSHIFT)', 'galaxy ID "x": too long'] },
    ])
    expect(isRefused('a.fits', r)).toBe(true)
    expect(isRefused('spectra.zip', r)).toBe(true)
    expect(isRefused('c.csv', r)).toBe(false)
    // a message without the file name stays whole
    expect(refusedFiles([{ path: '/files/1', message: 'line 3: expected numbers' }])).toEqual([{ index: 1, name: null, messages: ['line 3: expected numbers'] }])
  })

  it('writes sizes', () => {
    expect(fmtBytes(512)).toBe('512 B')
    expect(fmtBytes(840 * 1024)).toBe('840 kB')
    expect(fmtBytes(12.34 * 1024 * 1024)).toBe('12.3 MB')
  })
})
