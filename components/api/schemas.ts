import { z } from 'zod';
import { machineProfileSchema, materialProfileSchema } from '../../shared/types/profiles';

/** Response shapes of the API, parsed at the client's edge. Unknown extra fields are dropped. */

export const roles = ['designer', 'planner', 'lead', 'operator'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

/** Ids may arrive as numbers or strings; the client always holds strings. */
const id = z.union([z.string(), z.number()]).transform((v) => String(v));
const timestamp = z.string();

export const userSchema = z.object({ id, email: z.string(), name: z.string() });
export const labSummarySchema = z.object({ id, name: z.string(), roles: z.array(roleSchema) });
export const meSchema = z.object({ user: userSchema, labs: z.array(labSummarySchema) });
export type User = z.infer<typeof userSchema>;
export type LabSummary = z.infer<typeof labSummarySchema>;
export type Me = z.infer<typeof meSchema>;

export const memberSchema = z.object({
  userId: id,
  email: z.string(),
  name: z.string(),
  roles: z.array(roleSchema),
  joinedAt: timestamp,
});
export type Member = z.infer<typeof memberSchema>;

export const inviteSchema = z.object({
  id,
  email: z.string(),
  roles: z.array(roleSchema),
  createdAt: timestamp,
  expiresAt: timestamp,
  acceptedAt: timestamp.nullable().optional(),
  // The contract names the inviter without fixing its shape: a name, an id or a small user object.
  invitedBy: z.unknown().optional(),
});
export type Invite = z.infer<typeof inviteSchema>;

export const invitePreviewSchema = z.object({
  labName: z.string(),
  email: z.string(),
  roles: z.array(roleSchema),
  existingUser: z.boolean(),
  expiresAt: timestamp,
});
export type InvitePreview = z.infer<typeof invitePreviewSchema>;

const stored = { id, labId: id, createdAt: timestamp, updatedAt: timestamp };
export const machineSchema = z.object({ ...machineProfileSchema.shape, ...stored });
export const materialSchema = z.object({ ...materialProfileSchema.shape, ...stored });
export type Machine = z.infer<typeof machineSchema>;
export type Material = z.infer<typeof materialSchema>;
