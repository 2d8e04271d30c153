import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parse } from 'csv-parse/sync'
import { existsSync } from 'node:fs'
import { expireStagedIntakes } from '../../server/services/intake.service.ts'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string

beforeAll(async () => {
  t = await startTestApp({ LARGE_INTAKE_ROWS: '3' })
  owner = await signedInAgent(t.app, 'csv-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'csv' })).body.id
})
afterAll(async () => { await t.close() })

const CSV = [
  'galaxy_id,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err,nii_6584_flux,nii_6584_err,oiii_5007_flux,oiii_5007_err,oiii_5007_limit,ew_halpha',
  'CSV-001,0.05,300,6,80,3,60,3,50,3,,24.5',
  'CSV-002,0.07,300,6,90,3,330,6,800,10,,12',
  '=CSV-003,0.08,300,6,80,3,60,3,,,9,30',
].join('\n')

const upload = (body: string | Buffer, name = 'sample.csv') =>
  owner.agent.post(`/api/v1/projects/${projectId}/intakes/csv`).set('X-CSRF-Token', owner.csrf).attach('file', Buffer.from(body), { filename: name, contentType: 'text/csv' })

describe('CSV intake', () => {
  it('stages, suggests a mapping, reports problems by row and column, and commits in one transaction', async () => {
    const staged = await upload(CSV)
    expect(staged.status).toBe(201)
    expect(staged.body.rowCount).toBe(3)
    expect(staged.body.headers[0]).toBe('galaxy_id')
    const m = staged.body.suggestedMapping
    expect(m).toMatchObject({ id: 'galaxy_id', redshift: 'z', lines: { halpha: { flux: 'halpha_flux', error: 'halpha_err' }, oiii_5007: { limit: 'oiii_5007_limit' } }, ew: { halpha: 'ew_halpha' } })
    const id = staged.body.intake.id
    const opts = { mapping: m, fluxUnit: 1e-17, nonDetection: 'limit-column' }
    const report = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/${id}/validate`).set('X-CSRF-Token', owner.csrf).send(opts)
    expect(report.status).toBe(200)
    expect(report.body.problems).toEqual([expect.objectContaining({ row: 4, column: 1, field: 'galaxy_id' })])
    const refused = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/${id}/commit`).set('X-CSRF-Token', owner.csrf).send(opts)
    expect(refused.status).toBe(422)
    expect(Number((await t.db.$client.query('select count(*) from galaxies where project_id = $1', [projectId])).rows[0].count)).toBe(0)

    const fixed = await upload(CSV.replace('=CSV-003', 'CSV-003'))
    const ok = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/${fixed.body.intake.id}/commit`).set('X-CSRF-Token', owner.csrf)
      .send({ ...opts, saveMappingAs: 'survey default' })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ inserted: 3, intake: { status: 'committed', rowsAccepted: 3, fileName: 'sample.csv' } })
    const g3 = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies/CSV-003`)
    expect(g3.body.lines.oiii_5007).toEqual({ upperLimit: 9 })
    const list = await owner.agent.get(`/api/v1/projects/${projectId}/intakes`)
    expect(list.body.items[0]).toMatchObject({ kind: 'csv', rowsAccepted: 3, by: { name: 'Test Person' } })
    // the starter of a large intake is mailed when it finishes (threshold lowered for this test)
    const finished = async () => (await t.mails()).some((mail) => mail.toAddress === 'csv-owner@example.org' && mail.subject.startsWith('Intake finished'))
    for (let i = 0; i < 50 && !(await finished()); i++) await new Promise((ok) => setTimeout(ok, 100))
    expect(await finished()).toBe(true)
    const again = await upload(CSV)
    expect(again.body.savedMappings).toEqual([expect.objectContaining({ name: 'survey default' })])
  })

  it('reads a byte-order mark and semicolons', async () => {
    const res = await upload('\uFEFF' + CSV.replaceAll(',', ';'))
    expect(res.status).toBe(201)
    expect(res.body.delimiter).toBe(';')
    expect(res.body.headers[0]).toBe('galaxy_id')
  })

  it.each([
    ['empty file', '', 422],
    ['header only', CSV.split('\n')[0], 422],
    ['repeated header', 'id,z,z\nA,1,2', 422],
    ['missing header', 'id,,z\nA,1,2', 422],
  ])('refuses a CSV that is an %s', async (_name, body, status) => {
    const res = await upload(body)
    expect(res.status).toBe(status)
    expect(res.type).toBe('application/problem+json')
  })

  it('refuses a file that is not UTF-8 and a file that is not a CSV', async () => {
    const latin1 = Buffer.from('id,z\nGalaxie-\xe9,0.1\n', 'latin1')
    expect((await upload(latin1)).status).toBe(422)
    const png = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/csv`).set('X-CSRF-Token', owner.csrf)
      .attach('file', Buffer.from([0x89, 0x50, 0x4e, 0x47]), { filename: 'plot.png', contentType: 'image/png' })
    expect(png.status).toBe(415)
  })
})

describe('exports', () => {
  it('CSV: provenance header, one row per galaxy, formula cells made safe', async () => {
    const res = await owner.agent.get(`/api/v1/projects/${projectId}/exports/galaxies.csv`).buffer(true).parse((r, cb) => { let s = ''; r.on('data', (c: Buffer) => { s += c }); r.on('end', () => cb(null, s)) })
    expect(res.status).toBe(200)
    const text = res.body as string
    expect(text).toMatch(/^# Ratiograph .* export/)
    expect(text).toMatch(/# assumptions revision: 1/)
    expect(text).toMatch(/# method version: /)
    const rows = parse(text.split('\n').filter((l) => !l.startsWith('#')).join('\n'), { columns: true }) as Array<Record<string, string>>
    expect(rows.map((r) => r.galaxy_id)).toEqual(['CSV-001', 'CSV-002', 'CSV-003'])
    // 300 × 1e-17 erg s⁻¹ cm⁻² observed; the corrected Hα is brighter than observed when E(B−V) > 0
    expect(Number(rows[0].halpha_flux_corr)).toBeGreaterThan(300e-17)
    expect(rows[1].class_nii).toBe('agn')
    expect(Number(rows[0].niiHa)).toBeCloseTo(Math.log10(60 / 300), 6)
  })

  it('VOTable 1.4 with a unit or UCD on every field', async () => {
    const res = await owner.agent.get(`/api/v1/projects/${projectId}/exports/galaxies.vot`).query({ columns: 'redshift,ebv,class_overall' }).buffer(true)
      .parse((r, cb) => { let s = ''; r.on('data', (c: Buffer) => { s += c }); r.on('end', () => cb(null, s)) })
    expect(res.status).toBe(200)
    const x = res.body as string
    expect(x).toContain('<VOTABLE version="1.4"')
    const fields = x.match(/<FIELD [^>]*>/g)!
    expect(fields).toHaveLength(4)
    for (const f of fields) expect(f).toMatch(/ucd="[^"]+"/)
    expect(x).toMatch(/<FIELD name="ebv"[^>]*unit="mag"/)
    expect(x).toMatch(/<INFO name="assumptionsRevision" value="1"\/>/)
    expect(x.match(/<TR>/g)).toHaveLength(3)
  })
})

describe('abandoned staged uploads', () => {
  it('closes staged intakes older than the limit as rejected, removes their files, and leaves newer ones', async () => {
    const old = (await upload(CSV, 'old.csv')).body.intake.id as string
    const fresh = (await upload(CSV, 'fresh.csv')).body.intake.id as string
    const pathOf = async (id: string) => (await t.db.$client.query('select file_path from intakes where id = $1', [id])).rows[0].file_path as string | null
    const oldFile = (await pathOf(old))!
    expect(existsSync(oldFile)).toBe(true)
    await t.db.$client.query("update intakes set created_at = now() - interval '30 hours' where id = $1", [old])
    expect(await expireStagedIntakes(t.db, 24)).toBe(1)
    expect(existsSync(oldFile)).toBe(false)
    expect(await pathOf(old)).toBeNull()
    const shown = await owner.agent.get(`/api/v1/projects/${projectId}/intakes/${old}`)
    expect(shown.body.status).toBe('rejected')
    expect(shown.body.report).toMatchObject({ expired: true })
    // too late to commit it; the newer upload is untouched and still commits
    const late = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/${old}/commit`).set('X-CSRF-Token', owner.csrf)
      .send({ mapping: (await upload(CSV)).body.suggestedMapping, fluxUnit: 1e-17, nonDetection: 'limit-column' })
    expect(late.status).toBe(409)
    expect(existsSync((await pathOf(fresh))!)).toBe(true)
    expect(await expireStagedIntakes(t.db, 24)).toBe(0)
    expect(await expireStagedIntakes(t.db, 0)).toBe(0) // 0 keeps them for ever
  })
})
