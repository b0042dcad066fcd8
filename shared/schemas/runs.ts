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

export interface RunLineView {
  requestLineId: string;
  planLineId: string;
  part: { id: string; name: string };
  request: { id: string; title: string; dueDate: string };
  plannedCount: number;
  goodCount: number | null;
  failedCount: number | null;
}

export interface RunView {
  planId: string;
  planName: string;
  status: PlanStatus;
  allowedTransitions: PlanStatus[];
  machine: { id: string; name: string };
  material: { id: string; name: string };
  /** Null until the run is started. */
  id: string | null;
  checklist: { chamberInPlace: boolean; opticalWindowClean: boolean } | null;
  freshPowderLoadedKg: number | null;
  reusedPowderLoadedKg: number | null;
  startedAt: string | null;
  startedBy: { id: string; name: string } | null;
  printEndedAt: string | null;
  leftMachineAt: string | null;
  breakoutAt: string | null;
  finishingAt: string | null;
  doneAt: string | null;
  abortedAt: string | null;
  abortReason: string | null;
  finishingChecklist: { powderRemoved: boolean; blasted: boolean; inspected: boolean } | null;
  estimate: {
    printSeconds: number;
    preheatSeconds: number;
    inMachineCoolingSeconds: number;
    outsideCoolingSeconds: number;
    freshPowderKg: number;
    reusedPowderKg: number;
    cakeMassKg: number;
  } | null;
  estimatedPrintHours: number | null;
  estimatedCoolingHours: number | null;
  actualPrintHours: number | null;
  actualCoolingHours: number | null;
  powderUsedKg: number | null;
  readings: Array<{
    id: string;
    tempC: number;
    where: 'machine' | 'outside';
    at: string;
    by: { id: string; name: string } | null;
    /** The reading against the cooling model: an unexplained one counts only once confirmed by a second reading or accepted by a lead. */
    check: {
      status: 'explained' | 'unexplained' | 'confirmed' | 'accepted';
      /** The coolest the cake could be then, by the model at its fastest. */
      coolestC: number | null;
      confirmedBy: string | null;
      accepted: { by: { id: string; name: string }; reason: string; at: string } | null;
    };
  }>;
  lines: RunLineView[];
  thresholds: { startTempC: number; ambientTempC: number; removalTempC: number; handlingTempC: number };
  timers: { print: PrintTimer | null; cooling: CoolingTimer | null };
  card: StageCard;
  now: string;
}

export type { Caution, ChecklistItem };

export interface QueueItemView {
  planId: string;
  name: string;
  status: PlanStatus;
  queuePosition: number | null;
  material: { id: string; name: string };
  /** Set when the build before it on the machine (in the queue's order) runs in another material. */
  materialChange: { previousPlanId: string; previousPlanName: string; previousMaterial: { id: string; name: string } } | null;
  chamberIndex: number;
  startAt: string;
  printEndAt: string;
  leavesMachineAt: string;
  cooledAt: string;
  breakoutDoneAt: string;
  requests: Array<{ id: string; title: string; dueDate: string }>;
  earliestDueDate: string | null;
  late: boolean;
  lateByHours: number;
  durations: { preheatSeconds: number; layersSeconds: number; inMachineCoolingSeconds: number; outsideCoolingSeconds: number; breakoutSeconds: number };
}

/** A machine's estimate factors as the queue shows them. */
export interface CalibrationFactorsView {
  printTimeScale: number;
  coolingScale: number;
  /** Separate factors on preheat-and-recoat time and on scan time; both the print-time scale when not fitted apart. */
  perLayerScale: number;
  scanScale: number;
  separate: boolean;
  runs: number;
  calibrated: boolean;
  printTimeClamped: boolean;
  coolingClamped: boolean;
  /** The cooling factor's source: core readings against the conduction model, or whole cooling times. */
  coolingFrom: 'readings' | 'cooling_times';
  coolingReadings: number;
}

/** One finished or aborted run of a machine against its estimate (hours, the estimate before calibration). */
export interface CalibrationRunView {
  runId: string;
  planId: string;
  planName: string;
  materialName: string | null;
  startedAt: string;
  endedAt: string;
  outcome: 'done' | 'aborted';
  abortReason: string | null;
  estimatedPrintHours: number;
  actualPrintHours: number | null;
  estimatedCoolingHours: number;
  actualCoolingHours: number | null;
  /** Actual over estimate; null when not recorded. */
  printRatio: number | null;
  coolingRatio: number | null;
  /** Core readings of the run usable against the conduction model, and the cooling factor they alone give (null without). */
  coolingReadings: number;
  readingsCoolingScale: number | null;
  /** Counts toward the fit (the lead's choice, or the default). */
  counted: boolean;
  /** Among the latest counted runs the fit used. */
  usedInFit: boolean;
  defaultExclusion: 'aborted' | 'incomplete' | 'far_outside_model' | null;
  defaultExclusionText: string | null;
  choice: { choice: 'exclude' | 'include'; reason: string; by: { id: string; name: string } | null; at: string } | null;
}

/** GET .../calibration: the factors, and every recorded run of the machine, latest first. */
export interface CalibrationView extends CalibrationFactorsView {
  machine: { id: string; name: string };
  recordedRuns: CalibrationRunView[];
}

export interface QueueView {
  machine: { id: string; name: string; chamberCount: number };
  calibration: CalibrationFactorsView;
  now: string;
  current: QueueItemView | null;
  /** Every started build that still holds a chamber (printing, cooling or in breakout), latest started first. */
  active: QueueItemView[];
  plans: QueueItemView[];
}
