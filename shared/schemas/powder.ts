import { z } from 'zod';
import { MOVEMENT_KINDS } from '../powder/stock';

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
export type ReleaseInput = z.infer<typeof releaseSchema>;

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
// The answers of the powder routes. The server's functions return these
// types and the screens parse every answer with the same schemas.

const person = z.object({ id: z.string(), name: z.string() });
export type Person = z.infer<typeof person>;
const named = z.object({ id: z.string(), name: z.string() });
const planRef = z.object({ id: z.string(), name: z.string(), status: z.string() });
const lotRef = z.object({ id: z.string(), code: z.string() });
const time = z.string();

export const powderPolicyView = z.object({
  maxMeanAgeBuilds: z.number(),
  minRefreshRatio: z.number(),
  minMvrCm3Per10Min: z.number().nullable(),
  reorderLevelKg: z.number(),
  leadTimeDays: z.number(),
});

export const meltFlowView = z.object({
  id: z.string(),
  mvrCm3Per10Min: z.number(),
  testTempC: z.number().nullable(),
  testLoadKg: z.number().nullable(),
  thresholdCm3Per10Min: z.number().nullable(),
  passed: z.boolean(),
  note: z.string(),
  measuredAt: time,
  measuredBy: person.nullable(),
  releasedAt: time.nullable(),
  releasedBy: person.nullable(),
  releaseReason: z.string().nullable(),
});
export type MeltFlowView = z.infer<typeof meltFlowView>;

export const lotView = z.object({
  id: z.string(),
  materialId: z.string(),
  code: z.string(),
  makerLot: z.string(),
  receivedOn: z.string(),
  expiresOn: z.string().nullable(),
  note: z.string(),
  receivedKg: z.number(),
  onHandKg: z.number(),
});
export type LotView = z.infer<typeof lotView>;

export const movementView = z.object({
  id: z.string(),
  kind: z.enum(MOVEMENT_KINDS),
  deltaKg: z.number(),
  lot: lotRef.nullable(),
  plan: named.nullable(),
  countedKg: z.number().nullable(),
  cakeDiscardedKg: z.number().nullable(),
  reason: z.string(),
  poolAgeAfter: z.number().nullable(),
  at: time,
  by: person.nullable(),
});
export type MovementView = z.infer<typeof movementView>;

export const forecastView = z.object({
  points: z.array(z.object({ at: time, stockKg: z.number(), planId: z.string().nullable(), planName: z.string().nullable() })),
  neededKg: z.number(),
  belowReorderAt: time.nullable(),
  runsOutAt: time.nullable(),
  runsOutPlan: named.nullable(),
  shortage: z.boolean(),
});
export type ForecastView = z.infer<typeof forecastView>;

export const materialStockView = z.object({
  material: named,
  policy: powderPolicyView,
  /**
   * Whether the lab keeps this material's stock: true from its first
   * movement (a lot received or a count). An untracked material's builds
   * start without a stock check, and the screens say so.
   */
  tracked: z.boolean(),
  freshKg: z.number(),
  reusedKg: z.number(),
  reusedMeanAgeBuilds: z.number(),
  lotCount: z.number(),
  lastCheck: meltFlowView.nullable(),
  reuseBlocked: z.boolean(),
  forecast: forecastView,
});
export type MaterialStockView = z.infer<typeof materialStockView>;

export const powderOverview = z.object({ materials: z.array(materialStockView), now: time });
export type PowderOverview = z.infer<typeof powderOverview>;

export const materialDetailView = materialStockView.extend({
  lots: z.array(lotView),
  movements: z.array(movementView),
  checks: z.array(meltFlowView),
  history: z.array(z.object({ at: time, freshKg: z.number(), reusedKg: z.number() })),
});
export type MaterialDetailView = z.infer<typeof materialDetailView>;

export const traceBuild = z.object({
  plan: planRef,
  runId: z.string(),
  startedAt: time,
  kg: z.number(),
  requests: z.array(z.object({ id: z.string(), title: z.string() })),
});
export type TraceBuild = z.infer<typeof traceBuild>;

export const lotDetailView = z.object({
  lot: lotView,
  material: named,
  movements: z.array(movementView),
  builds: z.array(traceBuild),
});
export type LotDetailView = z.infer<typeof lotDetailView>;

const draw = z.object({ lotId: z.string(), code: z.string(), kg: z.number() });
export const drawProposalView = z.object({ draws: z.array(draw), shortfallKg: z.number(), skippedExpired: z.array(z.string()) });

export const buildWarningView = z.discriminatedUnion('code', [
  z.object({ code: z.literal('age'), message: z.string(), fillAgeBuilds: z.number(), maxMeanAgeBuilds: z.number() }),
  z.object({ code: z.literal('refresh'), message: z.string(), refreshRatio: z.number(), minRefreshRatio: z.number() }),
  z.object({ code: z.literal('melt_flow'), message: z.string() }),
]);

export const planPowderView = z.object({
  plan: planRef,
  material: named,
  /** See materialStockView.tracked: an untracked material's start is not checked against the shelf. */
  tracked: z.boolean(),
  policy: powderPolicyView,
  /** From the chosen layout's estimate; null without one. */
  planned: z.object({ freshKg: z.number(), reusedKg: z.number() }).nullable(),
  stock: z.object({ freshKg: z.number(), reusedKg: z.number(), reusedMeanAgeBuilds: z.number(), reuseBlocked: z.boolean() }),
  /** The material's lots with powder left, oldest first: the floor card proposes and corrects draws from these. */
  lots: z.array(lotView.pick({ id: true, code: true, receivedOn: true, expiresOn: true, onHandKg: true })),
  /** The latest melt-flow check, for warnings the screens work out for other amounts. */
  lastCheck: z.object({ mvrCm3Per10Min: z.number(), passed: z.boolean(), released: z.boolean() }).nullable(),
  /** Fresh powder the lab's other queued builds of this material take, and how many they are. */
  queuedFreshKg: z.number(),
  queuedPlans: z.number(),
  proposal: drawProposalView.nullable(),
  /** Reused powder the pool lacks for the plan. */
  reusedShortfallKg: z.number(),
  warnings: z.array(buildWarningView),
  /** After this build: the fresh and reused stock left. */
  after: z.object({ freshKg: z.number(), reusedKg: z.number() }).nullable(),
  /** Once started: what was loaded, from which lots, and what came back. */
  run: z
    .object({
      id: z.string(),
      draws: z.array(draw),
      reusedKg: z.number(),
      fillAgeBuilds: z.number().nullable(),
      recovery: z.object({ recoveredKg: z.number(), discardedKg: z.number(), at: time, by: person.nullable() }).nullable(),
      /** Lots whose powder may be in the reused share: every lot that went into a build recovered before this one was loaded. */
      reusedFromLots: z.array(lotRef),
    })
    .nullable(),
});
export type PlanPowderView = z.infer<typeof planPowderView>;

export const requestLotsView = z.object({
  request: z.object({ id: z.string(), title: z.string() }),
  builds: z.array(
    z.object({
      plan: planRef,
      runId: z.string(),
      startedAt: time,
      freshLots: z.array(z.object({ id: z.string(), code: z.string(), materialName: z.string(), kg: z.number() })),
      reusedKg: z.number(),
      reusedFromLots: z.array(lotRef),
    }),
  ),
});
export type RequestLotsView = z.infer<typeof requestLotsView>;
