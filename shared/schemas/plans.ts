import { z } from 'zod';
import { PLAN_STATUSES, type PlanStatus } from '../plans/status';
import { MAX_TOTAL_QUANTITY } from '../packing/parse';
import { ORIENTATIONS, RESULT_FORMAT } from '../packing/types';
import { ORIENTATION_RULES } from './parts';

const uuid = z.uuid('must be an id');

/** any: turned freely; keep_up: only about the vertical axis; fixed: as stored on the part. */
export const PLAN_ORIENTATION_RULES = ORIENTATION_RULES;
export type PlanOrientationRule = (typeof PLAN_ORIENTATION_RULES)[number];
export const planOrientationRuleSchema = z.enum(PLAN_ORIENTATION_RULES);

export const MAX_PLAN_LINES = 500;
export const PLAN_QUANTITY_MAX = 100_000;
/** The editor's draft is kept on the server as it is; this keeps one plan row reasonable. */
export const MAX_DRAFT_BYTES = 1_000_000;

export const planStatusSchema = z.enum(PLAN_STATUSES);

const planNameSchema = z.string().trim().min(1, 'is required').max(200, 'must be at most 200 characters');
const quantitySchema = z
  .number({ error: 'must be a number' })
  .int('must be a whole number')
  .min(1, 'must be at least 1')
  .max(PLAN_QUANTITY_MAX, `must be at most ${PLAN_QUANTITY_MAX.toLocaleString('en-US')}`);

export const planLineInputSchema = z.strictObject({
  requestLineId: uuid,
  quantity: quantitySchema,
  /** Overrides the part's own orientation rule for this plan; null or absent keeps the part's. */
  orientation: planOrientationRuleSchema.nullable().optional(),
});

const planLinesSchema = z
  .array(planLineInputSchema)
  .max(MAX_PLAN_LINES, `must be at most ${MAX_PLAN_LINES} lines`)
  .superRefine((lines, c) => {
    const seen = new Set<string>();
    lines.forEach((line, i) => {
      if (seen.has(line.requestLineId)) {
        c.addIssue({ code: 'custom', path: [i, 'requestLineId'], message: 'lists the same request line twice; raise its quantity instead' });
      }
      seen.add(line.requestLineId);
    });
  });

const draftSchema = z
  .unknown()
  .nullable()
  .refine((v) => v === null || JSON.stringify(v).length <= MAX_DRAFT_BYTES, `must be at most ${MAX_DRAFT_BYTES.toLocaleString('en-US')} bytes as JSON`);

export const planCreateSchema = z.strictObject({
  name: planNameSchema,
  machineId: uuid,
  materialId: uuid,
  lines: planLinesSchema.min(1, 'needs at least one request line'),
});

export const planUpdateSchema = z.strictObject({
  /** The version the plan was read at; a newer one on the server answers 409 version_conflict. */
  version: z.number({ error: 'must be a number' }).int('must be a whole number').min(1, 'must be at least 1'),
  name: planNameSchema.optional(),
  /** Replaces every line. */
  lines: planLinesSchema.min(1, 'needs at least one request line').optional(),
  /** The editor's unsaved work (whatever it needs to restore itself); null clears it. */
  draft: draftSchema.optional(),
});

/** One status or several, comma separated: `?status=in_review,changes_requested`. */
export const planListQuerySchema = z.strictObject({
  status: z
    .string()
    .transform((s) => s.split(',').map((x) => x.trim()).filter(Boolean))
    .pipe(z.array(planStatusSchema).min(1, 'must name at least one status'))
    .optional(),
  machineId: uuid.optional(),
});

/** Open request lines a plan could take: for a new plan, or to fill the rest of one. */
export const openLinesQuerySchema = z.strictObject({
  materialId: uuid.optional(),
  /** Counts this plan's own holdings as still open, as its editor sees them. */
  planId: uuid.optional(),
});

export interface OpenLineView {
  requestLineId: string;
  part: { id: string; name: string; sizeMm: [number, number, number]; volumeMm3: number; orientation: PlanOrientationRule };
  request: { id: string; title: string; dueDate: string; priority: string; materialId: string | null };
  quantity: number;
  /** The line's planned count, less what `planId` itself holds. */
  plannedCount: number;
  /** quantity - plannedCount: the most a plan may take. */
  remaining: number;
}

const finite = z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be a finite number');
const vec3 = z.tuple([finite, finite, finite], { error: 'must be three numbers' });

/** The packing result's shape; whether it is a valid layout is the layout validator's call. */
export const packResultSchema = z.strictObject({
  format: z.literal(RESULT_FORMAT, { error: `must be "${RESULT_FORMAT}"` }),
  placements: z
    .array(
      z.strictObject({
        id: z.string().min(1).max(200),
        position: vec3,
        size: vec3,
        orientation: z.enum(ORIENTATIONS as unknown as [string, ...string[]], { error: `must be one of ${ORIENTATIONS.join(', ')}` }),
      }),
    )
    .max(MAX_TOTAL_QUANTITY, `must be at most ${MAX_TOTAL_QUANTITY.toLocaleString('en-US')} placements`),
  unplaced: z.array(z.strictObject({ id: z.string().min(1).max(200), count: z.number().int().min(0) })).max(MAX_PLAN_LINES * 4),
  height: finite,
  layers: z.number().int().min(0),
  utilization: finite,
  elapsedMs: z.number().min(0),
});

export const layoutCreateSchema = z.strictObject({
  /** The packing instance as sent to the engine (checked by the engine's own parser). */
  instance: z.unknown(),
  result: packResultSchema,
  label: z.string().trim().min(1).max(120, 'must be at most 120 characters').optional(),
  /** A locked layout is kept as it is: it cannot be deleted until unlocked. */
  locked: z.boolean().optional(),
});

export const layoutPatchSchema = z.strictObject({
  label: z.string().trim().min(1, 'is required').max(120, 'must be at most 120 characters').optional(),
  locked: z.boolean().optional(),
});

export const REVIEW_DECISIONS = ['approve', 'changes_requested'] as const;
export const reviewSchema = z
  .strictObject({
    decision: z.enum(REVIEW_DECISIONS, { error: 'must be "approve" or "changes_requested"' }),
    comment: z.string().trim().max(5000, 'must be at most 5,000 characters').optional(),
  })
  .superRefine((v, c) => {
    if (v.decision === 'changes_requested' && !v.comment) {
      c.addIssue({ code: 'custom', path: ['comment'], message: 'is required when sending a plan back: say what to change' });
    }
  });

export const planCommentSchema = z.strictObject({
  comment: z.string().trim().max(5000, 'must be at most 5,000 characters').optional(),
});

export type PlanCreate = z.infer<typeof planCreateSchema>;
export type PlanUpdate = z.infer<typeof planUpdateSchema>;
export type PlanListQuery = z.infer<typeof planListQuerySchema>;
export type LayoutCreate = z.infer<typeof layoutCreateSchema>;
export type ReviewInput = z.infer<typeof reviewSchema>;

export interface PlanEventView {
  id: string;
  from: PlanStatus | null;
  to: PlanStatus;
  by: { id: string; name: string } | null;
  at: string;
  comment: string | null;
}

export interface PlanLineView {
  id: string;
  requestLineId: string;
  quantity: number;
  /** The rule the packing must follow: the override when set, else the part's own. */
  orientation: PlanOrientationRule;
  orientationOverride: PlanOrientationRule | null;
  part: { id: string; name: string; sizeMm: [number, number, number]; volumeMm3: number; orientation: PlanOrientationRule };
  request: { id: string; title: string; dueDate: string; priority: string; status: string };
  /** The request line's quantity, and how many of it other active plans hold. */
  lineQuantity: number;
  plannedElsewhere: number;
  printedCount: number;
}

/** The numbers of a layout without its per-layer profile. */
export interface LayoutSummaryView {
  id: string;
  label: string;
  locked: boolean;
  chosen: boolean;
  /** False once the plan's lines, quantities or orientation rules changed after this layout was packed. */
  matchesPlan: boolean;
  settings: LayoutSettings;
  placedCount: number;
  unplacedCount: number;
  heightMm: number;
  layers: number;
  utilization: number;
  elapsedMs: number;
  resultFormat: string;
  /** The estimate without `areaPerLayerMm2`. */
  estimate: Record<string, unknown>;
  createdBy: { id: string; name: string } | null;
  createdAt: string;
}

export interface LayoutSettings {
  seed: number;
  spacingMm: number;
  layerHeightMm: number;
  timeLimitMs: number;
  objective: string;
  margin: { xy: number; bottom: number; top: number };
}

export interface PlanView {
  id: string;
  labId: string;
  name: string;
  status: PlanStatus;
  version: number;
  editable: boolean;
  allowedTransitions: PlanStatus[];
  machine: Record<string, unknown> & { id: string; name: string };
  material: Record<string, unknown> & { id: string; name: string };
  chosenLayoutId: string | null;
  queuePosition: number | null;
  draft: unknown;
  createdBy: { id: string; name: string } | null;
  createdAt: string;
  updatedAt: string;
  lines: PlanLineView[];
  layouts: LayoutSummaryView[];
  events: PlanEventView[];
}

export interface PlanListItem {
  id: string;
  name: string;
  status: PlanStatus;
  version: number;
  machine: { id: string; name: string };
  material: { id: string; name: string };
  chosenLayoutId: string | null;
  queuePosition: number | null;
  lineCount: number;
  partCount: number;
  earliestDueDate: string | null;
  layoutCount: number;
  createdBy: { id: string; name: string } | null;
  createdAt: string;
  updatedAt: string;
}
