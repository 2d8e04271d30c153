import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy, seyfert } from '../helpers/fixtures.ts'

/**
 * CSV intake over galaxies a project already has: `#` comment lines, rows without a measurement,
 * `onExisting` (skip by default, replace, merge) with the count before the commit, earlier records
 * kept and retrievable, and undoing an intake.
 */
let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string

beforeAll(async () => {
  t = await startTestApp({ INTAKE_MAX_ROWS: '5000' })
  owner = await signedInAgent(t.app, 'existing-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'existing' })).body.id
})
afterAll(async () => { await t.close() })

const P = () => `/api/v1/projects/${projectId}`
const post = (path: string, body?: object) => owner.agent.post(P() + path).set('X-CSRF-Token', owner.csrf).send(body)
const get = (path: string) => owner.agent.get(P() + path)
/** The exact bytes of an API answer. */
const raw = async (path: string, accept = 'application/json') => {
  const res = await owner.agent.get(P() + path).set('Accept', accept).buffer(true).parse((r, cb) => { const parts: Buffer[] = []; r.on('data', (c: Buffer) => parts.push(c)); r.on('end', () => cb(null, Buffer.concat(parts))) })
  expect(res.status).toBe(200)
  return (res.body as Buffer).toString('base64')
}
const upload = (body: string, name = 'table.csv') =>
  owner.agent.post(`${P()}/intakes/csv`).set('X-CSRF-Token', owner.csrf).attach('file', Buffer.from(body), { filename: name, contentType: 'text/csv' })
const count = async () => Number((await t.db.$client.query('select count(*) from galaxies where project_id = $1', [projectId])).rows[0].count)

const HEADER = 'galaxy_id,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err,nii_6584_flux,nii_6584_err,oiii_5007_flux,oiii_5007_err'

describe('a CSV opening with # comments, over galaxies ingested a minute earlier', () => {
  const ids = Array.from({ length: 33 }, (_, i) => `CMT-${String(i + 1).padStart(3, '0')}`)
  const answers = async () => ({
    details: await Promise.all(ids.map((id) => raw(`/galaxies/${id}`))),
    list: await raw('/galaxies?limit=100'),
    diagram: await raw('/diagram'),
    binary: await raw('/diagram', 'application/vnd.ratiograph.diagram-columns'),
  })

  it('reads the real header, and its commit leaves every existing galaxy byte for byte as it was', async () => {
    const first = await post('/galaxies/batch', { galaxies: ids.map((id, i) => (i % 3 ? galaxy(id, { redshift: 0.01 * (i + 1) }) : seyfert(id))) })
    expect(first.status).toBe(200)
    expect(first.body.inserted).toBe(33)
    // ingested "a minute earlier"
    await t.db.$client.query("update galaxies set updated_at = updated_at - interval '1 minute', created_at = created_at - interval '1 minute' where project_id = $1", [projectId])
    const before = await answers()

    const csv = [
      '# Survey export 2026-11-30, fluxes in 1e-17 erg/s/cm2',
      '# columns: id, redshift, then flux and error per line',
      '  # an indented comment, "with an unbalanced quote',
      HEADER,
      ...ids.map((id, i) => `${id},0.2,${100 + i},5,40,2,20,2,${i === 5 ? '' : '30,2'}${i === 5 ? ',' : ''}`),
    ].join('\n')
    const staged = await upload(csv, 'commented.csv')
    expect(staged.status, JSON.stringify(staged.body)).toBe(201)
    expect(staged.body.headers).toEqual(HEADER.split(','))
    expect(staged.body.rowCount).toBe(33)
    expect(staged.body.commentLines).toBe(3)
    const m = staged.body.suggestedMapping
    expect(m.id).toBe('galaxy_id')
    expect(Object.keys(m.lines).sort()).toEqual(['halpha', 'hbeta', 'nii_6584', 'oiii_5007'])

    const id = staged.body.intake.id
    const report = await post(`/intakes/${id}/validate`, { mapping: m, fluxUnit: 1e-17 })
    expect(report.status).toBe(200)
    expect(report.body).toMatchObject({ rowsTotal: 33, rowsValid: 33, problemCount: 0, existing: 33, onExisting: 'skip' })

    // no onExisting: skip, the default for CSV: the stored galaxies are not touched
    const commit = await post(`/intakes/${id}/commit`, { mapping: m, fluxUnit: 1e-17 })
    expect(commit.status, JSON.stringify(commit.body)).toBe(200)
    expect(commit.body).toMatchObject({ inserted: 0, replaced: 0, merged: 0, skipped: 33, intake: { status: 'committed', rowsAccepted: 33 } })
    expect(await answers()).toEqual(before)
    expect((await t.db.$client.query('select count(*)::int as n from galaxy_versions')).rows[0].n).toBe(0)
  })

  it('a comment line between rows is skipped; a # inside a quoted field or a data cell is data', async () => {
    const csv = [HEADER + ',note', 'HASH-1,0.1,300,6,80,3,60,3,50,3,"a # in quotes"', '# between rows', '   # indented, between rows', 'HASH-2,0.1,300,6,80,3,60,3,50,3,#12'].join('\n')
    const staged = await upload(csv)
    expect(staged.body.rowCount).toBe(2)
    expect(staged.body.commentLines).toBe(2)
    expect(staged.body.previewRows.map((r: string[]) => r.at(-1))).toEqual(['a # in quotes', '#12'])
    const report = await post(`/intakes/${staged.body.intake.id}/validate`, { mapping: staged.body.suggestedMapping })
    expect(report.body).toMatchObject({ rowsTotal: 2, rowsValid: 2, problems: [] })
  })

  it('the bug itself: a comment taken for the header maps no line, and that is refused, not committed', async () => {
    // what the earlier intake saw: the first comment as the header, no line column
    const staged = await upload(['id,note', 'X-1,"# looks like a comment"', 'X-2,plain'].join('\n'))
    expect(staged.status).toBe(201)
    const res = await post(`/intakes/${staged.body.intake.id}/commit`, { mapping: { id: 'id' } })
    expect(res.status).toBe(422)
    expect(res.body.errors).toEqual([{ path: '/mapping/lines', message: expect.stringContaining('map at least one line') }])
    const validate = await post(`/intakes/${staged.body.intake.id}/validate`, { mapping: { id: 'id' } })
    expect(validate.status).toBe(422)
  })

  it('a row with no measurement is invalid, with its path; nothing is stored', async () => {
    const before = await count()
    const csv = [HEADER, 'EMPTY-1,0.1,300,6,80,3,60,3,50,3', 'EMPTY-2,0.1,,,,,,,,', 'EMPTY-3,0.2,300,6,80,3,60,3,50,3'].join('\n')
    const staged = await upload(csv)
    const opts = { mapping: staged.body.suggestedMapping }
    const report = await post(`/intakes/${staged.body.intake.id}/validate`, opts)
    expect(report.body).toMatchObject({ rowsTotal: 3, rowsValid: 2, problemCount: 1 })
    expect(report.body.problems).toEqual([{ row: 3, column: null, field: 'lines', message: expect.stringContaining('no line measurement') }])
    const res = await post(`/intakes/${staged.body.intake.id}/commit`, opts)
    expect(res.status).toBe(422)
    expect(res.body.errors).toEqual([{ path: '/rows/3/lines', message: expect.stringMatching(/^row 3: no line measurement/) }])
    expect(await count()).toBe(before)
    // the intake is staged again, with the problems in its report
    const shown = await get(`/intakes/${staged.body.intake.id}`)
    expect(shown.body).toMatchObject({ status: 'staged', report: { problemCount: 1 } })
  })

  it('repeated IDs anywhere in the file are found (first row named), as are negative fluxes with their column', async () => {
    const rows = Array.from({ length: 4500 }, (_, i) => `DUP-${i},0.1,300,6,80,3,60,3,50,3`)
    rows[4200] = 'DUP-7,0.1,300,6,80,3,60,3,50,3' // a chunk later than its first
    rows[10] = 'DUP-10,0.1,300,6,-80,3,60,3,50,3'
    const staged = await upload([HEADER, ...rows].join('\n'))
    const report = await post(`/intakes/${staged.body.intake.id}/validate`, { mapping: staged.body.suggestedMapping })
    expect(report.body.problems).toEqual([
      { row: 12, column: 5, field: 'lines/hbeta/flux', message: expect.stringContaining('negative flux') },
      { row: 4202, column: 1, field: 'galaxy_id', message: 'duplicate galaxy id "DUP-7" (also in row 9)' },
    ])
    expect(report.body).toMatchObject({ rowsTotal: 4500, rowsValid: 4498 })
  })

  it('a file with more rows than INTAKE_MAX_ROWS is refused at upload with a clear 413', async () => {
    const rows = (n: number) => [HEADER, ...Array.from({ length: n }, (_, i) => `CAP-${i},0.1,300,6,80,3,60,3,50,3`)].join('\n')
    const over = await upload(rows(5001), 'cap.csv')
    expect(over.status).toBe(413)
    expect(over.type).toBe('application/problem+json')
    expect(over.body.detail).toBe('the file has more than 5,000 data rows, the most one intake takes; split it into files of at most 5,000 rows')
    expect(over.body.errors).toEqual([{ path: '/file', message: 'more than 5,000 rows' }])
    expect((await upload(rows(5000), 'cap.csv')).status).toBe(201)
  })
})

describe('onExisting: skip, replace, merge', () => {
  const stored = async (id: string) => (await get(`/galaxies/${id}`)).body

  it('counts the IDs the project has before the commit; each mode does what it says', async () => {
    await post('/galaxies/batch', { galaxies: [galaxy('OE-1'), galaxy('OE-2'), galaxy('OE-3')] })
    const csv = [
      'id,z,halpha_flux,halpha_err,oiii_5007_flux,oiii_5007_err',
      'OE-1,0.09,600,12,90,5', // exists
      'OE-2,0.09,600,12,90,5', // exists
      'OE-NEW,0.09,600,12,90,5',
    ].join('\n')
    const stage = async () => { const s = await upload(csv); return { id: s.body.intake.id as string, mapping: s.body.suggestedMapping } }

    const a = await stage()
    for (const mode of ['skip', 'replace', 'merge'] as const) {
      const r = await post(`/intakes/${a.id}/validate`, { mapping: a.mapping, fluxUnit: 1e-17, onExisting: mode })
      expect(r.body).toMatchObject({ rowsValid: 3, existing: 2, onExisting: mode })
    }
    const bad = await post(`/intakes/${a.id}/commit`, { mapping: a.mapping, onExisting: 'overwrite' })
    expect(bad.status).toBe(422)
    expect(bad.body.errors[0].path).toBe('/onExisting')

    // merge: the stored lines stay, the new ones are laid over them
    const before1 = await stored('OE-1')
    const merged = await post(`/intakes/${a.id}/commit`, { mapping: a.mapping, fluxUnit: 1e-17, onExisting: 'merge' })
    expect(merged.body).toMatchObject({ inserted: 1, updated: 2, merged: 2, replaced: 0, skipped: 0 })
    const after1 = await stored('OE-1')
    expect(after1.redshift).toBe(0.09)
    expect(after1.lines).toEqual({ ...before1.lines, halpha: { flux: 600, error: 12 }, oiii_5007: { flux: 90, error: 5 } })
    expect(after1.ew).toEqual(before1.ew)
    expect(after1.history.map((h: { change: string }) => h.change)).toEqual(['created', 'merged'])
    const v = await get('/galaxies/OE-1/versions')
    expect(v.body.items).toHaveLength(1)
    expect(v.body.items[0]).toMatchObject({ supersededBy: { intakeId: merged.body.intake.id, kind: 'csv' } })
    expect(v.body.items[0].record).toEqual({ id: 'OE-1', redshift: before1.redshift, fluxUnit: before1.fluxUnit, ra: before1.ra, dec: before1.dec, lines: before1.lines, ew: before1.ew, fwhm: before1.fwhm })
    expect((await stored('OE-3')).history).toHaveLength(1) // not in the file

    // replace: the file's record is all there is
    const b = await stage()
    const replaced = await post(`/intakes/${b.id}/commit`, { mapping: b.mapping, fluxUnit: 1e-17, onExisting: 'replace' })
    expect(replaced.body).toMatchObject({ inserted: 0, replaced: 3, merged: 0, skipped: 0 })
    expect((await stored('OE-1')).lines).toEqual({ halpha: { flux: 600, error: 12 }, oiii_5007: { flux: 90, error: 5 } })
    expect((await get('/galaxies/OE-1/versions')).body.items).toHaveLength(2)

    // skip (also the default): nothing the project has changes
    const c = await stage()
    const snapshot = await raw('/galaxies/OE-2')
    const skipped = await post(`/intakes/${c.id}/commit`, { mapping: c.mapping, fluxUnit: 1e-17 })
    expect(skipped.body).toMatchObject({ inserted: 0, replaced: 0, merged: 0, skipped: 3 })
    expect(await raw('/galaxies/OE-2')).toBe(snapshot)
  })

  it('merge in another flux unit keeps the physical fluxes of the stored lines', async () => {
    await post('/galaxies/batch', { galaxies: [galaxy('UNIT-1')] }) // fluxUnit 1e-17
    const s = await upload(['id,oiii_5007_flux,oiii_5007_err', 'UNIT-1,5,0.3'].join('\n'))
    const res = await post(`/intakes/${s.body.intake.id}/commit`, { mapping: s.body.suggestedMapping, fluxUnit: 1e-16, onExisting: 'merge' })
    expect(res.body.merged).toBe(1)
    const g = await stored('UNIT-1')
    expect(g.fluxUnit).toBe(1e-16)
    expect(g.lines.oiii_5007).toEqual({ flux: 5, error: 0.3 })
    expect(g.lines.halpha.flux * 1e-16).toBeCloseTo(300e-17, 30)
    expect(g.lines.halpha.error * 1e-16).toBeCloseTo(6e-17, 30)
  })

  it('the batch API keeps its upsert (replace) by default and takes onExisting=skip or merge', async () => {
    await post('/galaxies/batch', { galaxies: [galaxy('API-1')] })
    const replace = await post('/galaxies/batch', { galaxies: [galaxy('API-1', { redshift: 0.3, lines: { halpha: { flux: 1, error: 0.1 } } })] })
    expect(replace.body).toMatchObject({ inserted: 0, updated: 1, replaced: 1, skipped: 0 })
    expect((await stored('API-1')).lines).toEqual({ halpha: { flux: 1, error: 0.1 } })
    const skip = await post('/galaxies/batch?onExisting=skip', { galaxies: [galaxy('API-1'), galaxy('API-2')] })
    expect(skip.body).toMatchObject({ inserted: 1, updated: 0, skipped: 1 })
    expect((await stored('API-1')).redshift).toBe(0.3)
    // no fluxUnit in a merge: the stored one holds
    const merge = await post('/galaxies/batch?onExisting=merge', { galaxies: [{ id: 'API-1', lines: { hbeta: { flux: 0.4, error: 0.05 } } }] })
    expect(merge.body).toMatchObject({ merged: 1 })
    expect((await stored('API-1')).lines).toEqual({ halpha: { flux: 1, error: 0.1 }, hbeta: { flux: 0.4, error: 0.05 } })
    expect((await stored('API-1')).redshift).toBe(0.3)
    const wrong = await post('/galaxies/batch?onExisting=drop', { galaxies: [galaxy('API-3')] })
    expect(wrong.status).toBe(422)
    expect(wrong.body.errors[0].path).toBe('/onExisting')
    // the same Idempotency-Key with another onExisting is another request
    const k1 = await owner.agent.post(`${P()}/galaxies/batch`).set('X-CSRF-Token', owner.csrf).set('Idempotency-Key', 'oe-k').send({ galaxies: [galaxy('API-4')] })
    const k2 = await owner.agent.post(`${P()}/galaxies/batch?onExisting=skip`).set('X-CSRF-Token', owner.csrf).set('Idempotency-Key', 'oe-k').send({ galaxies: [galaxy('API-4')] })
    expect([k1.status, k2.status]).toEqual([200, 409])
  })
})

describe('undoing an intake', () => {
  /** A galaxy's answer without the fields a recompute renews (its time). */
  const record = async (id: string) => {
    const { computedAt: _c, revisions, ...rest } = (await get(`/galaxies/${id}`)).body
    return { ...rest, revisions: revisions.map(({ computedAt: _t, ...r }: { computedAt: string }) => r) }
  }

  it('restores exactly the records it replaced, removes the galaxies it created, recomputes, and is audit-logged', async () => {
    const ids = ['UN-1', 'UN-2', 'UN-3', 'UN-4']
    const first = await post('/galaxies/batch', { galaxies: [galaxy('UN-1'), seyfert('UN-2'), galaxy('UN-3', { redshift: 0.2, ra: 10, dec: -5 }), galaxy('UN-4')] })
    expect(first.status).toBe(200)
    const before = await Promise.all(ids.map(record))
    const diagramBefore = await raw('/diagram')
    const csv = ['id,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err,nii_6584_flux,nii_6584_err', 'UN-1,0.5,900,9,100,4,500,8', 'UN-2,0.5,900,9,100,4,20,2', 'UN-3,0.5,900,9,100,4,20,2', 'UN-NEW-1,0.5,900,9,100,4,20,2', 'UN-NEW-2,0.5,900,9,100,4,20,2'].join('\n')
    const s = await upload(csv)
    const opts = { mapping: s.body.suggestedMapping, fluxUnit: 1e-17, onExisting: 'replace' }
    const report = await post(`/intakes/${s.body.intake.id}/validate`, opts)
    expect(report.body.existing).toBe(3)
    const commit = await post(`/intakes/${s.body.intake.id}/commit`, opts)
    expect(commit.body).toMatchObject({ inserted: 2, replaced: 3 })
    expect((await record('UN-1')).redshift).toBe(0.5)
    expect((await record('UN-1')).results.classes.nii).not.toBe(before[0].results.classes.nii)

    const undo = await post(`/intakes/${s.body.intake.id}/undo`)
    expect(undo.status, JSON.stringify(undo.body)).toBe(200)
    expect(undo.body).toMatchObject({ restored: 3, removed: 2, intake: { status: 'undone' } })
    expect(await Promise.all(ids.map(record))).toEqual(before)
    expect(await raw('/diagram')).toBe(diagramBefore)
    expect((await get('/galaxies/UN-NEW-1')).status).toBe(404)
    expect((await get('/galaxies/UN-1/versions')).body.items).toEqual([])
    const stored = await t.db.$client.query('select updated_at, last_intake_id from galaxies where key = $1', ['UN-1'])
    expect(stored.rows[0].last_intake_id).toBe(first.body.intake.id)
    const audit = await get('/audit')
    expect(audit.body.items[0]).toMatchObject({ action: 'intake-undone', details: { restored: 3, removed: 2 } })
    expect((await get(`/intakes/${s.body.intake.id}`)).body).toMatchObject({ status: 'undone', report: { undone: { restored: 3, removed: 2 } } })
    // once is enough
    expect((await post(`/intakes/${s.body.intake.id}/undo`)).status).toBe(409)
  })

  it('is refused (409) while a later intake has changed the same galaxies; undone in order it works', async () => {
    await post('/galaxies/batch', { galaxies: [galaxy('ORD-1', { redshift: 0.01 })] })
    const original = await record('ORD-1')
    const second = await post('/galaxies/batch', { galaxies: [galaxy('ORD-1', { redshift: 0.02 })] })
    const third = await post('/galaxies/batch?onExisting=merge', { galaxies: [{ id: 'ORD-1', redshift: 0.03, lines: { oi_6300: { flux: 9, error: 1 } } }] })
    const refused = await post(`/intakes/${second.body.intake.id}/undo`)
    expect(refused.status).toBe(409)
    expect(refused.body.detail).toBe('1 of its galaxies (e.g. "ORD-1") were changed by a later intake; undo that intake first')
    expect((await record('ORD-1')).redshift).toBe(0.03)
    expect((await post(`/intakes/${third.body.intake.id}/undo`)).status).toBe(200)
    expect((await record('ORD-1')).redshift).toBe(0.02)
    expect((await post(`/intakes/${second.body.intake.id}/undo`)).status).toBe(200)
    expect(await record('ORD-1')).toEqual(original)
  })

  it('refuses an intake that is not committed, and one from before history was kept', async () => {
    const s = await upload([HEADER, 'ST-1,0.1,300,6,80,3,60,3,50,3'].join('\n'))
    expect((await post(`/intakes/${s.body.intake.id}/undo`)).status).toBe(409)
    const old = await post('/galaxies/batch', { galaxies: [galaxy('LEGACY-1')] })
    await t.db.$client.query('update galaxy_intakes set change = null where intake_id = $1', [old.body.intake.id])
    const res = await post(`/intakes/${old.body.intake.id}/undo`)
    expect(res.status).toBe(409)
    expect(res.body.detail).toMatch(/before intake history was kept/)
    expect((await get('/galaxies/LEGACY-1')).status).toBe(200)
  })
})
