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
/** Asking for a password reset link: the answer is the same whether or not the address has an account. */
export const resetRequestSchema = z.strictObject({ email: emailSchema });
/** Setting a new password with the token from the mailed link. */
export const resetSchema = z.strictObject({
  token: z.string().min(1, 'is required').max(200, 'must be at most 200 characters'),
  password: passwordSchema,
});
/** ISO 4217 codes, as the runtime's ICU data lists them (Intl.supportedValuesOf). */
const CURRENCY_CODES: ReadonlySet<string> = new Set(typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('currency') : []);
/** A currency as its three-letter ISO 4217 code ("eur" is read as "EUR"). */
export const currencySchema = z
  .string()
  .trim()
  .toUpperCase()
  .regex(/^[A-Z]{3}$/, 'must be a three-letter ISO 4217 code such as EUR, USD or CHF')
  .refine((c) => CURRENCY_CODES.size === 0 || CURRENCY_CODES.has(c), 'is not an ISO 4217 currency code');
/**
 * The packing density (parts' volume over the powder cake's, in percent) below
 * which review flags a plan; 0 turns the flag off. Up to 50 %: no powder-bed
 * build packs denser than that, so a higher figure would flag every plan.
 */
export const minPackingDensitySchema = z
  .number({ error: 'must be a number of percent' })
  .min(0, 'must be 0 % (no flag) or more')
  .max(50, 'must be at most 50 %');
/**
 * The lab's settings a lead may change, each on its own: `secondApproval: null`
 * goes back to the default; `currency` is the code every amount of money is in;
 * `minPackingDensityPercent` the density below which review flags a plan.
 */
export const labSettingsUpdateSchema = z
  .strictObject({
    secondApproval: z.boolean().nullable().optional(),
    currency: currencySchema.optional(),
    minPackingDensityPercent: minPackingDensitySchema.optional(),
  })
  .refine((s) => s.secondApproval !== undefined || s.currency !== undefined || s.minPackingDensityPercent !== undefined, {
    message: 'name a setting to change: secondApproval, currency or minPackingDensityPercent',
  });
export type LabSettingsUpdate = z.infer<typeof labSettingsUpdateSchema>;

export type SignUpInput = z.infer<typeof signUpSchema>;
export type SignInInput = z.infer<typeof signInSchema>;
export type ResetInput = z.infer<typeof resetSchema>;

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

/** One of the caller's own sessions; `id` is a digest, never the session's secret id. */
export const sessionViewSchema = z.object({
  id: z.string(),
  createdAt: isoTime,
  lastSeenAt: isoTime,
  userAgent: z.string().nullable(),
  ipAddress: z.string().nullable(),
  current: z.boolean(),
});
export type SessionView = z.infer<typeof sessionViewSchema>;

/** A lab's settings: `secondApproval` is what applies, `secondApprovalSet` whether a lead chose it (else the default). */
export const labSettingsViewSchema = z.object({
  secondApproval: z.boolean(),
  secondApprovalSet: z.boolean(),
  leads: z.number().int(),
  currency: z.string(),
  minPackingDensityPercent: z.number(),
});
export type LabSettingsView = z.infer<typeof labSettingsViewSchema>;
