import { rateLimit } from 'express-rate-limit'
import type { AppDeps } from '../app.ts'
import { clearSession, requireAuth, setSession } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { accountsService, publicUser } from '../services/accounts.service.ts'
import {
  AcceptedSchema, AcceptInvitationSchema, ApiKeyCreateSchema, ApiKeyCreatedSchema, ApiKeySchema, EmailChangeSchema, EmailVerifiedSchema, IdPathSchema,
  InvitationAcceptedSchema, InvitationInfoSchema, ListOf, MeSchema, ResetConfirmSchema, ResetRequestSchema, SignInSchema, SignUpSchema, TokenPathSchema,
  UserAnswerSchema, VerifyEmailSchema,
} from '../../shared/schemas/api.schema.ts'

export function accountsRoutes(r: Routes, deps: AppDeps) {
  const accounts = accountsService(deps.db, deps.mailer, deps.config.appUrl)
  const authLimiter = rateLimit({
    windowMs: 60_000, limit: deps.config.authRateLimit, standardHeaders: 'draft-8', legacyHeaders: false,
    handler: (_req, _res, next) => next(new HttpProblem(429, 'Too Many Requests', 'too many attempts from this address; wait a minute', undefined, { 'Retry-After': '60' })),
  })
  const tag = 'Accounts'
  // the per-address limit of sign-in, sign-up, resets and links (rateLimit: it counts refused attempts too)

  route(r, { method: 'post', path: '/auth/sign-up', operationId: 'signUp', rateLimit: authLimiter, tag, summary: 'Create an account; a link mailed to the address verifies it',
    description: 'Answers 201 with the same shape whether or not the address already has an account (its owner is mailed a notice instead), '
      + 'and sets no session: sign in next. API keys and joining projects need the verified address.',
    access: 'public', body: SignUpSchema,
    responses: { 201: { description: 'created (or a notice mailed to the existing owner)', schema: UserAnswerSchema } } },
  async (req, res, { body }) => {
    res.status(201).json({ user: await accounts.signUp(body, req.ip) })
  })

  route(r, { method: 'post', path: '/auth/sign-in', operationId: 'signIn', rateLimit: authLimiter, tag, summary: 'Sign in; sets the session and CSRF cookies', access: 'public', body: SignInSchema,
    responses: { 200: { description: 'signed in', schema: UserAnswerSchema }, 401: { description: 'wrong e-mail or password' }, 429: { description: 'rate limited or backing off' } } },
  async (req, res, { body }) => {
    const u = await accounts.signIn(body.email, body.password, req.ip)
    setSession(res, deps.config, u.id)
    res.json({ user: publicUser(u) })
  })

  route(r, { method: 'post', path: '/auth/sign-out', operationId: 'signOut', tag, summary: 'Sign out (voids the session)', access: 'optional', responses: { 204: { description: 'signed out' } } },
  async (req, res) => {
    if (req.auth?.via === 'session') await accounts.signOut(req.auth.user.id)
    clearSession(res, deps.config)
    res.status(204).end()
  })

  route(r, { method: 'post', path: '/auth/verify-email', operationId: 'verifyEmail', rateLimit: authLimiter, tag, summary: 'Open a mailed verification link (signed in as its account)',
    description: 'Verifies the account\'s address, or finishes an e-mail change: then every other session and every API key ends, and this answer signs you in again.',
    access: 'user', write: true, body: VerifyEmailSchema,
    responses: { 200: { description: 'verified', schema: EmailVerifiedSchema }, 400: { description: 'invalid, used or expired link' }, 403: { description: 'the link belongs to another account' } } },
  async (req, res, { body }) => {
    const out = await accounts.verifyEmail(requireAuth(req), body.token, req.ip)
    if (out.changed) setSession(res, deps.config, out.userId)
    res.json({ email: out.changed ? out.to : requireAuth(req).user.email, changed: out.changed })
  })

  route(r, { method: 'post', path: '/auth/verify-email/resend', operationId: 'resendVerificationEmail', rateLimit: authLimiter, tag, summary: 'Mail a new verification link to your address (nothing when verified)',
    access: 'user', write: true, responses: { 202: { description: 'accepted', schema: AcceptedSchema } } },
  async (req, res) => {
    await accounts.resendVerification(requireAuth(req))
    res.status(202).json({ status: 'if the address is not verified yet, a link was sent' })
  })

  route(r, { method: 'post', path: '/me/email', operationId: 'changeEmail', rateLimit: authLimiter, tag, summary: 'Move your account to a new address (finished by a link mailed there)',
    description: 'Needs the current password. The same answer whether or not the address is free; opening the link ends every session and API key of the account.',
    access: 'user', write: true, body: EmailChangeSchema,
    responses: { 202: { description: 'accepted; a link was mailed to the new address', schema: AcceptedSchema }, 403: { description: 'wrong current password' } } },
  async (req, res, { body }) => {
    await accounts.requestEmailChange(requireAuth(req), body.email, body.password, req.ip)
    res.status(202).json({ status: 'open the link mailed to the new address to finish the change' })
  })

  route(r, { method: 'post', path: '/auth/password-reset', operationId: 'requestPasswordReset', rateLimit: authLimiter, tag, summary: 'Mail a password-reset link (always 202)', access: 'public', body: ResetRequestSchema,
    responses: { 202: { description: 'accepted', schema: AcceptedSchema } } },
  async (_req, res, { body }) => {
    await accounts.requestPasswordReset(body.email)
    res.status(202).json({ status: 'if the account exists, a link was sent' })
  })

  route(r, { method: 'post', path: '/auth/password-reset/confirm', operationId: 'confirmPasswordReset', rateLimit: authLimiter, tag, summary: 'Set a new password with a reset token', access: 'public', body: ResetConfirmSchema,
    description: 'Every session, API key and other outstanding reset link of the account ends; the address counts as verified.',
    responses: { 204: { description: 'password changed' }, 400: { description: 'invalid or used token' } } },
  async (_req, res, { body }) => {
    await accounts.confirmPasswordReset(body.token, body.password)
    res.status(204).end()
  })

  route(r, { method: 'get', path: '/invitations/:token', operationId: 'getInvitation', tag, summary: 'Look up an invitation', access: 'public', params: TokenPathSchema,
    responses: { 200: { description: 'the invitation', schema: InvitationInfoSchema } } },
  async (_req, res, { params }) => {
    const f = await accounts.lookupInvitation(params.token)
    res.json({ projectName: f.projectName, email: f.row.email, role: f.row.role, expiresAt: f.row.expiresAt.toISOString(), accountExists: f.accountExists })
  })

  route(r, { method: 'post', path: '/invitations/:token/accept', operationId: 'acceptInvitation', rateLimit: authLimiter, tag, summary: 'Accept an invitation (creates the account for a new e-mail)', access: 'optional',
    params: TokenPathSchema, body: AcceptInvitationSchema, responses: { 200: { description: 'joined', schema: InvitationAcceptedSchema } } },
  async (req, res, { params, body }) => {
    const out = await accounts.acceptInvitation(params.token, req.auth, body)
    if (!req.auth) setSession(res, deps.config, out.userId)
    res.json({ projectId: out.projectId })
  })

  route(r, { method: 'get', path: '/me', operationId: 'getMe', tag, summary: 'The signed-in user (or the key\'s owner) with project roles', access: 'user',
    responses: { 200: { description: 'me', schema: MeSchema } } },
  async (req, res) => { res.json(await accounts.me(requireAuth(req))) })

  route(r, { method: 'get', path: '/me/api-keys', operationId: 'listApiKeys', tag: 'API keys', summary: 'Your API keys', access: 'user',
    responses: { 200: { description: 'keys', schema: ListOf(ApiKeySchema) } } },
  async (req, res) => { res.json({ items: await accounts.listKeys(requireAuth(req).user.id) }) })

  route(r, { method: 'post', path: '/me/api-keys', operationId: 'createApiKey', tag: 'API keys', summary: 'Create an API key (the key is shown only here)', access: 'user', write: true,
    body: ApiKeyCreateSchema, responses: { 201: { description: 'created', schema: ApiKeyCreatedSchema } } },
  async (req, res, { body }) => { res.status(201).json(await accounts.createKey(requireAuth(req), body)) })

  route(r, { method: 'delete', path: '/me/api-keys/:id', operationId: 'revokeApiKey', tag: 'API keys', summary: 'Revoke an API key at once', access: 'user', write: true,
    params: IdPathSchema, responses: { 204: { description: 'revoked' } } },
  async (req, res, { params }) => { await accounts.revokeKey(requireAuth(req), params.id); res.status(204).end() })
}
