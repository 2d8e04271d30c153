import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string

beforeAll(async () => {
  t = await startTestApp({}, { jobs: true }) // the real pg-boss queue and worker
  owner = await signedInAgent(t.app, 'rev-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'revisions' })).body.id
  await owner.agent.post(`/api/v1/projects/${projectId}/galaxies/batch`).set('X-CSRF-Token', owner.csrf)
    .send({ galaxies: Array.from({ length: 30 }, (_, i) => galaxy(`R-${i}`)) })
})
afterAll(async () => { await t.close() })

describe('assumptions revisions', () => {
  it('a change makes revision 2, recomputes every galaxy in the background, and keeps revision 1 readable', async () => {
    const before = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies/R-0`)
    const res = await owner.agent.put(`/api/v1/projects/${projectId}/assumptions`).set('X-CSRF-Token', owner.csrf)
      .send({ settings: { extinctionLaw: 'calzetti00' }, note: 'starburst-like dust' })
    expect(res.status).toBe(201)
    expect(res.body.revision).toMatchObject({ revision: 2, note: 'starburst-like dust', settings: { extinctionLaw: 'calzetti00', rv: 4.05 } })
    let job = res.body.job
    for (let i = 0; i < 300 && job.status !== 'done'; i++) {
      await new Promise((ok) => setTimeout(ok, 100))
      job = (await owner.agent.get(`/api/v1/projects/${projectId}/jobs/${job.id}`)).body
    }
    expect(job).toMatchObject({ status: 'done', total: 30, done: 30 })
    const after = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies/R-0`)
    expect(after.body.revision).toBe(2)
    expect(after.body.revisions.map((r: { revision: number }) => r.revision)).toEqual([1, 2])
    // a different law gives a different E(B−V) from the same decrement
    expect(after.body.results.extinction.ebv).not.toBeCloseTo(before.body.results.extinction.ebv, 3)
    const old = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies/R-0/results/1`)
    expect(old.body.results.extinction.ebv).toBeCloseTo(before.body.results.extinction.ebv, 10)
    const list = await owner.agent.get(`/api/v1/projects/${projectId}/assumptions`)
    expect(list.body.revisions.map((r: { revision: number }) => r.revision)).toEqual([2, 1])
  })

  it('invalid settings answer 422 with the settings path; viewers may not change them', async () => {
    const bad = await owner.agent.put(`/api/v1/projects/${projectId}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: { extinctionLaw: 'smc' } })
    expect(bad.status).toBe(422)
    expect(bad.body.errors[0].path).toBe('/settings/extinctionLaw')
  })
})
