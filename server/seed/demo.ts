import bcrypt from 'bcryptjs'
import { eq, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { intakes, memberships, projects, seedRuns, users, assumptionRevisions } from '../db/schema.ts'
import { SettingsSchema } from '../../shared/schemas/galaxy.schema.ts'
import { BCRYPT_COST } from '../services/accounts.service.ts'
import { computeAll, writeGalaxies } from '../services/galaxy-ingest.service.ts'
import { inProcessCompute, type ComputePool } from '../compute/pool.ts'
import { DEMO_ACCOUNTS } from './demo-accounts.ts'
import { generateLanternSurvey } from './lantern.ts'

export const DEMO_PROJECT_NAME = 'Lantern Nuclei Survey'

/** Seeds the invented demo project and accounts once per database (a second run does nothing). */
export async function seedDemo(db: Db, log: (m: string) => void = () => {}, compute: ComputePool = inProcessCompute()) {
  const [done] = await db.select().from(seedRuns).where(eq(seedRuns.name, 'lantern-demo'))
  if (done) return false
  const started = Date.now()
  const hashes = await Promise.all(DEMO_ACCOUNTS.map((a) => bcrypt.hash(a.password, BCRYPT_COST)))
  const galaxies = generateLanternSurvey().map(({ population: _p, ...g }) => g)
  const settings = SettingsSchema.parse({})
  const results = await computeAll(compute, galaxies, settings)
  await db.transaction(async (tx) => {
    await tx.execute(sql`lock table seed_runs in exclusive mode`)
    const [again] = await tx.select().from(seedRuns).where(eq(seedRuns.name, 'lantern-demo'))
    if (again) return
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
    await tx.insert(assumptionRevisions).values({ projectId: p.id, revision: 1, settings, note: 'initial assumptions (defaults)', createdBy: ids.owner })
    const [intake] = await tx.insert(intakes).values({
      projectId: p.id, kind: 'api', status: 'committed', userId: ids.analyst, fileName: null, rowsTotal: galaxies.length,
      rowsAccepted: galaxies.length, rowsRejected: 0, revision: 1, finishedAt: new Date(),
    }).returning()
    await writeGalaxies(tx, p.id, intake.id, galaxies, [{ revision: 1, results }])
    await tx.insert(seedRuns).values({ name: 'lantern-demo' })
  })
  log(`seeded the demo project "${DEMO_PROJECT_NAME}" with ${galaxies.length} galaxies in ${((Date.now() - started) / 1000).toFixed(1)} s`)
  return true
}
