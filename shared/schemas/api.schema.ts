import { z } from 'zod'
import { NewPasswordSchema } from './password.schema.ts'
import { positiveBigId, positiveInt4, textBlock, textLine } from './text.ts'

export const RoleSchema = z.enum(['owner', 'analyst', 'viewer'])
const uuid = z.uuid()

export const SignUpSchema = z.object({
  email: z.email().max(200),
  password: NewPasswordSchema,
  name: textLine().trim().min(1).max(120),
}).strict().meta({ id: 'SignUp' })
export const SignInSchema = z.object({ email: textLine().max(200), password: z.string().max(200) }).strict().meta({ id: 'SignIn' })
export const ResetRequestSchema = z.object({ email: textLine().max(200) }).strict()
/** The single-use tokens of reset, invitation and verification links (base64url). */
const LinkToken = z.string().min(10).max(200).regex(/^[A-Za-z0-9_-]+$/, 'must be the token from the link (letters, digits, - and _)')
export const ResetConfirmSchema = z.object({ token: LinkToken, password: NewPasswordSchema }).strict()
export const AcceptInvitationSchema = z.object({ name: textLine().trim().min(1).max(120).optional(), password: NewPasswordSchema.optional() }).strict()
export const VerifyEmailSchema = z.object({ token: LinkToken }).strict()
export const EmailChangeSchema = z.object({
  email: z.email().max(200).meta({ description: 'the new address; a link mailed there finishes the change' }),
  password: z.string().max(200).meta({ description: 'your current password' }),
}).strict()
export const TokenPathSchema = z.object({ token: LinkToken })

export const ApiKeyCreateSchema = z.object({
  name: textLine().trim().min(1).max(120),
  projectId: uuid.optional().meta({ description: 'limit the key to one project (default: all of your projects)' }),
  access: z.enum(['read', 'write']),
  expiresAt: z.iso.datetime({ offset: true }).optional(),
}).strict().meta({ id: 'ApiKeyCreate' })
export const IdPathSchema = z.object({ id: uuid })

export const ProjectCreateSchema = z.object({ name: textLine().trim().min(1).max(200), description: textBlock().max(5000).optional() }).strict().meta({ id: 'ProjectCreate' })
export const ProjectUpdateSchema = z.object({ name: textLine().trim().min(1).max(200).optional(), description: textBlock().max(5000).optional() }).strict()
export const ProjectPathSchema = z.object({ projectId: uuid })
export const MemberPathSchema = z.object({ projectId: uuid, userId: uuid })
export const RoleChangeSchema = z.object({ role: RoleSchema }).strict()
export const InvitationCreateSchema = z.object({ email: z.email().max(200), role: RoleSchema }).strict()
export const InvitationPathSchema = z.object({ projectId: uuid, id: uuid })
export const GalaxyPathSchema = z.object({ projectId: uuid, galaxyId: textLine().min(1).max(120) })
export const GalaxyRevisionPathSchema = GalaxyPathSchema.extend({ revision: positiveInt4() })
export const JobPathSchema = z.object({ projectId: uuid, jobId: uuid })
export const IntakePathSchema = z.object({ projectId: uuid, intakeId: uuid })
export const UserPathSchema = z.object({ userId: uuid })
export const UserAdminUpdateSchema = z.object({ disabled: z.boolean() }).strict()
export const OutboxPathSchema = z.object({ id: positiveBigId() })

// ---- responses (documented shapes; the server builds them) --------------------------------------
export const UserSchema = z.object({ id: uuid, email: z.string(), name: z.string(), isSiteAdmin: z.boolean(), createdAt: z.string() }).meta({ id: 'User' })
export const MeSchema = UserSchema.extend({
  via: z.enum(['session', 'key']),
  emailVerified: z.boolean().meta({ description: 'API keys and joining projects need a verified address' }),
  projects: z.array(z.object({ id: uuid, name: z.string(), role: RoleSchema })),
}).meta({ id: 'Me' })
export const ApiKeySchema = z.object({
  id: uuid, name: z.string(), prefix: z.string(), projectId: uuid.nullable(), access: z.enum(['read', 'write']),
  expiresAt: z.string().nullable(), createdAt: z.string(), lastUsedAt: z.string().nullable(), revokedAt: z.string().nullable(),
}).meta({ id: 'ApiKey' })
export const ApiKeyCreatedSchema = ApiKeySchema.extend({ key: z.string().meta({ description: 'the secret; shown only in this answer' }) }).meta({ id: 'ApiKeyCreated' })
export const ProjectSchema = z.object({
  id: uuid, name: z.string(), description: z.string(), role: RoleSchema.nullable(), createdAt: z.string(),
  galaxyCount: z.number().int(), currentRevision: z.number().int(), resultsRevision: z.number().int(),
}).meta({ id: 'Project' })
export const IntakeSchema = z.object({
  id: uuid, kind: z.enum(['api', 'csv', 'spectra']).meta({ description: '`spectra`: the lines measured by the fit of uploaded spectra (or a refit)' }), status: z.enum(['staged', 'committing', 'committed', 'undone', 'rejected', 'failed']), fileName: z.string().nullable(),
  createdAt: z.string(), finishedAt: z.string().nullable(), by: z.object({ id: uuid, name: z.string().nullable() }).nullable(),
  rowsTotal: z.number().int(), rowsAccepted: z.number().int(), rowsRejected: z.number().int(), revision: z.number().int().nullable(),
}).meta({ id: 'Intake' })
export const BatchResponseSchema = z.object({
  intake: IntakeSchema, inserted: z.number().int(), updated: z.number().int(), revision: z.number().int(), methodVersion: z.string(),
  replaced: z.number().int(), merged: z.number().int(), skipped: z.number().int().meta({ description: 'IDs the project had, left as they were (onExisting=skip)' }),
}).meta({ id: 'BatchResponse' })
export const JobSchema = z.object({
  id: uuid, kind: z.string(), status: z.enum(['queued', 'running', 'done', 'failed']), revision: z.number().int().nullable(),
  total: z.number().int(), done: z.number().int(), error: z.string().nullable(), createdAt: z.string(), finishedAt: z.string().nullable(),
  intakeId: uuid.nullable().meta({ description: 'the intake an `intake` job stores, or under which a `fit` job writes the galaxies\' lines' }),
  uploadId: uuid.nullable().meta({ description: 'the spectra upload a `fit` job fits' }),
  heartbeatAt: z.string().nullable().meta({ description: 'last progress of the worker' }),
  resumedAt: z.string().nullable().meta({ description: 'when a job whose worker had gone (a crash, a restart) was taken up again' }),
  resumeCount: z.number().int(),
  resumedFrom: z.number().int().nullable().meta({ description: 'how far it had come when resumed (a recompute continues from there; an intake, stored all or nothing, starts again)' }),
}).meta({ id: 'Job' })
export const ProblemSchema = z.object({
  type: z.string(), title: z.string(), status: z.number().int(), detail: z.string().optional(),
  errors: z.array(z.object({ path: z.string().meta({ description: 'JSON Pointer (RFC 6901) into the request' }), message: z.string() })),
}).meta({ id: 'Problem' })
export const ListOf = <T extends z.ZodType>(item: T) => z.object({ items: z.array(item) })

// accounts
export const UserAnswerSchema = z.object({ user: UserSchema })
export const EmailVerifiedSchema = z.object({ email: z.string(), changed: z.boolean() })
/** The answer of requests whose effect arrives by mail: what to expect, the same whatever the outcome. */
export const AcceptedSchema = z.object({ status: z.string().meta({ description: 'what happens next' }) }).meta({ id: 'Accepted' })
/** An invitation as its link shows it (GET /invitations/{token}). */
export const InvitationInfoSchema = z.object({ projectName: z.string(), email: z.string(), role: RoleSchema, expiresAt: z.string(), accountExists: z.boolean() })
export const InvitationAcceptedSchema = z.object({ projectId: z.string() })

// team and audit
export const MemberSchema = z.object({ userId: z.string(), email: z.string(), name: z.string(), role: RoleSchema, joinedAt: z.string() })
export const InvitationSchema = z.object({ id: z.string(), email: z.string(), role: RoleSchema, expiresAt: z.string(), acceptedAt: z.string().nullable(), createdAt: z.string() }).meta({ id: 'Invitation' })
export const AuditEventSchema = z.object({
  id: z.number().int(), action: z.string(), target: z.string().nullable(),
  details: z.record(z.string(), z.unknown()).meta({ description: 'what the action changed; its fields depend on the action' }),
  createdAt: z.string(), actor: z.object({ id: z.string(), name: z.string().nullable(), email: z.string().nullable() }).nullable(),
})

// site admin
export const AdminUserSchema = UserSchema.extend({ disabledAt: z.string().nullable() }).meta({ id: 'AdminUser' })
/** A message the local mail catcher captured (GET /admin/outbox). */
export const OutboxItemSchema = z.object({ id: z.number().int(), to: z.string(), from: z.string(), subject: z.string(), receivedAt: z.string() })
export const OutboxMessageSchema = OutboxItemSchema.extend({ text: z.string(), html: z.string().nullable() })
