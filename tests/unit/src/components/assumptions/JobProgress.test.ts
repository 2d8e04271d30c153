import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import JobProgress from '../../../../../src/components/assumptions/JobProgress.vue'
import type { Job } from '../../../../../src/api/types'

const base: Job = {
  id: 'j', kind: 'recompute', status: 'running', revision: 2, total: 200_000, done: 120_000, error: null,
  createdAt: '2026-12-01T10:00:00Z', finishedAt: null, intakeId: null, uploadId: null, heartbeatAt: null, resumedAt: null, resumeCount: 0, resumedFrom: null,
}
// fmtInt groups digits with a thin space (120 000)
const text = (job: Job) => mount(JobProgress, { props: { job }, global: { plugins: [createVuetify()] } }).text().replace(/\u2009/g, ',')

describe('JobProgress', () => {
  it('says how far a recompute has come', () => {
    expect(text(base)).toMatch(/Recomputing: 120,000 of 200,000 galaxies\s*60 %/)
  })

  it('says that a job was resumed after a restart, and from where', () => {
    const t = text({ ...base, resumedAt: '2026-12-01T10:05:00Z', resumeCount: 1, resumedFrom: 90_000 })
    expect(t).toMatch(/Resumed after a restart \(.+\) at 90,000 of 200,000: it continued from there\./)
  })

  it('an intake job counts rows, and a resumed one says it began again', () => {
    const job: Job = { ...base, kind: 'intake', done: 4_000, total: 7_000 }
    expect(text(job)).toMatch(/Storing rows: 4,000 of 7,000 checked and written/)
    expect(text({ ...job, resumedAt: '2026-12-01T10:05:00Z', resumeCount: 1, resumedFrom: 0 })).toMatch(/done all at once, so it began again/)
    expect(text({ ...job, status: 'done', done: 7_000, finishedAt: '2026-12-01T10:06:00Z' })).toMatch(/Done: 7,000 rows stored/)
  })

  it('a fit job counts spectra and resumes from its last chunk', () => {
    const job: Job = { ...base, kind: 'fit', done: 40, total: 120 }
    expect(text(job)).toMatch(/Fitting spectra: 40 of 120 fitted\s*33 %/)
    expect(text({ ...job, resumedAt: '2026-12-01T10:05:00Z', resumeCount: 1, resumedFrom: 20 })).toMatch(/at 20 of 120: it continued from there/)
    expect(text({ ...job, status: 'done', done: 120, finishedAt: '2026-12-01T10:06:00Z' })).toMatch(/Done: 120 spectra fitted/)
  })

  it('says nothing of a restart for a job that ran through', () => {
    expect(text(base)).not.toMatch(/Resumed/)
  })
})
