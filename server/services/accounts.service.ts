import bcrypt from 'bcryptjs'
import { randomBytes, randomUUID } from 'node:crypto'
import { and, eq, gt, isNull, ne, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { apiKeys, emailVerifications, invitations, memberships, passwordResets, projects, users } from '../db/schema.ts'
import { capRole, sha256, type Auth, type Role } from '../http/auth.ts'
import { HttpProblem, conflict, notFound, unauthorized, forbidden } from '../http/problem.ts'
import { audit } from './audit.ts'
import { signInThrottle } from './sign-in-throttle.ts'
import type { Mailer } from '../lib/mailer.ts'

export const BCRYPT_COST = 12
const RESET_TTL_MS = 3600 * 1000
const VERIFY_TTL_MS = 24 * 3600 * 1000
const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000

// A real hash to compare against when the e-mail is unknown, so both answers take the same time.
const DUMMY_HASH = bcrypt.hashSync('not-a-password', BCRYPT_COST)

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type User = typeof users.$inferSelect

export const normaliseEmail = (e: string) => e.trim().toLowerCase()
const token = () => randomBytes(24).toString('base64url')

export function publicUser(u: User) {
  return { id: u.id, email: u.email, name: u.name, isSiteAdmin: u.isSiteAdmin, createdAt: u.createdAt.toISOString() }
}

const needsVerification = (u: Pick<User, 'email'>, what: string) =>
  forbidden(`verify your e-mail address before ${what}: open the link we mailed to ${u.email}, or ask for a new one`)

const badLink = (what: string) => new HttpProblem(400, 'Bad Request', `this ${what} link is invalid, used or expired`, [{ path: '/token', message: 'invalid, used or expired' }])

/**
 * Ends everything that lets someone act as the account: sessions, API keys, and outstanding reset
 * and verification links. After a password reset, a disable or an e-mail change nothing issued
 * before survives, and re-enabling an account revives none of it.
 */
async function revokeCredentials(tx: Tx, userId: string) {
  await tx.update(users).set({ sessionsValidAfter: sql`now()` }).where(eq(users.id, userId))
  const keys = await tx.update(apiKeys).set({ revokedAt: sql`now()` })
    .where(and(eq(apiKeys.userId, userId), isNull(apiKeys.revokedAt))).returning({ id: apiKeys.id })
  await tx.update(passwordResets).set({ usedAt: sql`now()` }).where(and(eq(passwordResets.userId, userId), isNull(passwordResets.usedAt)))
  await tx.update(emailVerifications).set({ usedAt: sql`now()` }).where(and(eq(emailVerifications.userId, userId), isNull(emailVerifications.usedAt)))
  return { keysRevoked: keys.length }
}

export function accountsService(db: Db, mailer: Mailer, appUrl: string) {
  const throttle = signInThrottle(db)

  async function findByEmail(email: string, tx: Db | Tx = db) {
    const [u] = await tx.select().from(users).where(sql`lower(${users.email}) = ${normaliseEmail(email)}`)
    return u
  }

  /** A single-use link proving `email` for the account (its own address, or a new one it asked for). */
  async function verificationLink(tx: Db | Tx, userId: string, email: string) {
    const t = token()
    await tx.insert(emailVerifications).values({ userId, email, tokenHash: sha256(t), expiresAt: new Date(Date.now() + VERIFY_TTL_MS) })
    return `${appUrl}/verify-email?token=${t}`
  }

  const verificationMail = (to: string, link: string) => mailer.send({
    to, subject: 'Confirm your e-mail address for Ratiograph',
    text: `Someone created a Ratiograph account for ${to}.\n\nIf it was you, open this link in the browser where you are signed in (valid for 24 hours, once):\n${link}\n\n`
      + `If it was not you, do not open the link. Set your own password instead at ${appUrl}/reset — that signs everyone else out of the account and deletes their API keys.`,
  })

  /** Inserts an account; the first user of an empty database becomes site admin. */
  async function insertUser(tx: Tx, email: string, name: string, passwordHash: string, verified: boolean) {
    // serialise first-user detection and the "address taken" check
    await tx.execute(sql`lock table users in share row exclusive mode`)
    const [{ n }] = await tx.select({ n: sql<number>`count(*)::int` }).from(users)
    if (await findByEmail(email, tx)) return null
    const [u] = await tx.insert(users).values({
      email, name, passwordHash, isSiteAdmin: n === 0, emailVerifiedAt: verified ? sql`now()` : null,
    }).returning()
    return u
  }

  return {
    findByEmail,

    /**
     * Creates an unverified account and mails the link that verifies it. An address that already has
     * an account gets the same answer (a user of the same shape, no session) and its owner a notice,
     * so sign-up cannot tell which addresses are registered.
     */
    async signUp(input: { email: string; password: string; name: string }, ip?: string) {
      const email = normaliseEmail(input.email)
      const name = input.name.trim()
      const hash = await bcrypt.hash(input.password, BCRYPT_COST) // both paths pay for it
      const out = await db.transaction(async (tx) => {
        const u = await insertUser(tx, email, name, hash, false)
        if (!u) {
          await audit(tx, { action: 'sign-up-existing-address', target: email, ip })
          return { user: null }
        }
        await audit(tx, { action: 'sign-up', actorUserId: u.id, target: email, ip })
        return { user: u, link: await verificationLink(tx, u.id, email) }
      })
      if (out.user) {
        await verificationMail(email, out.link!)
        return publicUser(out.user)
      }
      await mailer.send({
        to: email, subject: 'Someone tried to create a Ratiograph account with your address',
        text: `Someone asked to create a Ratiograph account for ${email}, which already has one, so nothing was created.\n\n`
          + `If it was you: sign in at ${appUrl}/sign-in, or set a new password at ${appUrl}/reset if you have forgotten it.\n`
          + 'If it was not you, you need not do anything.',
      })
      return { id: randomUUID(), email, name, isSiteAdmin: false, createdAt: new Date().toISOString() }
    },

    /**
     * Checks a password. One uniform 401 for "no such e-mail", "wrong password" and "disabled";
     * repeated failures back off per (e-mail, address) and per address (429 with Retry-After).
     */
    async signIn(emailIn: string, password: string, ip?: string) {
      const email = normaliseEmail(emailIn)
      await throttle.check(email, ip)
      const u = await findByEmail(email)
      const ok = await bcrypt.compare(password, u?.passwordHash ?? DUMMY_HASH)
      if (!u || !ok || u.disabledAt) {
        const failures = await throttle.fail(email, ip)
        await audit(db, { action: 'sign-in-failed', actorUserId: u?.id ?? null, target: email, ip, details: u ? { failures } : { failures, reason: 'unknown e-mail' } })
        throw unauthorized('wrong e-mail or password')
      }
      await throttle.succeed(email, ip)
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
        via: auth.via, emailVerified: u.emailVerifiedAt !== null,
        projects: scoped.map((r) => ({ ...r, role: capRole(auth, r.role) })),
      }
    },

    // ---- e-mail verification and change ---------------------------------------------------

    /** Mails a new verification link for the signed-in account's address (nothing when verified). */
    async resendVerification(auth: Auth) {
      if (auth.via === 'key') throw forbidden('verify from the dashboard, not with an API key')
      const [u] = await db.select().from(users).where(eq(users.id, auth.user.id))
      if (!u || u.emailVerifiedAt) return
      await verificationMail(u.email, await verificationLink(db, u.id, u.email))
    },

    /**
     * Asks to move the account to a new address: needs the current password, and finishes only when
     * the link mailed to the new address is opened while signed in. A taken address gets the same
     * answer and its owner a notice.
     */
    async requestEmailChange(auth: Auth, newEmail: string, password: string, ip?: string) {
      if (auth.via === 'key') throw forbidden('change the address from the dashboard, not with an API key')
      const [u] = await db.select().from(users).where(eq(users.id, auth.user.id))
      if (!u) throw unauthorized()
      const email = normaliseEmail(newEmail)
      await throttle.check(u.email, ip)
      if (!(await bcrypt.compare(password, u.passwordHash))) {
        await throttle.fail(u.email, ip)
        throw new HttpProblem(403, 'Forbidden', 'the current password is wrong', [{ path: '/password', message: 'wrong password' }])
      }
      if (email === normaliseEmail(u.email)) {
        throw new HttpProblem(422, 'Unprocessable Content', 'this is already the address of your account', [{ path: '/email', message: 'already your address' }])
      }
      await audit(db, { action: 'email-change-requested', actorUserId: u.id, target: email, ip })
      if (await findByEmail(email)) {
        await mailer.send({
          to: email, subject: 'Someone tried to move a Ratiograph account to your address',
          text: `The Ratiograph account of ${u.email} asked to use ${email}, which already has an account, so nothing changed.\nYou need not do anything.`,
        })
        return
      }
      const link = await verificationLink(db, u.id, email)
      await mailer.send({
        to: email, subject: 'Confirm your new e-mail address for Ratiograph',
        text: `The Ratiograph account of ${u.email} asked to use ${email} from now on.\n\nIf it was you, open this link in the browser where you are signed in (valid for 24 hours, once):\n${link}\n\n`
          + 'Changing the address signs you out everywhere else and deletes your API keys.\nIf it was not you, ignore this message.',
      })
      await mailer.send({
        to: u.email, subject: 'Your Ratiograph account asked to change its e-mail address',
        text: `Someone signed in to your Ratiograph account asked to change its address to ${email}. Nothing changes until a link mailed there is opened.\n\nIf it was not you, set a new password at ${appUrl}/reset — that signs everyone else out.`,
      })
    },

    /**
     * Opens a mailed verification link as the signed-in account it was made for. Its own address
     * becomes verified; a new address replaces the old one, and every session, key and link issued
     * before is revoked (the route signs the caller in again). The link proves the mailbox, the
     * session the password: a squatter's password cannot be verified by the address owner's click.
     */
    async verifyEmail(auth: Auth, t: string, ip?: string) {
      if (auth.via === 'key') throw forbidden('verify from the dashboard, not with an API key')
      const out = await db.transaction(async (tx) => {
        const [v] = await tx.select().from(emailVerifications)
          .where(and(eq(emailVerifications.tokenHash, sha256(t)), isNull(emailVerifications.usedAt), gt(emailVerifications.expiresAt, sql`now()`))).for('update')
        if (!v) throw badLink('verification')
        if (v.userId !== auth.user.id) throw forbidden('this link belongs to another account; sign in as the account that asked for it')
        const [u] = await tx.select().from(users).where(eq(users.id, v.userId)).for('update')
        if (normaliseEmail(u.email) === v.email) {
          await tx.update(emailVerifications).set({ usedAt: sql`now()` })
            .where(and(eq(emailVerifications.userId, u.id), eq(emailVerifications.email, v.email), isNull(emailVerifications.usedAt)))
          if (!u.emailVerifiedAt) {
            await tx.update(users).set({ emailVerifiedAt: sql`now()` }).where(eq(users.id, u.id))
            await audit(tx, { action: 'email-verified', actorUserId: u.id, target: u.email, ip })
          }
          return { changed: false as const, userId: u.id }
        }
        await tx.execute(sql`lock table users in share row exclusive mode`)
        const [taken] = await tx.select({ id: users.id }).from(users).where(and(sql`lower(${users.email}) = ${v.email}`, ne(users.id, u.id)))
        if (taken) throw new HttpProblem(409, 'Conflict', 'another account took this address meanwhile', [{ path: '/token', message: 'address taken' }])
        await tx.update(users).set({ email: v.email, emailVerifiedAt: sql`now()` }).where(eq(users.id, u.id))
        const revoked = await revokeCredentials(tx, u.id)
        await audit(tx, { action: 'email-changed', actorUserId: u.id, target: v.email, ip, details: { from: u.email, ...revoked } })
        return { changed: true as const, userId: u.id, from: u.email, to: v.email }
      })
      if (out.changed) {
        await mailer.send({
          to: out.from, subject: 'Your Ratiograph account has a new e-mail address',
          text: `The Ratiograph account that used ${out.from} now uses ${out.to}. Every session and API key of the account was ended.\n\nIf you did not ask for this, tell your site administrator at once.`,
        })
      }
      return out
    },

    // ---- password reset -------------------------------------------------------------------

    /** Always answers the same; mails a single-use link valid for one hour when the account exists (queued, not awaited). */
    async requestPasswordReset(email: string) {
      const u = await findByEmail(email)
      if (!u || u.disabledAt) return
      const t = token()
      await db.insert(passwordResets).values({ userId: u.id, tokenHash: sha256(t), expiresAt: new Date(Date.now() + RESET_TTL_MS) })
      const link = `${appUrl}/reset?token=${t}`
      await mailer.send({
        to: u.email, subject: 'Reset your Ratiograph password',
        text: `Someone (hopefully you) asked to reset the password of ${u.email}.\n\nSet a new password here (valid for one hour, once):\n${link}\n\n`
          + 'Setting it signs everyone out of the account and deletes its API keys.\nIf this was not you, ignore this message.',
      })
    },

    /**
     * Sets the new password. The link proves the mailbox, so the address counts as verified; every
     * session, API key and other outstanding link of the account ends here.
     */
    async confirmPasswordReset(t: string, password: string) {
      const hash = await bcrypt.hash(password, BCRYPT_COST)
      const email = await db.transaction(async (tx) => {
        const [r] = await tx.update(passwordResets).set({ usedAt: sql`now()` })
          .where(and(eq(passwordResets.tokenHash, sha256(t)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
          .returning()
        if (!r) throw badLink('reset')
        const [u] = await tx.update(users).set({ passwordHash: hash, emailVerifiedAt: sql`coalesce(${users.emailVerifiedAt}, now())` })
          .where(and(eq(users.id, r.userId), isNull(users.disabledAt))).returning()
        if (!u) throw badLink('reset')
        const revoked = await revokeCredentials(tx, r.userId)
        await audit(tx, { action: 'password-reset', actorUserId: r.userId, target: u.email, details: revoked })
        return normaliseEmail(u.email)
      })
      await throttle.forget(email)
    },

    /** Site admin: a disabled account cannot sign in and loses its sessions, keys and links for good. */
    async setDisabled(auth: Auth, userId: string, disabled: boolean) {
      if (userId === auth.user.id && disabled) throw new HttpProblem(409, 'Conflict', 'you cannot disable your own account')
      return db.transaction(async (tx) => {
        const [u] = await tx.update(users).set({ disabledAt: disabled ? sql`coalesce(${users.disabledAt}, now())` : null })
          .where(eq(users.id, userId)).returning()
        if (!u) throw notFound('user')
        const revoked = disabled ? await revokeCredentials(tx, u.id) : undefined
        await audit(tx, { action: disabled ? 'user-disabled' : 'user-enabled', actorUserId: auth.user.id, target: u.email, details: revoked ?? {} })
        return u
      })
    },

    // ---- API keys -------------------------------------------------------------------------
    async listKeys(userId: string) {
      const rows = await db.select().from(apiKeys).where(eq(apiKeys.userId, userId)).orderBy(sql`${apiKeys.createdAt} desc`)
      return rows.map(keyDto)
    },

    async createKey(auth: Auth, input: { name: string; projectId?: string; access: 'read' | 'write'; expiresAt?: string }) {
      if (auth.via === 'key') throw forbidden('API keys cannot create API keys; use the dashboard')
      const [u] = await db.select().from(users).where(eq(users.id, auth.user.id))
      if (!u?.emailVerifiedAt) throw needsVerification(u ?? auth.user, 'creating API keys')
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

    /**
     * Accepts an invitation: as the signed-in, verified invitee, or by creating the invitee's account
     * (verified: the link came to that mailbox).
     */
    async acceptInvitation(t: string, auth: Auth | undefined, input: { name?: string; password?: string }) {
      const found = await this.lookupInvitation(t)
      let userId: string
      if (found.existing) {
        if (!auth || auth.user.id !== found.existing.id) throw new HttpProblem(401, 'Unauthorized', `sign in as ${found.row.email} to accept this invitation`)
        if (!found.existing.emailVerifiedAt) throw needsVerification(found.existing, 'joining a project')
        userId = found.existing.id
      } else {
        if (!input.name || !input.password) {
          throw new HttpProblem(422, 'Unprocessable Content', 'name and password are needed to create the account',
            [...(!input.name ? [{ path: '/name', message: 'required' }] : []), ...(!input.password ? [{ path: '/password', message: 'required' }] : [])])
        }
        const hash = await bcrypt.hash(input.password, BCRYPT_COST)
        const u = await db.transaction(async (tx) => {
          const created = await insertUser(tx, found.row.email, input.name!.trim(), hash, true)
          if (created) await audit(tx, { action: 'sign-up', actorUserId: created.id, target: found.row.email, details: { via: 'invitation' } })
          return created
        })
        if (!u) throw conflict('an account for this address was created meanwhile; sign in to accept')
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
