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
