import { and, eq, sql, desc } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { assumptionRevisions, auditEvents, galaxies, intakes, memberships, projects, users } from '../db/schema.ts'
import { capRole, type Auth, type Role } from '../http/auth.ts'
import { HttpProblem, notFound } from '../http/problem.ts'
import { SettingsSchema, type Settings } from '../../shared/schemas/galaxy.schema.ts'
import { audit } from './audit.ts'

export function projectDto(p: typeof projects.$inferSelect, role: Role | null, galaxyCount: number) {
  return {
    id: p.id, name: p.name, description: p.description, role, createdAt: p.createdAt.toISOString(),
    galaxyCount, currentRevision: p.currentRevision, resultsRevision: p.resultsRevision,
  }
}

export function intakeDto(i: typeof intakes.$inferSelect, by?: { id: string | null; name: string | null } | null) {
  return {
    id: i.id, kind: i.kind, status: i.status, fileName: i.fileName, createdAt: i.createdAt.toISOString(),
    finishedAt: i.finishedAt?.toISOString() ?? null, by: by?.id ? { id: by.id, name: by.name } : null,
    rowsTotal: i.rowsTotal, rowsAccepted: i.rowsAccepted, rowsRejected: i.rowsRejected, revision: i.revision,
  }
}

/** The settings of one revision (defaults filled), or the latest. */
export async function revisionSettings(db: Pick<Db, 'select'>, projectId: string, revision?: number): Promise<{ revision: number; settings: Settings }> {
  const q = db.select().from(assumptionRevisions).where(revision === undefined
    ? eq(assumptionRevisions.projectId, projectId)
    : and(eq(assumptionRevisions.projectId, projectId), eq(assumptionRevisions.revision, revision)))
    .orderBy(desc(assumptionRevisions.revision)).limit(1)
  const [row] = await q
  if (!row) throw notFound('assumptions revision')
  return { revision: row.revision, settings: SettingsSchema.parse(row.settings) }
}

export function projectsService(db: Db) {
  async function galaxyCount(projectId: string) {
    const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(galaxies).where(eq(galaxies.projectId, projectId))
    return n
  }
  return {
    async create(auth: Auth, input: { name: string; description?: string }, settings?: Settings) {
      return db.transaction(async (tx) => {
        const [p] = await tx.insert(projects).values({ name: input.name.trim(), description: input.description ?? '', createdBy: auth.user.id }).returning()
        await tx.insert(memberships).values({ projectId: p.id, userId: auth.user.id, role: 'owner' })
        await tx.insert(assumptionRevisions).values({ projectId: p.id, revision: 1, settings: settings ?? SettingsSchema.parse({}), note: 'initial assumptions', createdBy: auth.user.id })
        await audit(tx, { action: 'project-created', actorUserId: auth.user.id, projectId: p.id, target: p.name })
        return projectDto(p, 'owner', 0)
      })
    },

    async list(auth: Auth) {
      const rows = await db.select({ p: projects, role: memberships.role, n: sql<number>`(select count(*)::int from galaxies g where g.project_id = ${projects.id})` })
        .from(memberships).innerJoin(projects, eq(projects.id, memberships.projectId))
        .where(eq(memberships.userId, auth.user.id)).orderBy(projects.name)
      const visible = auth.key?.projectId ? rows.filter((r) => r.p.id === auth.key!.projectId) : rows
      return visible.map((r) => projectDto(r.p, capRole(auth, r.role), r.n))
    },

    async get(projectId: string, role: Role) {
      const [p] = await db.select().from(projects).where(eq(projects.id, projectId))
      if (!p) throw notFound('project')
      return projectDto(p, role, await galaxyCount(projectId))
    },

    async update(auth: Auth, projectId: string, role: Role, input: { name?: string; description?: string }) {
      const [p] = await db.update(projects).set({ ...(input.name ? { name: input.name.trim() } : {}), ...(input.description !== undefined ? { description: input.description } : {}) })
        .where(eq(projects.id, projectId)).returning()
      if (input.name) await audit(db, { action: 'project-renamed', actorUserId: auth.user.id, projectId, target: input.name })
      return projectDto(p, role, await galaxyCount(projectId))
    },

    async remove(auth: Auth, projectId: string) {
      await db.transaction(async (tx) => {
        const [p] = await tx.delete(projects).where(eq(projects.id, projectId)).returning()
        // kept outside the project (which is gone) so the deletion stays on record
        await audit(tx, { action: 'project-deleted', actorUserId: auth.user.id, projectId: null, target: p?.name, details: { projectId } })
      })
    },

    async members(projectId: string) {
      const rows = await db.select({ userId: users.id, email: users.email, name: users.name, role: memberships.role, joinedAt: memberships.createdAt })
        .from(memberships).innerJoin(users, eq(users.id, memberships.userId)).where(eq(memberships.projectId, projectId)).orderBy(users.name)
      return rows.map((r) => ({ ...r, joinedAt: r.joinedAt.toISOString() }))
    },

    async setRole(auth: Auth, projectId: string, userId: string, role: Role) {
      await db.transaction(async (tx) => {
        const [m] = await tx.select().from(memberships).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId))).for('update')
        if (!m) throw notFound('member')
        if (m.role === 'owner' && role !== 'owner') await requireAnotherOwner(tx, projectId, userId)
        await tx.update(memberships).set({ role }).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId)))
        await audit(tx, { action: 'member-role-changed', actorUserId: auth.user.id, projectId, target: userId, details: { from: m.role, to: role } })
      })
    },

    async removeMember(auth: Auth, projectId: string, userId: string) {
      await db.transaction(async (tx) => {
        const [m] = await tx.select().from(memberships).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId))).for('update')
        if (!m) throw notFound('member')
        if (m.role === 'owner') await requireAnotherOwner(tx, projectId, userId)
        await tx.delete(memberships).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId)))
        await audit(tx, { action: 'member-removed', actorUserId: auth.user.id, projectId, target: userId, details: { role: m.role } })
      })
    },

    async auditLog(projectId: string, limit = 200) {
      const rows = await db.select({ e: auditEvents, actorName: users.name, actorEmail: users.email }).from(auditEvents)
        .leftJoin(users, eq(users.id, auditEvents.actorUserId))
        // the project's own events, plus account events (sign-ins, resets) of its current members
        .where(sql`${auditEvents.projectId} = ${projectId} or (${auditEvents.projectId} is null
          and ${auditEvents.action} in ('sign-in', 'sign-in-failed', 'password-reset')
          and ${auditEvents.actorUserId} in (select user_id from memberships where project_id = ${projectId}))`)
        .orderBy(desc(auditEvents.id)).limit(limit)
      return rows.map((r) => ({
        id: r.e.id, action: r.e.action, target: r.e.target, details: r.e.details, createdAt: r.e.createdAt.toISOString(),
        actor: r.e.actorUserId ? { id: r.e.actorUserId, name: r.actorName, email: r.actorEmail } : null,
      }))
    },

    async intakes(projectId: string, limit = 100) {
      const rows = await db.select({ i: intakes, byName: users.name }).from(intakes).leftJoin(users, eq(users.id, intakes.userId))
        .where(eq(intakes.projectId, projectId)).orderBy(desc(intakes.createdAt)).limit(limit)
      return rows.map((r) => intakeDto(r.i, { id: r.i.userId, name: r.byName }))
    },
  }
}

async function requireAnotherOwner(tx: Pick<Db, 'select'>, projectId: string, userId: string) {
  const [{ n }] = await tx.select({ n: sql<number>`count(*)::int` }).from(memberships)
    .where(and(eq(memberships.projectId, projectId), eq(memberships.role, 'owner'), sql`${memberships.userId} <> ${userId}`))
  if (n === 0) throw new HttpProblem(409, 'Conflict', 'a project needs at least one owner')
}
