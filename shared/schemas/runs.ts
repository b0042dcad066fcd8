import { z } from 'zod';
import { PLAN_STATUSES, type PlanStatus } from '../plans/status';
import type { Caution, ChecklistItem, CoolingTimer, PrintTimer, StageCard } from '../floor';

const uuid = z.uuid('must be an id');
const confirmed = z.literal(true, { error: 'must be confirmed before the next stage' });
const kg = z.number({ error: 'must be a number of kilograms' }).min(0, 'must be at least 0').max(10_000, 'must be at most 10,000 kg');
const count = z.number({ error: 'must be a number' }).int('must be a whole number').min(0, 'must be at least 0').max(100_000, 'must be at most 100,000');
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
export const printEndSchema = z.strictObject({ to: z.literal('cooling'), at });
export const abortSchema = z.strictObject({
  to: z.literal('aborted'),
  reason: z.string({ error: 'is required: say why the build was stopped' }).trim().min(1, 'is required: say why the build was stopped').max(2000, 'must be at most 2,000 characters'),
  at,
});
export const breakoutSchema = z.strictObject({ to: z.literal('breakout'), at });
export const countsSchema = z.strictObject({
  to: z.literal('finishing'),
  counts: z
    .array(z.strictObject({ requestLineId: uuid, good: count, failed: count }), { error: 'is required: the good and failed parts of each line' })
    .min(1, 'is required: the good and failed parts of each line'),
  at,
});
export const doneSchema = z.strictObject({
  to: z.literal('done'),
  finishingChecklist: z.strictObject(
    { powderRemoved: confirmed, blasted: confirmed, inspected: confirmed },
    { error: 'is required: confirm powder removed, blasted and inspected' },
  ),
  /** Powder the build consumed; the estimate's spread cake when left out. */
  powderUsedKg: kg.optional(),
  at,
});

export const ADVANCE_SCHEMAS: Partial<Record<PlanStatus, z.ZodType>> = {
  printing: startRunSchema,
  cooling: printEndSchema,
  aborted: abortSchema,
  breakout: breakoutSchema,
  finishing: countsSchema,
  done: doneSchema,
};
export type StartRunInput = z.infer<typeof startRunSchema>;
export type CountsInput = z.infer<typeof countsSchema>;
export type DoneInput = z.infer<typeof doneSchema>;

export const readingSchema = z.strictObject({
  tempC: z
    .number({ error: 'must be a temperature in °C' })
    .min(READING_MIN_C, `must be at least ${READING_MIN_C} °C`)
    .max(READING_MAX_C, `must be at most ${READING_MAX_C} °C`),
  where: z.enum(['machine', 'outside'], { error: 'must be "machine" or "outside"' }),
  at,
});
export type ReadingInput = z.infer<typeof readingSchema>;

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
  readings: Array<{ id: string; tempC: number; where: 'machine' | 'outside'; at: string; by: { id: string; name: string } | null }>;
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

export interface CalibrationView {
  printTimeScale: number;
  coolingScale: number;
  runs: number;
  calibrated: boolean;
  printTimeClamped: boolean;
  coolingClamped: boolean;
}

export interface QueueView {
  machine: { id: string; name: string; chamberCount: number };
  calibration: CalibrationView;
  now: string;
  current: QueueItemView | null;
  /** Every started build that still holds a chamber (printing, cooling or in breakout), latest started first. */
  active: QueueItemView[];
  plans: QueueItemView[];
}
