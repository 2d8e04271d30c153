import type { Db } from '../db/client.ts'
import { auditEvents } from '../db/schema.ts'

export type AuditAction =
  | 'sign-in' | 'sign-in-failed' | 'sign-up' | 'sign-up-existing-address' | 'password-reset' | 'api-key-created' | 'api-key-revoked'
  | 'email-verified' | 'email-change-requested' | 'email-changed'
  | 'member-added' | 'member-role-changed' | 'member-removed' | 'invitation-sent' | 'invitation-revoked'
  | 'assumptions-changed' | 'intake-undone' | 'spectra-uploaded' | 'project-created' | 'project-renamed' | 'project-deleted' | 'user-disabled' | 'user-enabled'

/** Appends one audit event; runs inside the caller's transaction when given one. */
export async function audit(db: Pick<Db, 'insert'>, e: {
  action: AuditAction; actorUserId?: string | null; projectId?: string | null; target?: string; details?: Record<string, unknown>; ip?: string
}) {
  await db.insert(auditEvents).values({
    action: e.action, actorUserId: e.actorUserId ?? null, projectId: e.projectId ?? null,
    target: e.target ?? null, details: e.details ?? {}, ip: e.ip ?? null,
  })
}
