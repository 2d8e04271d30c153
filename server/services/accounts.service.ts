import bcrypt from 'bcryptjs'
import { randomBytes } from 'node:crypto'
import { and, eq, gt, isNull, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { apiKeys, invitations, memberships, passwordResets, projects, users } from '../db/schema.ts'
import { capRole, sha256, type Auth, type Role } from '../http/auth.ts'
import { HttpProblem, conflict, notFound, unauthorized, forbidden } from '../http/problem.ts'
import { audit } from './audit.ts'
import type { Mailer } from '../lib/mailer.ts'

export const BCRYPT_COST = 12
const LOCK_AFTER_FAILURES = 5
const MAX_LOCK_S = 15 * 60
const RESET_TTL_MS = 3600 * 1000
const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000

// A real hash to compare against when the e-mail is unknown, so both answers take the same time.
const DUMMY_HASH = bcrypt.hashSync('not-a-password', BCRYPT_COST)

export const normaliseEmail = (e: string) => e.trim().toLowerCase()
const token = () => randomBytes(24).toString('base64url')

export function publicUser(u: typeof users.$inferSelect) {
  return { id: u.id, email: u.email, name: u.name, isSiteAdmin: u.isSiteAdmin, createdAt: u.createdAt.toISOString() }
}

export function accountsService(db: Db, mailer: Mailer, appUrl: string) {
  async function findByEmail(email: string) {
    const [u] = await db.select().from(users).where(sql`lower(${users.email}) = ${normaliseEmail(email)}`)
    return u
  }

  return {
    findByEmail,

    /** Creates an account; the first user of an empty database becomes site admin. */
    async signUp(input: { email: string; password: string; name: string }, ip?: string) {
      const email = normaliseEmail(input.email)
      const hash = await bcrypt.hash(input.password, BCRYPT_COST)
      return db.transaction(async (tx) => {
        // serialise first-user detection
        await tx.execute(sql`lock table users in share row exclusive mode`)
        const [{ n }] = await tx.select({ n: sql<number>`count(*)::int` }).from(users)
        const [exists] = await tx.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${email}`)
        if (exists) throw conflict('an account with this e-mail already exists')
        const [u] = await tx.insert(users).values({ email, name: input.name.trim(), passwordHash: hash, isSiteAdmin: n === 0 }).returning()
        await audit(tx, { action: 'sign-up', actorUserId: u.id, target: email, ip })
        return u
      })
    },

    /**
     * Checks a password. One uniform 401 for "no such e-mail" and "wrong password"; after
     * repeated failures the account backs off exponentially (429 with Retry-After).
     */
    async signIn(emailIn: string, password: string, ip?: string) {
      const u = await findByEmail(emailIn)
      const now = Date.now()
      if (u?.lockedUntil && u.lockedUntil.getTime() > now) {
        const wait = Math.ceil((u.lockedUntil.getTime() - now) / 1000)
        throw new HttpProblem(429, 'Too Many Requests', 'too many failed sign-ins; wait before trying again', undefined, { 'Retry-After': String(wait) })
      }
      const ok = await bcrypt.compare(password, u?.passwordHash ?? DUMMY_HASH)
      if (!u || !ok || u.disabledAt) {
        if (u && !ok) {
          const failures = u.failedSignIns + 1
          const lockS = failures >= LOCK_AFTER_FAILURES ? Math.min(MAX_LOCK_S, 2 ** (failures - LOCK_AFTER_FAILURES + 1)) : 0
          await db.update(users).set({ failedSignIns: failures, lockedUntil: lockS ? new Date(now + lockS * 1000) : null }).where(eq(users.id, u.id))
          await audit(db, { action: 'sign-in-failed', actorUserId: u.id, target: u.email, ip, details: { failures } })
        } else if (!u) {
          await audit(db, { action: 'sign-in-failed', target: normaliseEmail(emailIn), ip, details: { reason: 'unknown e-mail' } })
        }
        throw unauthorized('wrong e-mail or password')
      }
      await db.update(users).set({ failedSignIns: 0, lockedUntil: null }).where(eq(users.id, u.id))
      await audit(db, { action: 'sign-in', actorUserId: u.id, target: u.email, ip })
      return u
    },

    async signOut(userId: string) {
      // voids every session of the user issued until now
      await db.update(users).set({ sessionsValidAfter: sql`now()` }).where(eq(users.id, userId))
    },

    async me(auth: Auth) {
      const [u] = await db.select().from(users).where(eq(users.id, auth.user.id))
      if (!u) throw unauthorized()
      const rows = await db.select({ id: projects.id, name: projects.name, role: memberships.role })
        .from(memberships).innerJoin(projects, eq(projects.id, memberships.projectId))
        .where(eq(memberships.userId, u.id)).orderBy(projects.name)
      const scoped = auth.key?.projectId ? rows.filter((r) => r.id === auth.key!.projectId) : rows
      return {
        ...publicUser(u), isSiteAdmin: auth.via === 'key' ? false : u.isSiteAdmin,
        via: auth.via,
        projects: scoped.map((r) => ({ ...r, role: capRole(auth, r.role) })),
      }
    },

    /** Always answers the same; mails a single-use link valid for one hour when the account exists. */
    async requestPasswordReset(email: string) {
      const u = await findByEmail(email)
      if (!u || u.disabledAt) return
      const t = token()
      await db.insert(passwordResets).values({ userId: u.id, tokenHash: sha256(t), expiresAt: new Date(Date.now() + RESET_TTL_MS) })
      const link = `${appUrl}/reset?token=${t}`
      await mailer.send({
        to: u.email, subject: 'Reset your Ratiograph password',
        text: `Someone (hopefully you) asked to reset the password of ${u.email}.\n\nSet a new password here (valid for one hour, once):\n${link}\n\nIf this was not you, ignore this message.`,
      })
    },

    async confirmPasswordReset(t: string, password: string) {
      const hash = await bcrypt.hash(password, BCRYPT_COST)
      await db.transaction(async (tx) => {
        const [r] = await tx.update(passwordResets).set({ usedAt: sql`now()` })
          .where(and(eq(passwordResets.tokenHash, sha256(t)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
          .returning()
        if (!r) throw new HttpProblem(400, 'Bad Request', 'this reset link is invalid, used or expired', [{ path: '/token', message: 'invalid, used or expired' }])
        await tx.update(users).set({ passwordHash: hash, failedSignIns: 0, lockedUntil: null, sessionsValidAfter: sql`now()` }).where(eq(users.id, r.userId))
        await audit(tx, { action: 'password-reset', actorUserId: r.userId })
      })
    },

    // ---- API keys -------------------------------------------------------------------------
    async listKeys(userId: string) {
      const rows = await db.select().from(apiKeys).where(eq(apiKeys.userId, userId)).orderBy(sql`${apiKeys.createdAt} desc`)
      return rows.map(keyDto)
    },

    async createKey(auth: Auth, input: { name: string; projectId?: string; access: 'read' | 'write'; expiresAt?: string }) {
      if (auth.via === 'key') throw forbidden('API keys cannot create API keys; use the dashboard')
      if (input.projectId) {
        const [m] = await db.select().from(memberships).where(and(eq(memberships.projectId, input.projectId), eq(memberships.userId, auth.user.id)))
        if (!m) throw new HttpProblem(404, 'Not Found', 'no such project', [{ path: '/projectId', message: 'no such project' }])
        if (input.access === 'write' && m.role === 'viewer') throw forbidden('viewers can create read keys only')
      }
      if (input.expiresAt && new Date(input.expiresAt).getTime() <= Date.now()) {
        throw new HttpProblem(422, 'Unprocessable Content', 'the expiry is in the past', [{ path: '/expiresAt', message: 'must be in the future' }])
      }
      const prefix = 'rg_' + randomBytes(6).toString('base64url').replace(/[-_]/g, 'x').slice(0, 8)
      const key = `${prefix}_${randomBytes(24).toString('base64url')}`
      const [row] = await db.insert(apiKeys).values({
        userId: auth.user.id, name: input.name, prefix, keyHash: sha256(key), projectId: input.projectId ?? null,
        access: input.access, expiresAt: input.expiresAt ? new Date(input.expiresAt) : null,
      }).returning()
      await audit(db, { action: 'api-key-created', actorUserId: auth.user.id, projectId: input.projectId ?? null, target: prefix, details: { name: input.name, access: input.access } })
      return { ...keyDto(row), key }
    },

    async revokeKey(auth: Auth, id: string) {
      const [row] = await db.update(apiKeys).set({ revokedAt: sql`now()` })
        .where(and(eq(apiKeys.id, id), eq(apiKeys.userId, auth.user.id), isNull(apiKeys.revokedAt))).returning()
      if (!row) {
        const [already] = await db.select().from(apiKeys).where(and(eq(apiKeys.id, id), eq(apiKeys.userId, auth.user.id)))
        if (already) return
        throw notFound('API key')
      }
      await audit(db, { action: 'api-key-revoked', actorUserId: auth.user.id, projectId: row.projectId, target: row.prefix })
    },

    // ---- invitations ----------------------------------------------------------------------
    async invite(auth: Auth, projectId: string, email: string, role: Role) {
      const t = token()
      const addr = normaliseEmail(email)
      const [p] = await db.select().from(projects).where(eq(projects.id, projectId))
      const existing = await findByEmail(addr)
      if (existing) {
        const [m] = await db.select().from(memberships).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, existing.id)))
        if (m) throw new HttpProblem(409, 'Conflict', 'this person is already a member', [{ path: '/email', message: 'already a member' }])
      }
      const [inv] = await db.insert(invitations).values({
        projectId, email: addr, role, tokenHash: sha256(t), invitedBy: auth.user.id, expiresAt: new Date(Date.now() + INVITATION_TTL_MS),
      }).returning()
      await audit(db, { action: 'invitation-sent', actorUserId: auth.user.id, projectId, target: addr, details: { role } })
      const link = `${appUrl}/invite?token=${t}`
      await mailer.send({
        to: addr, subject: `You are invited to "${p.name}" on Ratiograph`,
        text: `${auth.user.name} invites you to the project "${p.name}" as ${role}.\n\nAccept here (valid for 7 days):\n${link}\n\n${existing ? 'Sign in with your account to accept.' : 'You can create your account on that page.'}`,
      })
      return invitationDto(inv)
    },

    async listInvitations(projectId: string) {
      const rows = await db.select().from(invitations).where(and(eq(invitations.projectId, projectId), isNull(invitations.revokedAt))).orderBy(sql`${invitations.createdAt} desc`)
      return rows.map(invitationDto)
    },

    async revokeInvitation(auth: Auth, projectId: string, id: string) {
      const [row] = await db.update(invitations).set({ revokedAt: sql`now()` })
        .where(and(eq(invitations.id, id), eq(invitations.projectId, projectId))).returning()
      if (!row) throw notFound('invitation')
      await audit(db, { action: 'invitation-revoked', actorUserId: auth.user.id, projectId, target: row.email })
    },

    async lookupInvitation(t: string) {
      const [inv] = await db.select({ inv: invitations, projectName: projects.name }).from(invitations)
        .innerJoin(projects, eq(projects.id, invitations.projectId)).where(eq(invitations.tokenHash, sha256(t)))
      if (!inv || inv.inv.revokedAt || inv.inv.acceptedAt || inv.inv.expiresAt.getTime() <= Date.now()) throw notFound('invitation (invalid, used or expired)')
      const existing = await findByEmail(inv.inv.email)
      return { row: inv.inv, projectName: inv.projectName, accountExists: !!existing, existing }
    },

    /** Accepts an invitation: as the signed-in invitee, or by creating the invitee's account. */
    async acceptInvitation(t: string, auth: Auth | undefined, input: { name?: string; password?: string }) {
      const found = await this.lookupInvitation(t)
      let userId: string
      if (found.existing) {
        if (!auth || auth.user.id !== found.existing.id) throw new HttpProblem(401, 'Unauthorized', `sign in as ${found.row.email} to accept this invitation`)
        userId = found.existing.id
      } else {
        if (!input.name || !input.password) {
          throw new HttpProblem(422, 'Unprocessable Content', 'name and password are needed to create the account',
            [...(!input.name ? [{ path: '/name', message: 'required' }] : []), ...(!input.password ? [{ path: '/password', message: 'required' }] : [])])
        }
        const u = await this.signUp({ email: found.row.email, password: input.password, name: input.name })
        userId = u.id
      }
      await db.transaction(async (tx) => {
        const [claimed] = await tx.update(invitations).set({ acceptedAt: sql`now()` })
          .where(and(eq(invitations.id, found.row.id), isNull(invitations.acceptedAt))).returning()
        if (!claimed) throw conflict('this invitation was already accepted')
        await tx.insert(memberships).values({ projectId: found.row.projectId, userId, role: found.row.role }).onConflictDoNothing()
        await audit(tx, { action: 'member-added', actorUserId: userId, projectId: found.row.projectId, target: found.row.email, details: { role: found.row.role, via: 'invitation' } })
      })
      return { projectId: found.row.projectId, userId }
    },
  }
}

export function keyDto(k: typeof apiKeys.$inferSelect) {
  return {
    id: k.id, name: k.name, prefix: k.prefix, projectId: k.projectId, access: k.access,
    expiresAt: k.expiresAt?.toISOString() ?? null, createdAt: k.createdAt.toISOString(),
    lastUsedAt: k.lastUsedAt?.toISOString() ?? null, revokedAt: k.revokedAt?.toISOString() ?? null,
  }
}

function invitationDto(i: typeof invitations.$inferSelect) {
  return { id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt.toISOString(), acceptedAt: i.acceptedAt?.toISOString() ?? null, createdAt: i.createdAt.toISOString() }
}
