import { z } from 'zod';

export const ROLES = ['designer', 'planner', 'lead', 'operator'] as const;
export type Role = (typeof ROLES)[number];
export const roleSchema = z.enum(ROLES);
export const rolesSchema = z
  .array(roleSchema)
  .min(1, 'choose at least one role')
  .max(4)
  .transform((roles) => ROLES.filter((r) => roles.includes(r)));

export const PASSWORD_MIN = 10;
export const emailSchema = z
  .string()
  .trim()
  .max(254, 'must be at most 254 characters')
  .pipe(z.email('must be an e-mail address'))
  .transform((e) => e.toLowerCase());
export const passwordSchema = z
  .string()
  .min(PASSWORD_MIN, `must be at least ${PASSWORD_MIN} characters`)
  .max(200, 'must be at most 200 characters');
export const personNameSchema = z.string().trim().min(1, 'is required').max(120, 'must be at most 120 characters');
export const labNameSchema = z.string().trim().min(1, 'is required').max(120, 'must be at most 120 characters');

export const signUpSchema = z.strictObject({
  email: emailSchema,
  password: passwordSchema,
  name: personNameSchema,
  labName: labNameSchema,
});
export const signInSchema = z.strictObject({
  email: emailSchema,
  password: z.string().min(1, 'is required').max(200),
});
export const inviteCreateSchema = z.strictObject({ email: emailSchema, roles: rolesSchema });
// An existing account proves itself with whatever its password is; the
// length rule applies only when the invite makes a new account (checked there).
export const inviteAcceptSchema = z.strictObject({
  name: personNameSchema.optional(),
  password: z.string().min(1, 'is required').max(200, 'must be at most 200 characters').optional(),
});
export const passwordChangeSchema = z.strictObject({
  currentPassword: z.string().min(1, 'is required').max(200, 'must be at most 200 characters'),
  newPassword: passwordSchema,
});
export const memberUpdateSchema = z.strictObject({ roles: rolesSchema });

export type SignUpInput = z.infer<typeof signUpSchema>;
export type SignInInput = z.infer<typeof signInSchema>;

// ---------------------------------------------------------------------------
// Answers (the server is typed by them, the client parses with them)

const isoTime = z.string();

export const userViewSchema = z.object({ id: z.string(), email: z.string(), name: z.string() });
export const labSummaryViewSchema = z.object({ id: z.string(), name: z.string(), roles: z.array(roleSchema) });
/** The signed-in user and their labs. */
export const meViewSchema = z.object({ user: userViewSchema, labs: z.array(labSummaryViewSchema) });
export type UserView = z.infer<typeof userViewSchema>;
export type LabSummaryView = z.infer<typeof labSummaryViewSchema>;
export type MeResponse = z.infer<typeof meViewSchema>;

export const memberViewSchema = z.object({ userId: z.string(), email: z.string(), name: z.string(), roles: z.array(roleSchema), joinedAt: isoTime });
export type MemberView = z.infer<typeof memberViewSchema>;

export const inviteViewSchema = z.object({
  id: z.string(),
  email: z.string(),
  roles: z.array(roleSchema),
  createdAt: isoTime,
  expiresAt: isoTime,
  acceptedAt: isoTime.nullable(),
  /** The id of the member who sent it. */
  invitedBy: z.string().nullable(),
});
export type InviteView = z.infer<typeof inviteViewSchema>;

/** What an invite link offers, to anyone holding the token. */
export const invitePreviewViewSchema = z.object({
  labName: z.string(),
  email: z.string(),
  roles: z.array(roleSchema),
  existingUser: z.boolean(),
  expiresAt: isoTime,
});
export type InvitePreviewView = z.infer<typeof invitePreviewViewSchema>;
