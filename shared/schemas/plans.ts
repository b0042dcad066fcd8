import { z } from 'zod';
import { PLAN_STATUSES } from '../plans/status';
import { MAX_LAYERS, MAX_TOTAL_QUANTITY } from '../packing/parse';
import { ORIENTATIONS, RESULT_FORMAT, RESULT_FORMAT_V2, type Orientation, type PackInstanceInput, type PackResult } from '../packing/types';
import { ROTATION_CODES } from '../geometry/rotations';
import { parseInstance } from '../packing/parse';
import { machineProfileSchema, materialProfileSchema } from '../types/profiles';
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

const finite = z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be a finite number');
const vec3 = z.tuple([finite, finite, finite], { error: 'must be three numbers' });

/** What both result formats share: a placement's part and box, and the summary. */
const placementBase = { id: z.string().min(1).max(200), position: vec3, size: vec3 };
const placementsOf = <T extends z.ZodType>(placement: T) =>
  z.array(placement).max(MAX_TOTAL_QUANTITY, `must be at most ${MAX_TOTAL_QUANTITY.toLocaleString('en-US')} placements`);
const resultSummary = {
  unplaced: z.array(z.strictObject({ id: z.string().min(1).max(200), count: z.number().int().min(0) })).max(MAX_PLAN_LINES * 4),
  height: finite,
  layers: z.number().int().min(0),
  utilization: finite,
  elapsedMs: z.number().min(0),
};

/** The packing result's shape; whether it is a valid layout is the layout validator's call. */
export const packResultSchema = z.strictObject({
  format: z.literal(RESULT_FORMAT, { error: `must be "${RESULT_FORMAT}"` }),
  placements: placementsOf(
    z.strictObject({
      ...placementBase,
      orientation: z.enum(ORIENTATIONS as unknown as [string, ...string[]], { error: `must be one of ${ORIENTATIONS.join(', ')}` }),
    }),
  ),
  ...resultSummary,
});

const SIGNED_OR_BOX_CODES = [...ORIENTATIONS, ...ROTATION_CODES] as [string, ...string[]];
// No instance the engine takes has more layers (../packing/parse.ts MAX_LAYERS): a longer profile is refused before
// its numbers are read (a million of each took the request 12 s, 5 s of it stalling the server).
const perLayer = z.array(finite).max(MAX_LAYERS, `must be at most ${MAX_LAYERS.toLocaleString('en-US')} layers`);

/**
 * A layout packed by the parts' shapes: placements may overlap as boxes (a
 * clip inside a housing), turn by any quarter turn and carry the 3MF
 * transform from the part's resting mesh to the chamber. Whether the shapes
 * keep apart is checked against the meshes on the server's mesh workers.
 */
export const packResultV2Schema = z.strictObject({
  format: z.literal(RESULT_FORMAT_V2, { error: `must be "${RESULT_FORMAT_V2}"` }),
  placements: placementsOf(
    z.strictObject({
      ...placementBase,
      orientation: z.enum(SIGNED_OR_BOX_CODES, { error: 'must be a rotation code such as "+x+y+z" or "-y+x+z"' }),
      transform: z.array(finite).length(12, 'must be the 12 numbers of a 3MF transform').optional(),
    }),
  ),
  ...resultSummary,
  areaProfile: perLayer.optional(),
  contourProfile: perLayer.optional(),
  warnings: z.array(z.strictObject({ id: z.string().max(200), code: z.string().max(60), message: z.string().max(2000) })).max(MAX_PLAN_LINES * 4).optional(),
});
export type PackResultV2Input = z.infer<typeof packResultV2Schema>;

export const layoutCreateSchema = z.strictObject({
  /** The packing instance as sent to the engine (checked by the engine's own parser). */
  instance: z.unknown(),
  /** Packed by boxes ("pack-result/1") or by the parts' shapes ("pack-result/2"). */
  result: z.discriminatedUnion('format', [packResultSchema, packResultV2Schema], {
    error: `format must be "${RESULT_FORMAT}" (packed by boxes) or "${RESULT_FORMAT_V2}" (packed by shapes)`,
  }),
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
export type OpenLinesQuery = z.infer<typeof openLinesQuerySchema>;
export type LayoutCreate = z.infer<typeof layoutCreateSchema>;
export type LayoutPatch = z.infer<typeof layoutPatchSchema>;
export type ReviewInput = z.infer<typeof reviewSchema>;

// ---------------------------------------------------------------------------
// Answers (the server is typed by them, the client parses with them)

const person = z.object({ id: z.string(), name: z.string() }).nullable();
const vec3View = z.tuple([z.number(), z.number(), z.number()]);

export const planEventViewSchema = z.object({
  id: z.string(),
  from: planStatusSchema.nullable(),
  to: planStatusSchema,
  by: person,
  at: z.string(),
  comment: z.string().nullable(),
});
export type PlanEventView = z.infer<typeof planEventViewSchema>;

const planPartView = z.object({
  id: z.string(),
  name: z.string(),
  sizeMm: vec3View,
  volumeMm3: z.number(),
  /**
   * Whether the part's mesh is closed (watertight and consistently oriented, as the server's check and slices count
   * it): a layout by shape counts an open one as its box, for the density as for the gaps.
   */
  watertight: z.boolean(),
  /** Triangles of the part's mesh: a packing by shape needs time to prepare heavy meshes (the editor says how much). */
  triangles: z.number(),
  orientation: planOrientationRuleSchema,
});

export const planLineViewSchema = z.object({
  id: z.string(),
  requestLineId: z.string(),
  quantity: z.number(),
  /** The rule the packing must follow: the override when set, else the part's own. */
  orientation: planOrientationRuleSchema,
  orientationOverride: planOrientationRuleSchema.nullable(),
  part: planPartView,
  request: z.object({ id: z.string(), title: z.string(), dueDate: z.string(), priority: z.string(), status: z.string() }),
  /** The request line's quantity, and how many of it other active plans hold. */
  lineQuantity: z.number(),
  plannedElsewhere: z.number(),
  printedCount: z.number(),
});
export type PlanLineView = z.infer<typeof planLineViewSchema>;

export const layoutSettingsSchema = z.object({
  seed: z.number(),
  spacingMm: z.number(),
  layerHeightMm: z.number(),
  timeLimitMs: z.number(),
  objective: z.string(),
  margin: z.object({ xy: z.number(), bottom: z.number(), top: z.number() }),
});
export type LayoutSettings = z.infer<typeof layoutSettingsSchema>;

/** The numbers of a layout without its per-layer profile. */
export const layoutSummaryViewSchema = z.object({
  id: z.string(),
  label: z.string(),
  locked: z.boolean(),
  chosen: z.boolean(),
  /** False once the plan's lines, quantities or orientation rules changed after this layout was packed. */
  matchesPlan: z.boolean(),
  settings: layoutSettingsSchema,
  placedCount: z.number(),
  unplacedCount: z.number(),
  heightMm: z.number(),
  layers: z.number(),
  utilization: z.number(),
  elapsedMs: z.number(),
  resultFormat: z.string(),
  /** The estimate without `areaPerLayerMm2`. */
  estimate: z.record(z.string(), z.unknown()),
  createdBy: person,
  createdAt: z.string(),
});
export type LayoutSummaryView = z.infer<typeof layoutSummaryViewSchema>;

/** A plan's machine and material: the stored profile with its id. */
export const planMachineViewSchema = z.object({ id: z.string(), ...machineProfileSchema.shape });
export const planMaterialViewSchema = z.object({ id: z.string(), ...materialProfileSchema.shape });

export const planViewSchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  status: planStatusSchema,
  version: z.number(),
  editable: z.boolean(),
  allowedTransitions: z.array(planStatusSchema),
  machine: planMachineViewSchema,
  material: planMaterialViewSchema,
  chosenLayoutId: z.string().nullable(),
  queuePosition: z.number().nullable(),
  /** The editor's unsaved work, as it saved it. */
  draft: z.unknown(),
  createdBy: person,
  createdAt: z.string(),
  updatedAt: z.string(),
  lines: z.array(planLineViewSchema),
  layouts: z.array(layoutSummaryViewSchema),
  events: z.array(planEventViewSchema),
});
export type PlanView = z.infer<typeof planViewSchema>;

const named = z.object({ id: z.string(), name: z.string() });

export const planListItemSchema = z.object({
  id: z.string(),
  name: z.string(),
  status: planStatusSchema,
  version: z.number(),
  machine: named,
  material: named,
  chosenLayoutId: z.string().nullable(),
  queuePosition: z.number().nullable(),
  lineCount: z.number(),
  partCount: z.number(),
  earliestDueDate: z.string().nullable(),
  layoutCount: z.number(),
  createdBy: person,
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type PlanListItem = z.infer<typeof planListItemSchema>;

export const openLineViewSchema = z.object({
  requestLineId: z.string(),
  part: planPartView,
  request: z.object({ id: z.string(), title: z.string(), dueDate: z.string(), priority: z.string(), materialId: z.string().nullable() }),
  quantity: z.number(),
  /** The line's planned count, less what `planId` itself holds. */
  plannedCount: z.number(),
  /** quantity - plannedCount: the most a plan may take. */
  remaining: z.number(),
});
export type OpenLineView = z.infer<typeof openLineViewSchema>;

/** A stored packing as read back: any result format it was saved in (an older engine's label included). */
const storedResultSchema = z.object({
  // The server sends the label the layout was saved with (also in `resultFormat`); its placements are
  // decoded by the current codec, so the client holds them as a result of the current format.
  format: z.string().transform((): PackResult['format'] => RESULT_FORMAT),
  placements: z.array(
    z.object({
      id: z.string(),
      position: vec3View,
      size: vec3View,
      orientation: z.enum(ORIENTATIONS as unknown as [Orientation, ...Orientation[]]),
      transform: z.tuple([z.number(), z.number(), z.number(), z.number(), z.number(), z.number(), z.number(), z.number(), z.number(), z.number(), z.number(), z.number()]).optional(),
    }),
  ),
  unplaced: z.array(z.object({ id: z.string(), count: z.number() })),
  height: z.number(),
  layers: z.number(),
  utilization: z.number(),
  elapsedMs: z.number(),
  areaProfile: z.array(z.number()).optional(),
  contourProfile: z.array(z.number()).optional(),
});

/** A stored layout as read back: the engine's instance and result plus the server's estimate. */
export const layoutViewSchema = layoutSummaryViewSchema.extend({
  planId: z.string(),
  /** The instance as the engine's own parser accepts it. */
  instance: z.custom<PackInstanceInput>((v) => parseInstance(v).ok, 'must be a packing instance'),
  result: storedResultSchema,
  estimate: z.record(z.string(), z.unknown()).and(z.object({ areaPerLayerMm2: z.array(z.number()).optional() })),
});
/** As the client holds it. */
export type LayoutView = z.output<typeof layoutViewSchema>;
/** As the server sends it. */
export type LayoutViewAnswer = z.input<typeof layoutViewSchema>;

/** Answers of the plan and layout actions. */
export const planCreatedSchema = z.object({ id: z.string(), version: z.number(), status: planStatusSchema });
export const layoutCreatedSchema = z.object({ id: z.string(), label: z.string(), estimate: z.record(z.string(), z.unknown()) });
export const layoutChosenSchema = z.object({ id: z.string(), chosenLayoutId: z.string().nullable(), version: z.number(), status: planStatusSchema });
export const planMovedSchema = z.object({ id: z.string(), status: planStatusSchema, version: z.number(), notified: z.array(z.string()).optional() });
/** `undoUntil`: after an approval, until when the lead who gave it may undo it. */
export const planReviewedSchema = planMovedSchema.extend({ queuePosition: z.number().nullable().optional(), undoUntil: z.string().nullable().optional() });
export type PlanCreated = z.infer<typeof planCreatedSchema>;
export type LayoutCreated = z.infer<typeof layoutCreatedSchema>;
export type LayoutChosen = z.infer<typeof layoutChosenSchema>;
export type PlanMoved = z.infer<typeof planMovedSchema>;
export type PlanReviewed = z.infer<typeof planReviewedSchema>;
