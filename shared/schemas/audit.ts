import { z } from 'zod';

/** What an audit entry is about: the lab's records, and members' sign-ins and account events. */
export const AUDIT_KINDS = ['lab', 'member', 'invite', 'machine', 'material', 'part', 'request', 'plan', 'queue', 'run', 'sign_in', 'account'] as const;
export type AuditKind = (typeof AUDIT_KINDS)[number];

const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}(T[\d:.]+(Z|[+-]\d{2}:\d{2})?)?$/, 'must be a date (YYYY-MM-DD) or a date and time')
  .refine((s) => !Number.isNaN(Date.parse(s)), 'must be a real date');

/** Filters and paging of `GET /api/labs/:labId/audit`: newest first, `before` is the `next` cursor of the previous page. */
export const auditQuerySchema = z.strictObject({
  kind: z.enum(AUDIT_KINDS).optional(),
  actor: z.string().min(1).max(100).optional(),
  from: day.optional(),
  to: day.optional(),
  before: z.string().regex(/^\d{1,18}$/, 'must be the cursor from the previous page').optional(),
  limit: z.coerce.number().int().min(1, 'must be at least 1').max(200, 'must be at most 200').default(50),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;

export const auditEntryViewSchema = z.object({
  id: z.string(),
  at: z.string(),
  kind: z.string(),
  action: z.string(),
  actor: z.object({ id: z.string(), name: z.string().nullable() }).nullable(),
  target: z.object({ id: z.string().nullable(), label: z.string().nullable() }),
  before: z.record(z.string(), z.unknown()).nullable(),
  after: z.record(z.string(), z.unknown()).nullable(),
});
export type AuditEntryView = z.infer<typeof auditEntryViewSchema>;
export const auditPageViewSchema = z.object({ entries: z.array(auditEntryViewSchema), next: z.string().nullable() });
export type AuditPageView = z.infer<typeof auditPageViewSchema>;
