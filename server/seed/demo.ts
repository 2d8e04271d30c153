import bcrypt from 'bcryptjs'
import { eq, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { intakes, memberships, projects, seedRuns, users, assumptionRevisions } from '../db/schema.ts'
import { SettingsSchema } from '../../shared/schemas/galaxy.schema.ts'
import { BCRYPT_COST } from '../services/accounts.service.ts'
import { computeRows, writeGalaxies } from '../services/galaxy-ingest.service.ts'
import { inProcessCompute } from '../compute/pool.ts'
import { checkSpectra } from '../compute/read-spectra.task.ts'
import type { GalaxyContext } from '../services/galaxy-context.ts'
import { dispatchJob } from '../services/jobs.service.ts'
import { storeUpload } from '../services/spectra.service.ts'
import { DEMO_ACCOUNTS } from './demo-accounts.ts'
import { generateLanternSurvey } from './lantern.ts'
import { generateLanternSpectra, LANTERN_SPECTRUM } from './lantern-spectra.ts'

export const DEMO_PROJECT_NAME = 'Lantern Nuclei Survey'

/** Name of the one file the demo's spectra upload reports (there is no file: the spectra are generated). */
export const DEMO_SPECTRA_FILE = 'lantern-invented-spectra'

export interface SeedDemoOptions {
  /** the app's jobs context: the spectra's `fit` job runs on it in the background; without it the job stays queued for a worker to take up */
  context?: GalaxyContext
  /** store the invented spectra (default true); the browser tests leave them out, so no fit changes the galaxies under them */
  spectra?: boolean
}

/**
 * Seeds the invented demo project and accounts once per database (a second run does nothing): the
 * survey's table, and invented spectra of 300 of its nuclei as one spectra upload by the demo owner,
 * whose `fit` job is started once the seed is committed (the fits arrive in the background).
 */
export async function seedDemo(db: Db, log: (m: string) => void = () => {}, opts: SeedDemoOptions = {}) {
  const [done] = await db.select().from(seedRuns).where(eq(seedRuns.name, 'lantern-demo'))
  if (done) return false
  const started = Date.now()
  const compute = opts.context?.compute ?? inProcessCompute()
  const hashes = await Promise.all(DEMO_ACCOUNTS.map((a) => bcrypt.hash(a.password, BCRYPT_COST)))
  const survey = generateLanternSurvey()
  const galaxies = survey.map(({ population: _p, ...g }) => g)
  // the second narrow component is fitted where it is needed (the demo has outflow-like wings)
  const settings = SettingsSchema.parse({ fit: { components: 'auto' } })
  const results = await computeRows(compute, galaxies, settings)
  const spectra = opts.spectra === false ? undefined : demoSpectraFile(survey)
  const seeded = await db.transaction(async (tx) => {
    await tx.execute(sql`lock table seed_runs in exclusive mode`)
    const [again] = await tx.select().from(seedRuns).where(eq(seedRuns.name, 'lantern-demo'))
    if (again) return undefined
    const [{ n }] = await tx.select({ n: sql<number>`count(*)::int` }).from(users)
    const ids: Record<string, string> = {}
    for (const [i, a] of DEMO_ACCOUNTS.entries()) {
      const [existing] = await tx.select().from(users).where(sql`lower(${users.email}) = ${a.email}`)
      const [u] = existing ? [existing]
        // verified: the README's accounts create keys and join projects at once
        : await tx.insert(users).values({ email: a.email, name: a.name, passwordHash: hashes[i], isSiteAdmin: n === 0 && a.role === 'owner', emailVerifiedAt: sql`now()` }).returning()
      ids[a.role] = u.id
    }
    const [p] = await tx.insert(projects).values({
      name: DEMO_PROJECT_NAME, createdBy: ids.owner,
      description: 'Invented demo sample: 2,400 synthetic galaxy nuclei (star-forming, composite, Seyfert and LINER-like) with dust and noise. Not real data.',
    }).returning()
    for (const role of ['owner', 'analyst', 'viewer'] as const) await tx.insert(memberships).values({ projectId: p.id, userId: ids[role], role })
    await tx.insert(assumptionRevisions).values({ projectId: p.id, revision: 1, settings, note: 'initial assumptions (defaults; spectra fitted with one or two narrow components)', createdBy: ids.owner })
    const [intake] = await tx.insert(intakes).values({
      projectId: p.id, kind: 'api', status: 'committed', userId: ids.analyst, fileName: null, rowsTotal: galaxies.length,
      rowsAccepted: galaxies.length, rowsRejected: 0, revision: 1, finishedAt: new Date(),
    }).returning()
    await writeGalaxies(tx, p.id, intake.id, galaxies, [{ revision: 1, results }])
    const upload = spectra
      ? await storeUpload(tx, { userId: ids.owner }, p.id, [DEMO_SPECTRA_FILE], [spectra], { defaults: { resolution: { fwhmAngstrom: LANTERN_SPECTRUM.fwhmAngstrom } }, onExisting: 'skip', skipInvalid: false })
      : undefined
    await tx.insert(seedRuns).values({ name: 'lantern-demo' })
    return { projectId: p.id, upload }
  })
  if (!seeded) return false
  if (seeded.upload && opts.context) await dispatchJob(opts.context, undefined, seeded.upload.job)
  const n = seeded.upload?.upload.spectrumCount ?? 0
  log(`seeded the demo project "${DEMO_PROJECT_NAME}" with ${galaxies.length} galaxies and ${n} invented spectra (${n ? 'fitted in the background' : 'none fitted'}) in ${((Date.now() - started) / 1000).toFixed(1)} s`)
  return true
}

/** The invented spectra as one read file of the upload, checked as an uploaded file's are. */
function demoSpectraFile(survey: ReturnType<typeof generateLanternSurvey>) {
  const found = generateLanternSpectra(survey).map(({ kind, spectrum: s }) => ({
    id: s.id, redshift: s.redshift, fluxUnit: s.fluxUnit, wavelengthMedium: s.wavelengthMedium, wavelength: s.wavelength, flux: s.flux, error: s.error,
    source: `invented by the demo's seeded generator (${kind}); not an observation`,
  }))
  const read = checkSpectra(found)
  // the generator's spectra always pass; a failure here is a bug in it
  if (!read.ok) throw new Error(`the demo's invented spectra fail the upload checks: ${JSON.stringify('problems' in read ? read.problems.slice(0, 3) : read.tooLarge)}`)
  const size = read.spectra.reduce((a, s) => a + s.wavelength.byteLength + s.flux.byteLength + s.noise.byteLength, 0)
  return { index: 0, name: DEMO_SPECTRA_FILE, size, spectra: read.spectra }
}
