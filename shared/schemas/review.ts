import { z } from 'zod';

/**
 * What review points out about a plan before a lead approves it. Each flag
 * says in one plain sentence what was found and why it matters; `details`
 * carries the figures the sentence was made from.
 */
export const PLAN_FLAG_KINDS = ['low_density', 'material_change', 'late_due_date', 'not_watertight'] as const;
export type PlanFlagKind = (typeof PLAN_FLAG_KINDS)[number];

export const planFlagSchema = z.object({
  kind: z.enum(PLAN_FLAG_KINDS),
  title: z.string(),
  message: z.string(),
  details: z.record(z.string(), z.unknown()),
});
export type PlanFlag = z.infer<typeof planFlagSchema>;

export const planFlagsViewSchema = z.object({ planId: z.string(), flags: z.array(planFlagSchema) });
export type PlanFlagsView = z.infer<typeof planFlagsViewSchema>;

/** Returning an approved or queued plan to draft: the reason is kept in the plan's history and the audit log. */
export const returnToDraftSchema = z.strictObject({
  reason: z.string().trim().min(1, 'is required: say why the plan goes back to draft').max(2000, 'must be at most 2,000 characters'),
});
export type ReturnToDraftInput = z.infer<typeof returnToDraftSchema>;
