import { z } from 'zod';
import { PLAN_STATUSES, type PlanStatus } from '../plans/status';
import type { Caution, ChecklistItem, CoolingTimer, PrintTimer, StageCard } from '../floor';

const uuid = z.uuid('must be an id');
const confirmed = z.literal(true, { error: 'must be confirmed before the next stage' });
const kg = z.number({ error: 'must be a number of kilograms' }).min(0, 'must be at least 0').max(10_000, 'must be at most 10,000 kg');
const count = z.number({ error: 'must be a number' }).int('must be a whole number').min(0, 'must be at least 0').max(100_000, 'must be at most 100,000');
/** The run a step acts on, as the card showed it: a card showing another build can never move this one. */
const runId = z.uuid('is required: the id of the run this step acts on');
/** When the step really happened, if not now (an operator recording it late). */
const at = z.iso.datetime({ offset: true, error: 'must be an ISO 8601 time' }).optional();

export const READING_MIN_C = -50;
export const READING_MAX_C = 400;

/** Only the target first: whether the move is allowed is answered (409) before the stage's fields are checked. */
export const advanceTargetSchema = z.object({ to: z.enum(PLAN_STATUSES, { error: 'must be a plan status' }) });

export const startRunSchema = z.strictObject({
  to: z.literal('printing'),
  checklist: z.strictObject({ chamberInPlace: confirmed, opticalWindowClean: confirmed }, { error: 'is required: confirm the chamber and the optical window' }),
  freshPowderKg: kg,
  reusedPowderKg: kg,
  /** Fresh lots drawn and how much from each; left out, the stock's oldest lots first. */
  lots: z.array(z.strictObject({ lotId: uuid, kg: kg.refine((v) => v > 0, 'must be more than 0 kg') })).max(50, 'must be at most 50 lots').optional(),
  at,
});
export const printEndSchema = z.strictObject({ to: z.literal('cooling'), runId, at });
export const abortSchema = z.strictObject({
  to: z.literal('aborted'),
  runId,
  reason: z.string({ error: 'is required: say why the build was stopped' }).trim().min(1, 'is required: say why the build was stopped').max(2000, 'must be at most 2,000 characters'),
  at,
});
export const breakoutSchema = z.strictObject({ to: z.literal('breakout'), runId, at });
export const countsSchema = z.strictObject({
  to: z.literal('finishing'),
  runId,
  counts: z
    .array(z.strictObject({ requestLineId: uuid, good: count, failed: count }), { error: 'is required: the good and failed parts of each line' })
    .min(1, 'is required: the good and failed parts of each line'),
  at,
});
export const doneSchema = z.strictObject({
  to: z.literal('done'),
  runId,
  finishingChecklist: z.strictObject(
    { powderRemoved: confirmed, blasted: confirmed, inspected: confirmed },
    { error: 'is required: confirm powder removed, blasted and inspected' },
  ),
  /** Powder the build consumed; the estimate's spread cake when left out. */
  powderUsedKg: kg.optional(),
  at,
});

/** Each step at the machine by the status it moves the plan to, with the schema of its fields. */
export const ADVANCE_SCHEMAS = {
  printing: startRunSchema,
  cooling: printEndSchema,
  aborted: abortSchema,
  breakout: breakoutSchema,
  finishing: countsSchema,
  done: doneSchema,
} as const satisfies Partial<Record<PlanStatus, z.ZodType>>;
export type MachineStep = keyof typeof ADVANCE_SCHEMAS;
/** Whether a plan moves to `to` at the machine (other moves have their own routes). */
export const isMachineStep = (to: PlanStatus): to is MachineStep => Object.hasOwn(ADVANCE_SCHEMAS, to);
/** One step at the machine, as checked by its stage's schema. */
export type AdvanceInput = z.infer<(typeof ADVANCE_SCHEMAS)[MachineStep]>;
export type StartRunInput = z.infer<typeof startRunSchema>;
export type CountsInput = z.infer<typeof countsSchema>;
export type DoneInput = z.infer<typeof doneSchema>;

export const readingSchema = z.strictObject({
  tempC: z
    .number({ error: 'must be a temperature in °C' })
    .min(READING_MIN_C, `must be at least ${READING_MIN_C} °C`)
    .max(READING_MAX_C, `must be at most ${READING_MAX_C} °C`),
  where: z.enum(['machine', 'outside'], { error: 'must be "machine" or "outside"' }),
  runId,
  at,
});
export type ReadingInput = z.infer<typeof readingSchema>;

const reason = z
  .string({ error: 'is required: say why' })
  .trim()
  .min(3, 'is required: say why (at least 3 characters)')
  .max(2000, 'must be at most 2,000 characters');

/** A lead accepts a reading the cooling model cannot explain. */
export const acceptReadingSchema = z.strictObject({ runId, reason });
export type AcceptReadingInput = z.infer<typeof acceptReadingSchema>;

/** A lead leaves a run out of the machine's calibration, or takes back one left out by default. */
export const calibrationChoiceSchema = z.strictObject({
  choice: z.enum(['exclude', 'include'], { error: 'must be "exclude" or "include"' }),
  reason,
});
export type CalibrationChoiceInput = z.infer<typeof calibrationChoiceSchema>;

export const queueOrderSchema = z.strictObject({
  planIds: z.array(uuid, { error: 'must be the list of the queued plans in their new order' }).max(1000),
});

// Answers of the floor's, the queue's and the calibration's routes: the server types what it builds with
// these, and the screens parse what they read with them.

const planStatusView = z.enum(PLAN_STATUSES);
const named = z.object({ id: z.string(), name: z.string() });
const isRecord = (v: unknown) => typeof v === 'object' && v !== null;
/** The floor module's computed pieces (timers, the stage card) keep their types in shared/floor; the view checks they are there. */
const floorPiece = <T>() => z.custom<T>(isRecord);

export const runLineViewSchema = z.object({
  requestLineId: z.string(),
  planLineId: z.string(),
  part: named,
  request: z.object({ id: z.string(), title: z.string(), dueDate: z.string() }),
  plannedCount: z.number(),
  goodCount: z.number().nullable(),
  failedCount: z.number().nullable(),
});
export type RunLineView = z.infer<typeof runLineViewSchema>;

export const runReadingViewSchema = z.object({
  id: z.string(),
  tempC: z.number(),
  where: z.enum(['machine', 'outside']),
  at: z.string(),
  by: named.nullable(),
  /** The reading against the cooling model: an unexplained one counts only once confirmed by a second reading or accepted by a lead. */
  check: z.object({
    status: z.enum(['explained', 'unexplained', 'confirmed', 'accepted']),
    /** The coolest the cake could be then, by the model at its fastest. */
    coolestC: z.number().nullable(),
    confirmedBy: z.string().nullable(),
    accepted: z.object({ by: named, reason: z.string(), at: z.string() }).nullable(),
  }),
});

export const runViewSchema = z.object({
  planId: z.string(),
  planName: z.string(),
  status: planStatusView,
  allowedTransitions: z.array(planStatusView),
  machine: named,
  material: named,
  /** Null until the run is started. */
  id: z.string().nullable(),
  checklist: z.object({ chamberInPlace: z.boolean(), opticalWindowClean: z.boolean() }).nullable(),
  freshPowderLoadedKg: z.number().nullable(),
  reusedPowderLoadedKg: z.number().nullable(),
  startedAt: z.string().nullable(),
  startedBy: named.nullable(),
  printEndedAt: z.string().nullable(),
  leftMachineAt: z.string().nullable(),
  breakoutAt: z.string().nullable(),
  finishingAt: z.string().nullable(),
  doneAt: z.string().nullable(),
  abortedAt: z.string().nullable(),
  abortReason: z.string().nullable(),
  finishingChecklist: z.object({ powderRemoved: z.boolean(), blasted: z.boolean(), inspected: z.boolean() }).nullable(),
  estimate: z
    .object({
      printSeconds: z.number(),
      preheatSeconds: z.number(),
      inMachineCoolingSeconds: z.number(),
      outsideCoolingSeconds: z.number(),
      freshPowderKg: z.number(),
      reusedPowderKg: z.number(),
      cakeMassKg: z.number(),
    })
    .nullable(),
  estimatedPrintHours: z.number().nullable(),
  estimatedCoolingHours: z.number().nullable(),
  actualPrintHours: z.number().nullable(),
  actualCoolingHours: z.number().nullable(),
  powderUsedKg: z.number().nullable(),
  readings: z.array(runReadingViewSchema),
  lines: z.array(runLineViewSchema),
  thresholds: z.object({ startTempC: z.number(), ambientTempC: z.number(), removalTempC: z.number(), handlingTempC: z.number() }),
  timers: z.object({ print: floorPiece<PrintTimer>().nullable(), cooling: floorPiece<CoolingTimer>().nullable() }),
  card: floorPiece<StageCard>(),
  now: z.string(),
});
export type RunView = z.infer<typeof runViewSchema>;

export type { Caution, ChecklistItem };

export const queueItemViewSchema = z.object({
  planId: z.string(),
  name: z.string(),
  status: planStatusView,
  queuePosition: z.number().nullable(),
  material: named,
  /** Set when the build before it on the machine (in the queue's order) runs in another material. */
  materialChange: z.object({ previousPlanId: z.string(), previousPlanName: z.string(), previousMaterial: named }).nullable(),
  chamberIndex: z.number(),
  startAt: z.string(),
  printEndAt: z.string(),
  leavesMachineAt: z.string(),
  cooledAt: z.string(),
  breakoutDoneAt: z.string(),
  requests: z.array(z.object({ id: z.string(), title: z.string(), dueDate: z.string() })),
  earliestDueDate: z.string().nullable(),
  late: z.boolean(),
  lateByHours: z.number(),
  durations: z.object({
    preheatSeconds: z.number(),
    layersSeconds: z.number(),
    inMachineCoolingSeconds: z.number(),
    outsideCoolingSeconds: z.number(),
    breakoutSeconds: z.number(),
  }),
});
export type QueueItemView = z.infer<typeof queueItemViewSchema>;

/** A machine's estimate factors as the queue shows them. */
export const calibrationFactorsViewSchema = z.object({
  printTimeScale: z.number(),
  coolingScale: z.number(),
  /** Separate factors on preheat-and-recoat time and on scan time; both the print-time scale when not fitted apart. */
  perLayerScale: z.number(),
  scanScale: z.number(),
  separate: z.boolean(),
  runs: z.number(),
  calibrated: z.boolean(),
  printTimeClamped: z.boolean(),
  coolingClamped: z.boolean(),
  /** The cooling factor's source: core readings against the conduction model, or whole cooling times. */
  coolingFrom: z.enum(['readings', 'cooling_times']),
  coolingReadings: z.number(),
});
export type CalibrationFactorsView = z.infer<typeof calibrationFactorsViewSchema>;

/** One finished or aborted run of a machine against its estimate (hours, the estimate before calibration). */
export const calibrationRunViewSchema = z.object({
  runId: z.string(),
  planId: z.string(),
  planName: z.string(),
  materialName: z.string().nullable(),
  startedAt: z.string(),
  endedAt: z.string(),
  outcome: z.enum(['done', 'aborted']),
  abortReason: z.string().nullable(),
  estimatedPrintHours: z.number(),
  actualPrintHours: z.number().nullable(),
  estimatedCoolingHours: z.number(),
  actualCoolingHours: z.number().nullable(),
  /** Actual over estimate; null when not recorded. */
  printRatio: z.number().nullable(),
  coolingRatio: z.number().nullable(),
  /** Core readings of the run usable against the conduction model, and the cooling factor they alone give (null without). */
  coolingReadings: z.number(),
  readingsCoolingScale: z.number().nullable(),
  /** Counts toward the fit (the lead's choice, or the default). */
  counted: z.boolean(),
  /** Among the latest counted runs the fit used. */
  usedInFit: z.boolean(),
  defaultExclusion: z.enum(['aborted', 'incomplete', 'far_outside_model']).nullable(),
  defaultExclusionText: z.string().nullable(),
  choice: z.object({ choice: z.enum(['exclude', 'include']), reason: z.string(), by: named.nullable(), at: z.string() }).nullable(),
});
export type CalibrationRunView = z.infer<typeof calibrationRunViewSchema>;

/** GET .../calibration: the factors, and every recorded run of the machine, latest first. */
export const calibrationViewSchema = calibrationFactorsViewSchema.extend({
  machine: named,
  recordedRuns: z.array(calibrationRunViewSchema),
});
export type CalibrationView = z.infer<typeof calibrationViewSchema>;

export const queueViewSchema = z.object({
  machine: z.object({ id: z.string(), name: z.string(), chamberCount: z.number() }),
  calibration: calibrationFactorsViewSchema,
  now: z.string(),
  current: queueItemViewSchema.nullable(),
  /** Every started build that still holds a chamber (printing, cooling or in breakout), latest started first. */
  active: z.array(queueItemViewSchema),
  plans: z.array(queueItemViewSchema),
  /** After a reorder: the move just made, which its lead may undo until `undoUntil`. */
  move: z.object({ id: z.string(), undoUntil: z.string() }).optional(),
});
export type QueueView = z.infer<typeof queueViewSchema>;
