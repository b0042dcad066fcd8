import { z } from 'zod';
import type { BuildWarning, DrawProposal, MovementKind, PowderPolicy } from '../powder';

const uuid = z.uuid('must be an id');
/** Kilograms: a number (never a string), not negative, at most a plausible shelf. */
const kg = z.number({ error: 'must be a number of kilograms' }).finite('must be a number of kilograms').min(0, 'must not be negative').max(100_000, 'must be at most 100,000 kg');
const positiveKg = kg.refine((v) => v > 0, 'must be more than 0 kg');
const date = z.iso.date('must be a date (YYYY-MM-DD)');
const at = z.iso.datetime({ offset: true, error: 'must be an ISO 8601 time' }).optional();
const reason = z.string({ error: 'is required: say why' }).trim().min(1, 'is required: say why').max(1000, 'must be at most 1,000 characters');
const text = (max: number) => z.string({ error: 'must be text' }).trim().max(max, `must be at most ${max} characters`);

export const receiveLotSchema = z.strictObject({
  materialId: uuid,
  code: z.string({ error: 'is required: the lab\'s code for this lot' }).trim().min(1, 'is required: the lab\'s code for this lot').max(60, 'must be at most 60 characters'),
  makerLot: text(120).optional(),
  kg: positiveKg,
  receivedOn: date,
  expiresOn: date.nullable().optional(),
  note: text(1000).optional(),
});
export type ReceiveLotInput = z.infer<typeof receiveLotSchema>;

/** A movement typed at the shelf: throwing powder away, or a stock count. `lotId` null (or left out) means the reused pool. */
export const movementSchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({ kind: z.literal('discarded'), materialId: uuid, lotId: uuid.nullable().optional(), kg: positiveKg, reason, at }),
    z.strictObject({ kind: z.literal('adjusted'), materialId: uuid, lotId: uuid.nullable().optional(), countedKg: kg, reason, at }),
  ],
  { error: 'kind must be "discarded" or "adjusted" (powder is received as a lot, loaded and recovered at the machine)' },
);
export type MovementInput = z.infer<typeof movementSchema>;

/** After breakout: sieved powder back into the reused stock, and cake powder thrown away. */
export const recoverySchema = z.strictObject({
  recoveredKg: kg,
  discardedKg: kg.optional(),
  reason: text(1000).optional(),
  at,
});
export type RecoveryInput = z.infer<typeof recoverySchema>;

export const meltFlowSchema = z.strictObject({
  materialId: uuid,
  mvrCm3Per10Min: z.number({ error: 'must be a melt volume-rate in cm³/10 min' }).finite().gt(0, 'must be more than 0').max(1000, 'must be at most 1,000 cm³/10 min'),
  testTempC: z.number({ error: 'must be a temperature in °C' }).min(100, 'must be at least 100 °C').max(400, 'must be at most 400 °C').optional(),
  testLoadKg: z.number({ error: 'must be a load in kg' }).gt(0, 'must be more than 0').max(50, 'must be at most 50 kg').optional(),
  note: text(1000).optional(),
  at,
});
export type MeltFlowInput = z.infer<typeof meltFlowSchema>;

export const releaseSchema = z.strictObject({ reason });

export const policySchema = z.strictObject({
  maxMeanAgeBuilds: z.number({ error: 'must be a number of builds' }).gt(0, 'must be more than 0').max(100, 'must be at most 100'),
  minRefreshRatio: z.number({ error: 'must be a share between 0 and 1' }).min(0, 'must be at least 0').max(1, 'must be at most 1'),
  minMvrCm3Per10Min: z.number({ error: 'must be a melt volume-rate in cm³/10 min' }).gt(0, 'must be more than 0').max(1000).nullable(),
  reorderLevelKg: kg,
  leadTimeDays: z.number({ error: 'must be a whole number of days' }).int('must be a whole number of days').min(0, 'must be at least 0').max(365, 'must be at most 365'),
});

/** What the operator really loaded from each fresh lot (the server proposes oldest first when left out). */
export const lotDrawsSchema = z
  .array(z.strictObject({ lotId: uuid, kg: positiveKg }), { error: 'must be a list of lots and kilograms' })
  .max(50, 'must be at most 50 lots');
export type LotDrawsInput = z.infer<typeof lotDrawsSchema>;

// ---- views ----

export interface Person {
  id: string;
  name: string;
}

export interface MeltFlowView {
  id: string;
  mvrCm3Per10Min: number;
  testTempC: number | null;
  testLoadKg: number | null;
  thresholdCm3Per10Min: number | null;
  passed: boolean;
  note: string;
  measuredAt: string;
  measuredBy: Person | null;
  releasedAt: string | null;
  releasedBy: Person | null;
  releaseReason: string | null;
}

export interface LotView {
  id: string;
  materialId: string;
  code: string;
  makerLot: string;
  receivedOn: string;
  expiresOn: string | null;
  note: string;
  receivedKg: number;
  onHandKg: number;
}

export interface MovementView {
  id: string;
  kind: MovementKind;
  deltaKg: number;
  lot: { id: string; code: string } | null;
  plan: { id: string; name: string } | null;
  countedKg: number | null;
  cakeDiscardedKg: number | null;
  reason: string;
  poolAgeAfter: number | null;
  at: string;
  by: Person | null;
}

export interface ForecastView {
  points: Array<{ at: string; stockKg: number; planId: string | null; planName: string | null }>;
  neededKg: number;
  belowReorderAt: string | null;
  runsOutAt: string | null;
  runsOutPlan: { id: string; name: string } | null;
  shortage: boolean;
}

export interface MaterialStockView {
  material: { id: string; name: string };
  policy: PowderPolicy;
  /** Whether any movement was ever recorded: stock is checked at the machine only once the lab keeps it. */
  tracked: boolean;
  freshKg: number;
  reusedKg: number;
  reusedMeanAgeBuilds: number;
  lotCount: number;
  lastCheck: MeltFlowView | null;
  reuseBlocked: boolean;
  forecast: ForecastView;
}

export interface PowderOverview {
  materials: MaterialStockView[];
  now: string;
}

export interface MaterialDetailView extends MaterialStockView {
  lots: LotView[];
  movements: MovementView[];
  checks: MeltFlowView[];
  history: Array<{ at: string; freshKg: number; reusedKg: number }>;
}

export interface TraceBuild {
  plan: { id: string; name: string; status: string };
  runId: string;
  startedAt: string;
  kg: number;
  requests: Array<{ id: string; title: string }>;
}

export interface LotDetailView {
  lot: LotView;
  material: { id: string; name: string };
  movements: MovementView[];
  builds: TraceBuild[];
}

export interface PlanPowderView {
  plan: { id: string; name: string; status: string };
  material: { id: string; name: string };
  tracked: boolean;
  /** From the chosen layout's estimate; null without one. */
  planned: { freshKg: number; reusedKg: number } | null;
  stock: { freshKg: number; reusedKg: number; reusedMeanAgeBuilds: number; reuseBlocked: boolean };
  proposal: DrawProposal | null;
  /** Reused powder the pool lacks for the plan. */
  reusedShortfallKg: number;
  warnings: BuildWarning[];
  /** After this build: the fresh and reused stock left. */
  after: { freshKg: number; reusedKg: number } | null;
  /** Once started: what was loaded, from which lots, and what came back. */
  run: {
    id: string;
    draws: Array<{ lotId: string; code: string; kg: number }>;
    reusedKg: number;
    fillAgeBuilds: number | null;
    recovery: { recoveredKg: number; discardedKg: number; at: string; by: Person | null } | null;
    /** Lots whose powder may be in the reused share: every lot that went into a build recovered before this one was loaded. */
    reusedFromLots: Array<{ id: string; code: string }>;
  } | null;
}

export interface RequestLotsView {
  request: { id: string; title: string };
  builds: Array<{
    plan: { id: string; name: string; status: string };
    runId: string;
    startedAt: string;
    freshLots: Array<{ id: string; code: string; materialName: string; kg: number }>;
    reusedKg: number;
    reusedFromLots: Array<{ id: string; code: string }>;
  }>;
}
