import { desc, eq } from 'drizzle-orm'
import type { AppDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { notFound } from '../http/problem.ts'
import { outboxMessages, users } from '../db/schema.ts'
import { accountsService, publicUser } from '../services/accounts.service.ts'
import {
  AdminUserSchema, ListOf, OutboxItemSchema, OutboxMessageSchema, OutboxPathSchema, UserAdminUpdateSchema, UserPathSchema,
} from '../../shared/schemas/api.schema.ts'

export function adminRoutes(r: Routes, deps: AppDeps) {
  const { db } = deps
  const accounts = accountsService(db, deps.mailer, deps.config.appUrl)
  const tag = 'Site admin'
  route(r, { method: 'get', path: '/admin/users', operationId: 'listUsers', tag, summary: 'All accounts', access: 'admin', responses: { 200: { description: 'users', schema: ListOf(AdminUserSchema) } } },
    async (_req, res) => {
      const rows = await db.select().from(users).orderBy(users.email)
      res.json({ items: rows.map((u) => ({ ...publicUser(u), disabledAt: u.disabledAt?.toISOString() ?? null })) })
    })

  route(r, { method: 'patch', path: '/admin/users/:userId', operationId: 'setUserDisabled', tag, summary: 'Disable or enable an account (a disabled account cannot sign in; its sessions and keys end for good)', access: 'admin', write: true,
    params: UserPathSchema, body: UserAdminUpdateSchema, responses: { 200: { description: 'updated', schema: AdminUserSchema } } },
  async (req, res, { params, body }) => {
    const u = await accounts.setDisabled(requireAuth(req), params.userId, body.disabled)
    res.json({ ...publicUser(u), disabledAt: u.disabledAt?.toISOString() ?? null })
  })

  route(r, { method: 'get', path: '/admin/outbox', operationId: 'listOutbox', tag, summary: 'Mail captured by the local mail catcher', access: 'admin',
    responses: { 200: { description: 'messages, newest first', schema: ListOf(OutboxItemSchema) } } },
  async (_req, res) => {
    const rows = await db.select().from(outboxMessages).orderBy(desc(outboxMessages.id)).limit(500)
    res.json({ items: rows.map((m) => ({ id: m.id, to: m.toAddress, from: m.fromAddress, subject: m.subject, receivedAt: m.receivedAt.toISOString() })) })
  })

  route(r, { method: 'get', path: '/admin/outbox/:id', operationId: 'getOutboxMessage', tag, summary: 'One captured message', access: 'admin', params: OutboxPathSchema,
    responses: { 200: { description: 'message', schema: OutboxMessageSchema } } },
  async (_req, res, { params }) => {
    const [m] = await db.select().from(outboxMessages).where(eq(outboxMessages.id, params.id))
    if (!m) throw notFound('message')
    res.json({ id: m.id, to: m.toAddress, from: m.fromAddress, subject: m.subject, receivedAt: m.receivedAt.toISOString(), text: m.text, html: m.html })
  })
}
