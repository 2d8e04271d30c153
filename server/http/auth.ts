import type { NextFunction, Request, Response } from 'express'
import jwt from 'jsonwebtoken'
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto'
import { and, eq, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { apiKeys, memberships, users } from '../db/schema.ts'
import type { Config } from '../config.ts'
import { HttpProblem, forbidden, notFound, unauthorized } from './problem.ts'
import type { AnySpec } from './route.ts'

export const SESSION_COOKIE = 'rg_session'
export const CSRF_COOKIE = 'rg_csrf'
export const CSRF_HEADER = 'x-csrf-token'
export const SESSION_TTL_S = 7 * 24 * 3600
/** A session older than this is renewed on use (sliding expiry). */
const RENEW_AFTER_S = 24 * 3600

export type Role = 'owner' | 'analyst' | 'viewer'
const RANK: Record<Role, number> = { viewer: 1, analyst: 2, owner: 3 }

export interface AuthUser { id: string; email: string; name: string; isSiteAdmin: boolean }
export interface AuthKey { id: string; projectId: string | null; access: 'read' | 'write' }
export interface Auth { user: AuthUser; via: 'session' | 'key'; key?: AuthKey }

declare module 'express-serve-static-core' {
  interface Request { auth?: Auth; projectRole?: Role }
}

export const sha256 = (s: string) => createHash('sha256').update(s).digest('hex')

function parseCookies(header: string | undefined): Record<string, string> {
  const out: Record<string, string> = {}
  for (const part of (header ?? '').split(';')) {
    const i = part.indexOf('=')
    if (i <= 0) continue
    // a value that is not valid percent-encoding is no cookie of ours: ignore it (anonymous), never a 500
    try { out[part.slice(0, i).trim()] = decodeURIComponent(part.slice(i + 1).trim()) } catch { /* skip it */ }
  }
  return out
}

function safeEqual(a: string, b: string) {
  const x = Buffer.from(a), y = Buffer.from(b)
  return x.length === y.length && timingSafeEqual(x, y)
}

interface SessionClaims { sub: string; csrf: string; iat: number; exp: number; /** issue time in ms: sign-out in the same second must still void it */ t: number }

const UUID_RE = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i

/** A verified token is a session only with every claim we issue; anything else counts as no session. */
function sessionClaims(payload: unknown): SessionClaims | null {
  if (!payload || typeof payload !== 'object') return null
  const c = payload as Record<string, unknown>
  const ok = typeof c.sub === 'string' && UUID_RE.test(c.sub) && typeof c.csrf === 'string' && c.csrf.length > 0
    && Number.isFinite(c.iat) && Number.isFinite(c.exp) && Number.isFinite(c.t)
  return ok ? (c as unknown as SessionClaims) : null
}

/** Secure cookies whenever the request came over TLS (a trusted proxy may say so), or always when configured. */
const cookieBase = (res: Response, config: Config) =>
  ({ sameSite: 'lax' as const, secure: config.secureCookies || res.req.secure, path: '/' })

/** Issues the session cookie (httpOnly, SameSite=Lax) and the readable CSRF cookie. */
export function setSession(res: Response, config: Config, userId: string) {
  const csrf = randomBytes(18).toString('base64url')
  const token = jwt.sign({ sub: userId, csrf, t: Date.now() }, config.jwtSecret, { expiresIn: SESSION_TTL_S, algorithm: 'HS256' })
  const base = { ...cookieBase(res, config), maxAge: SESSION_TTL_S * 1000 }
  res.cookie(SESSION_COOKIE, token, { ...base, httpOnly: true })
  res.cookie(CSRF_COOKIE, csrf, { ...base, httpOnly: false })
}

export function clearSession(res: Response, config: Config) {
  const base = cookieBase(res, config)
  res.clearCookie(SESSION_COOKIE, { ...base, httpOnly: true })
  res.clearCookie(CSRF_COOKIE, base)
}

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

/**
 * Resolves who is calling: an API key (Bearer) or the session cookie. Invalid, revoked or expired
 * keys answer 401 at once; an invalid session is treated as anonymous. Cookie-authenticated
 * state-changing requests must echo the CSRF token (double submit bound to the session).
 */
export function authenticate(db: Db, config: Config) {
  return async (req: Request, res: Response, next: NextFunction) => {
    // answers for a caller (the signed-in user's data) must not stay in browser or proxy caches;
    // a route that revalidates with an ETag sets its own header
    res.setHeader('Cache-Control', 'no-store')
    const header = req.headers.authorization
    if (header) {
      const m = /^Bearer\s+(\S+)$/i.exec(header)
      if (!m) throw unauthorized('the Authorization header must be "Bearer <api key>"')
      const [row] = await db.select({
        id: apiKeys.id, projectId: apiKeys.projectId, access: apiKeys.access, expiresAt: apiKeys.expiresAt,
        revokedAt: apiKeys.revokedAt, lastUsedAt: apiKeys.lastUsedAt,
        userId: users.id, email: users.email, name: users.name, isSiteAdmin: users.isSiteAdmin, disabledAt: users.disabledAt,
      }).from(apiKeys).innerJoin(users, eq(users.id, apiKeys.userId)).where(eq(apiKeys.keyHash, sha256(m[1])))
      const now = Date.now()
      if (!row || row.revokedAt || row.disabledAt || (row.expiresAt && row.expiresAt.getTime() <= now)) {
        throw unauthorized('the API key is not valid (unknown, revoked or expired)')
      }
      if (!row.lastUsedAt || now - row.lastUsedAt.getTime() > 5000) {
        await db.update(apiKeys).set({ lastUsedAt: sql`now()` }).where(eq(apiKeys.id, row.id))
      }
      req.auth = {
        via: 'key',
        user: { id: row.userId, email: row.email, name: row.name, isSiteAdmin: false /* keys never act as site admin */ },
        key: { id: row.id, projectId: row.projectId, access: row.access },
      }
      return next()
    }
    const token = parseCookies(req.headers.cookie)[SESSION_COOKIE]
    if (!token) return next()
    let claims: SessionClaims | null
    try {
      claims = sessionClaims(jwt.verify(token, config.jwtSecret, { algorithms: ['HS256'] }))
    } catch {
      return next()
    }
    if (!claims) return next()
    const [user] = await db.select().from(users).where(eq(users.id, claims.sub))
    if (!user || user.disabledAt || user.sessionsValidAfter.getTime() >= claims.t) return next()
    if (STATE_CHANGING.has(req.method)) {
      const sent = req.get(CSRF_HEADER) ?? ''
      if (!safeEqual(sent, claims.csrf)) throw new HttpProblem(403, 'Forbidden', 'missing or wrong CSRF token (send the rg_csrf cookie value in X-CSRF-Token)')
    }
    req.auth = { via: 'session', user: { id: user.id, email: user.email, name: user.name, isSiteAdmin: user.isSiteAdmin } }
    if (Date.now() / 1000 - claims.iat > RENEW_AFTER_S) setSession(res, config, user.id)
    next()
  }
}

/** A member's role as a caller acts with it: an API key caps it (read → viewer, write → analyst). */
export function capRole(auth: Auth, role: Role): Role {
  if (!auth.key) return role
  const cap: Role = auth.key.access === 'read' ? 'viewer' : 'analyst'
  return RANK[role] <= RANK[cap] ? role : cap
}

/** The role a caller acts with in a project: the lesser of membership and key scope; null → 404. */
export async function effectiveRole(db: Db, auth: Auth, projectId: string): Promise<Role | null> {
  if (auth.key?.projectId && auth.key.projectId !== projectId) return null
  const [m] = await db.select({ role: memberships.role }).from(memberships)
    .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, auth.user.id)))
  return m ? capRole(auth, m.role) : null
}

/** Route guard built from the route's declared access; the server is the gate for every route. */
export function guardFor(db: Db) {
  return (spec: AnySpec) =>
    async (req: Request, _res: Response, next: (err?: unknown) => void) => {
      const access = spec.access
      const media = spec.bodyContentType ?? 'application/json'
      if (spec.body && !req.is(media) && req.headers['content-type'] !== undefined) {
        return next(new HttpProblem(415, 'Unsupported Media Type', `send ${media}`))
      }
      if (access === 'public' || access === 'optional') return next()
      const auth = req.auth
      if (!auth) return next(unauthorized())
      if (auth.key && spec.write && auth.key.access !== 'write') return next(forbidden('this API key is read-only'))
      if (access === 'user') return next()
      if (access === 'admin') return next(auth.user.isSiteAdmin ? undefined : forbidden('site administrators only'))
      const projectId = String(req.params.projectId ?? '')
      if (!projectId || !UUID_RE.test(projectId)) return next(notFound('project'))
      const role = await effectiveRole(db, auth, projectId)
      if (!role) return next(notFound('project'))
      if (RANK[role] < RANK[access]) return next(forbidden(`this needs the ${access} role; you act as ${role}`))
      req.projectRole = role
      next()
    }
}

export function requireAuth(req: Request): Auth {
  if (!req.auth) throw unauthorized()
  return req.auth
}
