import type { LayoutEstimate } from '../estimate/estimateLayout';
import { InvalidInputError, isFiniteNumber, requireNonNegative, type Problem } from '../estimate/problems';

/** How long each stage of one build takes (seconds). */
export interface StageDurations {
  preheatSeconds: number;
  /** Recoat and scan of every layer, after preheat. */
  layersSeconds: number;
  /** From the end of the print until the chamber may leave the machine. */
  inMachineCoolingSeconds: number;
  /** Outside the machine until the cake may be handled. */
  outsideCoolingSeconds: number;
  breakoutSeconds: number;
}

export interface QueuedPlan extends StageDurations {
  planId: string;
  /** Due dates (epoch ms) of the requests the plan fills; the earliest decides lateness. */
  dueDatesMs: readonly number[];
}

export type RunStage = 'preheating' | 'printing' | 'cooling_in_machine' | 'cooling_outside' | 'breakout';

export const RUN_STAGES: readonly RunStage[] = ['preheating', 'printing', 'cooling_in_machine', 'cooling_outside', 'breakout'];

/** The build on the machine (or its chamber outside it) right now. */
export interface CurrentRun {
  plan: QueuedPlan;
  stage: RunStage;
  stageStartedAtMs: number;
}

export interface ScheduleInput {
  /** Now, or when the queue may start (epoch ms). */
  startMs: number;
  machine: { chamberCount: number };
  plans: readonly QueuedPlan[];
  current?: CurrentRun;
}

export interface PlanTimes {
  planId: string;
  /** Which of the machine's chambers the build uses, 0-based. */
  chamberIndex: number;
  /** Start of preheat. */
  startMs: number;
  printEndMs: number;
  leavesMachineMs: number;
  cooledMs: number;
  breakoutDoneMs: number;
  earliestDueMs: number | null;
  /** The parts come out of the powder (breakout done) after the earliest due date. */
  late: boolean;
  lateByMs: number;
}

export interface Schedule {
  /** The run in progress, with its remaining stages predicted; null when there is none. */
  current: PlanTimes | null;
  plans: PlanTimes[];
}

const MS_PER_SECOND = 1000;

function validatePlan(problems: Problem[], field: string, plan: QueuedPlan): void {
  if (plan === null || typeof plan !== 'object') {
    problems.push({ field, message: 'must be an object' });
    return;
  }
  if (typeof plan.planId !== 'string' || plan.planId.length === 0) problems.push({ field: `${field}.planId`, message: 'must be a non-empty string' });
  for (const key of ['preheatSeconds', 'layersSeconds', 'inMachineCoolingSeconds', 'outsideCoolingSeconds', 'breakoutSeconds'] as const) {
    requireNonNegative(problems, `${field}.${key}`, plan[key]);
  }
  if (!Array.isArray(plan.dueDatesMs)) {
    problems.push({ field: `${field}.dueDatesMs`, message: 'must be an array of epoch milliseconds' });
  } else {
    plan.dueDatesMs.forEach((d, i) => {
      if (!isFiniteNumber(d)) problems.push({ field: `${field}.dueDatesMs[${i}]`, message: 'must be epoch milliseconds' });
    });
  }
}

function validate(input: ScheduleInput): Problem[] {
  const problems: Problem[] = [];
  if (!isFiniteNumber(input.startMs)) problems.push({ field: 'startMs', message: 'must be epoch milliseconds' });
  const chambers = input.machine?.chamberCount;
  if (!Number.isInteger(chambers) || chambers < 1) problems.push({ field: 'machine.chamberCount', message: 'must be a positive integer' });
  if (!Array.isArray(input.plans)) {
    problems.push({ field: 'plans', message: 'must be an array' });
  } else {
    input.plans.forEach((p, i) => validatePlan(problems, `plans[${i}]`, p));
  }
  if (input.current !== undefined) {
    validatePlan(problems, 'current.plan', input.current.plan);
    if (!RUN_STAGES.includes(input.current.stage)) {
      problems.push({ field: 'current.stage', message: `must be one of ${RUN_STAGES.join(', ')}` });
    }
    if (!isFiniteNumber(input.current.stageStartedAtMs)) {
      problems.push({ field: 'current.stageStartedAtMs', message: 'must be epoch milliseconds' });
    }
  }
  return problems;
}

function lateness(plan: QueuedPlan, breakoutDoneMs: number): Pick<PlanTimes, 'earliestDueMs' | 'late' | 'lateByMs'> {
  const earliestDueMs = plan.dueDatesMs.length > 0 ? Math.min(...plan.dueDatesMs) : null;
  const lateByMs = earliestDueMs === null ? 0 : Math.max(0, breakoutDoneMs - earliestDueMs);
  return { earliestDueMs, late: lateByMs > 0, lateByMs };
}

function stageSeconds(plan: StageDurations): number[] {
  return [plan.preheatSeconds, plan.layersSeconds, plan.inMachineCoolingSeconds, plan.outsideCoolingSeconds, plan.breakoutSeconds];
}

/** Stage ends from a known start of one stage on; a stage already running ends no earlier than now. */
function stageEnds(plan: QueuedPlan, fromStage: number, fromMs: number, nowMs: number): number[] {
  const seconds = stageSeconds(plan);
  const ends: number[] = new Array(RUN_STAGES.length).fill(fromMs);
  let t = fromMs;
  for (let s = fromStage; s < RUN_STAGES.length; s++) {
    t += seconds[s] * MS_PER_SECOND;
    // A stage that overran its estimate has not ended yet: it ends now at the earliest.
    if (s === fromStage) t = Math.max(t, nowMs);
    ends[s] = t;
  }
  return ends;
}

function timesFrom(plan: QueuedPlan, chamberIndex: number, startMs: number, ends: number[]): PlanTimes {
  return {
    planId: plan.planId,
    chamberIndex,
    startMs,
    printEndMs: ends[1],
    leavesMachineMs: ends[2],
    cooledMs: ends[3],
    breakoutDoneMs: ends[4],
    ...lateness(plan, ends[4]),
  };
}

/**
 * A machine's queue as predicted times. The machine holds one build at a time, from preheat until its chamber
 * leaves the machine; a chamber is taken from preheat until its cake is broken out. So the next build starts
 * when the machine is free and a chamber is free: with a spare chamber that is as soon as the last one leaves
 * the machine (it cools outside meanwhile); with a single chamber it is only after the last cake is broken out.
 */
export function scheduleQueue(input: ScheduleInput): Schedule {
  const problems = validate(input);
  if (problems.length > 0) throw new InvalidInputError(problems);

  const nowMs = input.startMs;
  let machineFreeMs = nowMs;
  const chamberFreeMs: number[] = new Array(input.machine.chamberCount).fill(nowMs);
  let current: PlanTimes | null = null;

  if (input.current) {
    const { plan, stage, stageStartedAtMs } = input.current;
    const stageIndex = RUN_STAGES.indexOf(stage);
    const ends = stageEnds(plan, stageIndex, stageStartedAtMs, nowMs);
    // Stages already behind us keep the order of the stage that is running; their exact ends are not recorded here.
    const seconds = stageSeconds(plan);
    let back = stageStartedAtMs;
    for (let s = stageIndex - 1; s >= 0; s--) {
      ends[s] = back;
      back -= seconds[s] * MS_PER_SECOND;
    }
    const startMs = stageIndex === 0 ? stageStartedAtMs : back;
    current = timesFrom(plan, 0, startMs, ends);
    machineFreeMs = Math.max(nowMs, current.leavesMachineMs);
    chamberFreeMs[0] = current.breakoutDoneMs;
  }

  const plans: PlanTimes[] = [];
  for (const plan of input.plans) {
    let chamberIndex = 0;
    for (let c = 1; c < chamberFreeMs.length; c++) if (chamberFreeMs[c] < chamberFreeMs[chamberIndex]) chamberIndex = c;
    const startMs = Math.max(machineFreeMs, chamberFreeMs[chamberIndex]);
    const times = timesFrom(plan, chamberIndex, startMs, stageEnds(plan, 0, startMs, startMs));
    plans.push(times);
    machineFreeMs = times.leavesMachineMs;
    chamberFreeMs[chamberIndex] = times.breakoutDoneMs;
  }
  return { current, plans };
}

/** The stage durations a layout's estimate predicts; breakout is the lab's own figure. */
export function stageDurationsFromEstimate(
  estimate: Pick<LayoutEstimate, 'print' | 'cooling'>,
  breakoutSeconds: number,
): StageDurations {
  return {
    preheatSeconds: estimate.print.preheatSeconds,
    layersSeconds: estimate.print.layersSeconds,
    inMachineCoolingSeconds: estimate.cooling.inMachineSeconds,
    outsideCoolingSeconds: estimate.cooling.outsideSeconds,
    breakoutSeconds,
  };
}
