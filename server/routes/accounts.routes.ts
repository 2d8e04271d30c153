import type { Router } from 'express'
import { rateLimit } from 'express-rate-limit'
import { z } from 'zod'
import type { AppDeps } from '../app.ts'
import { clearSession, requireAuth, setSession } from '../http/auth.ts'
import { route } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { accountsService, publicUser } from '../services/accounts.service.ts'
import {
  AcceptInvitationSchema, ApiKeyCreateSchema, ApiKeyCreatedSchema, ApiKeySchema, IdPathSchema, ListOf, MeSchema,
  ResetConfirmSchema, ResetRequestSchema, SignInSchema, SignUpSchema, TokenPathSchema, UserSchema,
} from '../../shared/schemas/api.schema.ts'
import type { Guard } from './index.ts'

export function accountsRoutes(r: Router, deps: AppDeps, guard: Guard) {
  const accounts = accountsService(deps.db, deps.mailer, deps.config.appUrl)
  const authLimiter = rateLimit({
    windowMs: 60_000, limit: deps.config.authRateLimit, standardHeaders: 'draft-8', legacyHeaders: false,
    handler: (_req, _res, next) => next(new HttpProblem(429, 'Too Many Requests', 'too many attempts from this address; wait a minute', undefined, { 'Retry-After': '60' })),
  })
  const limited = (g: Guard) => (spec: Parameters<Guard>[0]) => {
    const inner = g(spec)
    return (req: Parameters<ReturnType<Guard>>[0], res: Parameters<ReturnType<Guard>>[1], next: Parameters<ReturnType<Guard>>[2]) =>
      authLimiter(req, res, (err?: unknown) => (err ? next(err) : inner(req, res, next)))
  }
  const tag = 'Accounts'

  route(r, { method: 'post', path: '/auth/sign-up', tag, summary: 'Create an account (and sign in)', access: 'public', body: SignUpSchema,
    responses: { 201: { description: 'created', schema: z.object({ user: UserSchema }) }, 409: { description: 'e-mail taken' } } },
  limited(guard), async (req, res, { body }) => {
    const u = await accounts.signUp(body, req.ip)
    setSession(res, deps.config, u.id)
    res.status(201).json({ user: publicUser(u) })
  })

  route(r, { method: 'post', path: '/auth/sign-in', tag, summary: 'Sign in; sets the session and CSRF cookies', access: 'public', body: SignInSchema,
    responses: { 200: { description: 'signed in', schema: z.object({ user: UserSchema }) }, 401: { description: 'wrong e-mail or password' }, 429: { description: 'rate limited or backing off' } } },
  limited(guard), async (req, res, { body }) => {
    const u = await accounts.signIn(body.email, body.password, req.ip)
    setSession(res, deps.config, u.id)
    res.json({ user: publicUser(u) })
  })

  route(r, { method: 'post', path: '/auth/sign-out', tag, summary: 'Sign out (voids the session)', access: 'optional', responses: { 204: { description: 'signed out' } } },
  guard, async (req, res) => {
    if (req.auth?.via === 'session') await accounts.signOut(req.auth.user.id)
    clearSession(res, deps.config)
    res.status(204).end()
  })

  route(r, { method: 'post', path: '/auth/password-reset', tag, summary: 'Mail a password-reset link (always 202)', access: 'public', body: ResetRequestSchema,
    responses: { 202: { description: 'accepted' } } },
  limited(guard), async (_req, res, { body }) => {
    await accounts.requestPasswordReset(body.email)
    res.status(202).json({ status: 'if the account exists, a link was sent' })
  })

  route(r, { method: 'post', path: '/auth/password-reset/confirm', tag, summary: 'Set a new password with a reset token', access: 'public', body: ResetConfirmSchema,
    responses: { 204: { description: 'password changed' }, 400: { description: 'invalid or used token' } } },
  limited(guard), async (_req, res, { body }) => {
    await accounts.confirmPasswordReset(body.token, body.password)
    res.status(204).end()
  })

  route(r, { method: 'get', path: '/invitations/:token', tag, summary: 'Look up an invitation', access: 'public', params: TokenPathSchema,
    responses: { 200: { description: 'the invitation', schema: z.object({ projectName: z.string(), email: z.string(), role: z.string(), expiresAt: z.string(), accountExists: z.boolean() }) } } },
  guard, async (_req, res, { params }) => {
    const f = await accounts.lookupInvitation(params.token)
    res.json({ projectName: f.projectName, email: f.row.email, role: f.row.role, expiresAt: f.row.expiresAt.toISOString(), accountExists: f.accountExists })
  })

  route(r, { method: 'post', path: '/invitations/:token/accept', tag, summary: 'Accept an invitation (creates the account for a new e-mail)', access: 'optional',
    params: TokenPathSchema, body: AcceptInvitationSchema, responses: { 200: { description: 'joined', schema: z.object({ projectId: z.string() }) } } },
  limited(guard), async (req, res, { params, body }) => {
    const out = await accounts.acceptInvitation(params.token, req.auth, body)
    if (!req.auth) setSession(res, deps.config, out.userId)
    res.json({ projectId: out.projectId })
  })

  route(r, { method: 'get', path: '/me', tag, summary: 'The signed-in user (or the key\'s owner) with project roles', access: 'user',
    responses: { 200: { description: 'me', schema: MeSchema } } },
  guard, async (req, res) => { res.json(await accounts.me(requireAuth(req))) })

  route(r, { method: 'get', path: '/me/api-keys', tag: 'API keys', summary: 'Your API keys', access: 'user',
    responses: { 200: { description: 'keys', schema: ListOf(ApiKeySchema) } } },
  guard, async (req, res) => { res.json({ items: await accounts.listKeys(requireAuth(req).user.id) }) })

  route(r, { method: 'post', path: '/me/api-keys', tag: 'API keys', summary: 'Create an API key (the key is shown only here)', access: 'user', write: true,
    body: ApiKeyCreateSchema, responses: { 201: { description: 'created', schema: ApiKeyCreatedSchema } } },
  guard, async (req, res, { body }) => { res.status(201).json(await accounts.createKey(requireAuth(req), body)) })

  route(r, { method: 'delete', path: '/me/api-keys/:id', tag: 'API keys', summary: 'Revoke an API key at once', access: 'user', write: true,
    params: IdPathSchema, responses: { 204: { description: 'revoked' } } },
  guard, async (req, res, { params }) => { await accounts.revokeKey(requireAuth(req), params.id); res.status(204).end() })
}
