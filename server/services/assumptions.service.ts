import { desc, eq } from 'drizzle-orm'
import { assumptionRevisions, jobs, projects, users } from '../db/schema.ts'
import type { Auth } from '../http/auth.ts'
import { SettingsSchema } from '../../shared/schemas/galaxy.schema.ts'
import { parseRequest } from '../http/parse-request.ts'
import { audit } from './audit.ts'
import { dispatchJob, jobDto, type JobQueue } from './jobs.service.ts'
import type { GalaxyContext } from './galaxy-context.ts'

function revisionDto(r: typeof assumptionRevisions.$inferSelect, by: { id: string | null; name: string | null }) {
  return { revision: r.revision, settings: SettingsSchema.parse(r.settings), note: r.note, createdAt: r.createdAt.toISOString(), createdBy: by.id ? by : null }
}

export function assumptionsService(ctx: GalaxyContext, queue: JobQueue | undefined) {
  const { db } = ctx
  return {
    async list(projectId: string) {
      const rows = await db.select({ r: assumptionRevisions, name: users.name }).from(assumptionRevisions)
        .leftJoin(users, eq(users.id, assumptionRevisions.createdBy)).where(eq(assumptionRevisions.projectId, projectId))
        .orderBy(desc(assumptionRevisions.revision))
      const revisions = rows.map((x) => revisionDto(x.r, { id: x.r.createdBy, name: x.name }))
      const [p] = await db.select({ shown: projects.resultsRevision }).from(projects).where(eq(projects.id, projectId))
      return { current: revisions[0], resultsRevision: p.shown, revisions }
    },

    /** A change makes a new numbered revision and queues a recompute of every galaxy under it. */
    async change(auth: Auth, projectId: string, settingsIn: unknown, note: string) {
      const settings = parseRequest(SettingsSchema, settingsIn, ['settings'])
      const out = await db.transaction(async (tx) => {
        const [p] = await tx.select().from(projects).where(eq(projects.id, projectId)).for('update')
        const revision = p.currentRevision + 1
        const [rev] = await tx.insert(assumptionRevisions).values({ projectId, revision, settings, note, createdBy: auth.user.id }).returning()
        await tx.update(projects).set({ currentRevision: revision }).where(eq(projects.id, projectId))
        const [job] = await tx.insert(jobs).values({ projectId, kind: 'recompute', revision, createdBy: auth.user.id }).returning()
        await audit(tx, { action: 'assumptions-changed', actorUserId: auth.user.id, projectId, target: `revision ${revision}`, details: { settings, note } })
        return { rev, job }
      })
      await dispatchJob(ctx, queue, out.job) // no queue: it runs in this process
      return { revision: revisionDto(out.rev, { id: auth.user.id, name: auth.user.name }), job: jobDto(out.job) }
    },
  }
}
