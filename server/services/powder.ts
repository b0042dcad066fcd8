// Over 450 lines: one ledger of a material's powder (stock, forecast and reorder notices, draws for runs, recoveries, checks), every change under the material's lock with the same age bookkeeping.
import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { powderRepository, type Check, type Lot, type Movement } from '../db/repositories/powder';
import type { Mailer } from '../mail/mailer';
import { AppError, badRequest, conflict, notFound } from '../errors';
import type { LabsService } from './labs';
import type { QueueService } from './queue';
import type { Actor } from './planCommon';
import {
  addToPool,
  buildWarnings,
  clean,
  fillMeanAge,
  forecastStock,
  KG_EPS,
  oldestFirst,
  proposeDraws,
  recoverIntoPool,
  reuseBlocked,
  stockSeries,
  takeFromPool,
  type Demand,
  type MeltFlowState,
  type PowderPolicy,
} from '../../shared/powder';
import type {
  ForecastView,
  LotDetailView,
  LotDrawsInput,
  LotView,
  MaterialDetailView,
  MaterialStockView,
  MeltFlowInput,
  MeltFlowView,
  MovementInput,
  MovementView,
  PlanPowderView,
  PowderOverview,
  ReceiveLotInput,
  RecoveryInput,
  ReleaseInput,
  RequestLotsView,
} from '../../shared/schemas/powder';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const iso = (d: Date | string | number) => new Date(d).toISOString();
const kgText = (kg: number) => `${clean(kg).toFixed(1)} kg`;
/** Statuses after breakout, when the cake's powder has been sieved. */
const BROKEN_OUT = new Set(['breakout', 'finishing', 'done']);

/**
 * The powder a layout's estimate asks for. The estimate is stored as the
 * estimate code wrote it; both the older and the newer field names are read.
 */
export function plannedPowder(estimate: Record<string, unknown> | null): { freshKg: number; reusedKg: number } | null {
  const p = estimate?.powder as Record<string, unknown> | undefined;
  if (!p) return null;
  const freshKg = p.freshPowderKg ?? p.freshKg;
  const reusedKg = p.reusedPowderKg ?? p.reusedKg;
  return typeof freshKg === 'number' && typeof reusedKg === 'number' ? { freshKg, reusedKg } : null;
}

const checkView = (c: Check): MeltFlowView => ({
  id: c.id,
  mvrCm3Per10Min: c.mvrCm3Per10Min,
  testTempC: c.testTempC,
  testLoadKg: c.testLoadKg,
  thresholdCm3Per10Min: c.thresholdCm3Per10Min,
  passed: c.passed,
  note: c.note,
  measuredAt: iso(c.measuredAt),
  measuredBy: c.measuredBy,
  releasedAt: c.releasedAt ? iso(c.releasedAt) : null,
  releasedBy: c.releasedBy,
  releaseReason: c.releaseReason,
});
const meltState = (c: Check | undefined): MeltFlowState | null => (c ? { mvrCm3Per10Min: c.mvrCm3Per10Min, passed: c.passed, released: c.releasedAt !== null } : null);

const movementView = (m: Movement): MovementView => ({
  id: m.id,
  kind: m.kind,
  deltaKg: m.deltaKg,
  lot: m.lotId ? { id: m.lotId, code: m.lotCode ?? '' } : null,
  plan: m.planId ? { id: m.planId, name: m.planName ?? '' } : null,
  countedKg: m.countedKg,
  cakeDiscardedKg: m.cakeDiscardedKg,
  reason: m.reason,
  poolAgeAfter: m.poolAgeAfter,
  at: iso(m.at),
  by: m.byId ? { id: m.byId, name: m.byName ?? '' } : null,
});
const lotView = (l: Lot): LotView => ({ ...l });

export type PowderDeps = { labs: LabsService; queue: QueueService; mailer: Mailer; appUrl: string; log?: (msg: string) => void };

/** What a run's start asks of the powder stock, inside the start's transaction. */
export type RunDraw = {
  labId: string;
  planId: string;
  runId: string;
  materialId: string;
  freshKg: number;
  reusedKg: number;
  lots?: LotDrawsInput;
  at: Date;
  userId: string;
};

/**
 * Powder stock per material as a ledger of movements: lots received, powder
 * loaded into builds and sieved back, thrown away and counted; the reused
 * powder's mean age; melt-flow checks; the forecast from the queues; and the
 * trace from runs to lots and back. Every movement runs in one transaction
 * under the material's row lock, so stock read there stays true until commit.
 */
export function powderService(db: Database, deps: PowderDeps) {
  const { sequelize } = db;
  const repo = powderRepository(db);

  async function materialOf(labId: string, materialId: string, transaction?: Transaction, field = 'materialId') {
    const m = UUID.test(materialId) ? await repo.material(labId, materialId, transaction) : null;
    if (!m) throw new AppError(404, 'not_found', `${field} is not a material of this lab`, field);
    return m;
  }

  function today(nowMs: number) {
    return new Date(nowMs).toISOString().slice(0, 10);
  }

  /** Fresh powder the queued builds take, at their predicted starts, per material. */
  async function demands(labId: string, nowMs: number): Promise<Map<string, Demand[]>> {
    const plans = await repo.queuedPlans(labId);
    const byMaterial = new Map<string, Demand[]>();
    if (plans.length === 0) return byMaterial;
    const startAt = new Map<string, number>();
    for (const machineId of new Set(plans.map((p) => p.machine_id))) {
      const q = await deps.queue.get(labId, machineId, nowMs);
      for (const item of q.plans) startAt.set(item.planId, Date.parse(item.startAt));
    }
    for (const p of plans) {
      const need = plannedPowder(p.estimate);
      if (!need) continue;
      const list = byMaterial.get(p.material_id) ?? [];
      list.push({ atMs: startAt.get(p.id) ?? nowMs, freshKg: need.freshKg, planId: p.id, planName: p.name });
      byMaterial.set(p.material_id, list);
    }
    return byMaterial;
  }

  /**
   * The forecast of a material's fresh stock against what the queue needs. A material whose stock the lab does not
   * keep yet (`tracked` false) has what the queue needs, but no shelf to hold it against: no stock line, reorder
   * date, running out or shortage (0 kg recorded is not 0 kg on the shelf).
   */
  function forecastView(stockKg: number, policy: PowderPolicy, list: Demand[], nowMs: number, tracked = true): ForecastView {
    const f = forecastStock({ stockKg, nowMs, demands: list, reorderLevelKg: policy.reorderLevelKg, leadTimeDays: policy.leadTimeDays });
    if (!tracked) return { points: [], neededKg: f.neededKg, belowReorderAt: null, runsOutAt: null, runsOutPlan: null, shortage: false };
    const names = new Map(list.map((d) => [d.planId, d.planName]));
    return {
      points: f.points.map((p) => ({ at: iso(p.atMs), stockKg: p.stockKg, planId: p.planId, planName: p.planId ? (names.get(p.planId) ?? null) : null })),
      neededKg: f.neededKg,
      belowReorderAt: f.belowReorderAtMs === null ? null : iso(f.belowReorderAtMs),
      runsOutAt: f.runsOutAtMs === null ? null : iso(f.runsOutAtMs),
      runsOutPlan: f.runsOutPlanId ? { id: f.runsOutPlanId, name: names.get(f.runsOutPlanId) ?? '' } : null,
      shortage: f.shortage,
    };
  }

  async function stockViews(labId: string, nowMs: number, only?: string): Promise<MaterialStockView[]> {
    const materials = (await repo.materials(labId)).filter((m) => !only || m.id === only);
    const [totals, policies, need] = await Promise.all([repo.totals(labId), repo.policies(materials.map((m) => m.id)), demands(labId, nowMs)]);
    const out: MaterialStockView[] = [];
    for (const m of materials) {
      const t = totals.get(m.id) ?? { freshKg: 0, reusedKg: 0, lotCount: 0, tracked: false };
      const policy = policies.get(m.id)!;
      const pool = await repo.pool(m.id);
      const [last] = await repo.checks(m.id, 1);
      out.push({
        material: m,
        policy,
        tracked: t.tracked,
        freshKg: t.freshKg,
        reusedKg: t.reusedKg,
        reusedMeanAgeBuilds: pool.meanAgeBuilds,
        lotCount: t.lotCount,
        lastCheck: last ? checkView(last) : null,
        reuseBlocked: reuseBlocked(meltState(last)),
        forecast: forecastView(t.freshKg, policy, need.get(m.id) ?? [], nowMs, t.tracked),
      });
    }
    return out;
  }

  /** One e-mail to the leads when a material's forecast first dips below its reorder level within the lead time. */
  async function noticeShortages(labId: string, views: MaterialStockView[]) {
    for (const v of views) {
      if (!v.tracked) continue;
      if (!v.forecast.shortage) {
        await repo.closeShortage(v.material.id);
        continue;
      }
      const id = await repo.openShortage(labId, v.material.id, new Date(v.forecast.belowReorderAt!), v.forecast.neededKg);
      if (!id) continue;
      const leads = (await deps.labs.members(labId)).filter((m) => m.roles.includes('lead')).map((m) => m.email);
      const when = v.forecast.belowReorderAt!.slice(0, 10);
      const text = [
        `The fresh stock of ${v.material.name} is forecast to fall below its reorder level of ${kgText(v.policy.reorderLevelKg)} on ${when},`,
        `within its lead time of ${v.policy.leadTimeDays} days.`,
        '',
        `On hand now: ${kgText(v.freshKg)} fresh, ${kgText(v.reusedKg)} reused. The queued builds need ${kgText(v.forecast.neededKg)} fresh.`,
        ...(v.forecast.runsOutPlan ? [`The stock would not cover the build "${v.forecast.runsOutPlan.name}".`] : []),
        '',
        `Stock and forecast: ${deps.appUrl}/powder/${v.material.id}`,
      ].join('\n');
      let sent = false;
      for (const to of leads) {
        try {
          await deps.mailer.send({ to, subject: `Reorder powder: ${v.material.name}`, text });
          sent = true;
        } catch (err) {
          deps.log?.(`could not e-mail ${to}: ${(err as Error).message}`);
        }
      }
      if (sent) await repo.markMailed(id);
    }
  }

  /** Reading the stock changes nothing: the reorder e-mails go out from the changes (checkShortages). */
  async function overview(labId: string, nowMs = Date.now()): Promise<PowderOverview> {
    return { materials: await stockViews(labId, nowMs), now: iso(nowMs) };
  }

  /**
   * The lab's forecasts against their reorder levels: a shortage newly in sight is recorded and mailed to the
   * leads once; one no longer in sight is closed. Called after a change that moves a forecast (stock, queue,
   * plans, runs, a material's policy) and now and then for the passing of time.
   */
  async function checkShortages(labId: string, nowMs = Date.now()): Promise<void> {
    await noticeShortages(labId, await stockViews(labId, nowMs));
  }

  async function material(labId: string, materialId: string, nowMs = Date.now()): Promise<MaterialDetailView> {
    await materialOf(labId, materialId);
    const [view] = await stockViews(labId, nowMs, materialId);
    const [lots, movements, checks, ledger] = await Promise.all([repo.lots(materialId), repo.movements({ materialId }, 200), repo.checks(materialId), repo.ledger(materialId)]);
    return {
      ...view,
      lots: lots.map(lotView),
      movements: movements.map(movementView),
      checks: checks.map(checkView),
      history: stockSeries(ledger).map((p) => ({ at: iso(p.atMs), freshKg: p.freshKg, reusedKg: p.reusedKg })),
    };
  }

  /** Runs `work` in a transaction under the material's lock; the material must be the lab's. */
  async function underLock<T>(labId: string, materialId: string, work: (t: Transaction, policy: PowderPolicy, name: string) => Promise<T>, field = 'materialId'): Promise<T> {
    return sequelize.transaction(async (t) => {
      const m = await materialOf(labId, materialId, t, field);
      const policy = await repo.lockMaterial(labId, materialId, t);
      return work(t, policy, m.name);
    });
  }

  /** Takes a build's powder from the stock, in the start's transaction; refuses (409) what the stock cannot cover. */
  async function drawForRun(d: RunDraw, t: Transaction): Promise<void> {
    const m = await materialOf(d.labId, d.materialId, t);
    await repo.lockMaterial(d.labId, d.materialId, t);
    const pool = await repo.pool(d.materialId, t);
    // A material is tracked from its first movement (a lot received or a count): before that the lab
    // keeps its stock elsewhere, the start is not checked against the shelf and records no draw.
    if (!pool.tracked && !d.lots?.length) return;
    const lots = await repo.lots(d.materialId, t);
    let draws: Array<{ lotId: string; code: string; kg: number }>;
    if (d.lots && d.lots.length > 0) {
      const input = d.lots;
      const byId = new Map(lots.map((l) => [l.id, l]));
      const seen = new Set<string>();
      draws = input.map((x, i) => {
        const lot = byId.get(x.lotId);
        if (!lot) throw badRequest(`lots[${i}].lotId is not a lot of ${m.name}`, `lots[${i}].lotId`);
        if (seen.has(x.lotId)) throw badRequest(`lots[${i}].lotId lists lot ${lot.code} a second time`, `lots[${i}].lotId`);
        seen.add(x.lotId);
        if (x.kg > lot.onHandKg + KG_EPS) {
          throw conflict('powder_short', `Lot ${lot.code} of ${m.name} holds ${kgText(lot.onHandKg)}, not ${kgText(x.kg)}: ${kgText(x.kg - lot.onHandKg)} short.`, `lots[${i}].kg`, {
            materialId: m.id,
            material: m.name,
            shortfallKg: clean(x.kg - lot.onHandKg),
          });
        }
        return { lotId: lot.id, code: lot.code, kg: x.kg };
      });
      const sum = draws.reduce((a, x) => a + x.kg, 0);
      if (Math.abs(sum - d.freshKg) > 0.001) throw badRequest(`lots add up to ${kgText(sum)}, but freshPowderKg is ${kgText(d.freshKg)}: they must match`, 'lots');
    } else {
      const p = proposeDraws(lots, d.freshKg, today(d.at.getTime()));
      if (p.shortfallKg > 0) {
        // The proposal took every usable lot to its end: what it drew is all the usable fresh powder.
        const onHand = p.draws.reduce((a, x) => a + x.kg, 0);
        throw conflict(
          'powder_short',
          `Not enough fresh ${m.name}: this build loads ${kgText(d.freshKg)} and the usable lots hold ${kgText(onHand)}` +
            `${p.skippedExpired.length ? ` (expired lots left out: ${p.skippedExpired.join(', ')})` : ''}: ${kgText(p.shortfallKg)} short.`,
          'freshPowderKg',
          { materialId: m.id, material: m.name, kind: 'fresh', shortfallKg: p.shortfallKg },
        );
      }
      draws = p.draws;
    }
    if (d.reusedKg > pool.massKg + KG_EPS) {
      const short = d.reusedKg - pool.massKg;
      throw conflict('powder_short', `Not enough reused ${m.name}: this build loads ${kgText(d.reusedKg)} and the reused stock holds ${kgText(pool.massKg)}: ${kgText(short)} short.`, 'reusedPowderKg', {
        materialId: m.id,
        material: m.name,
        kind: 'reused',
        shortfallKg: clean(short),
      });
    }
    if (d.reusedKg > 0) {
      const [last] = await repo.checks(d.materialId, 1, t);
      if (reuseBlocked(meltState(last))) {
        throw conflict(
          'reuse_blocked',
          `The reused ${m.name} failed its last melt-flow check (${last.mvrCm3Per10Min} cm³/10 min): it may not be loaded until a lead releases it. Load fresh powder only, or ask a lead.`,
          'reusedPowderKg',
          { materialId: m.id, material: m.name },
        );
      }
    }
    const fillAge = fillMeanAge(d.freshKg, d.reusedKg, pool.meanAgeBuilds);
    const base = { labId: d.labId, materialId: d.materialId, kind: 'loaded' as const, runId: d.runId, planId: d.planId, at: d.at, byUser: d.userId, fillAgeBuilds: fillAge };
    for (const x of draws) if (x.kg > 0) await repo.addMovement({ ...base, lotId: x.lotId, deltaKg: -x.kg }, t);
    if (d.reusedKg > 0) await repo.addMovement({ ...base, lotId: null, deltaKg: -d.reusedKg, poolAgeAfter: takeFromPool(pool, d.reusedKg).meanAgeBuilds }, t);
  }

  return {
    overview,
    checkShortages,
    /** Every lab whose powder is tracked, for the periodic look at the forecasts. */
    async sweepShortages(nowMs = Date.now()): Promise<void> {
      for (const labId of await repo.trackedLabs()) {
        await checkShortages(labId, nowMs).catch((err: Error) => deps.log?.(`powder forecast of lab ${labId}: ${err.message}`));
      }
    },
    material,
    drawForRun,

    async setPolicy(labId: string, materialId: string, user: Actor, input: PowderPolicy): Promise<MaterialDetailView> {
      await underLock(labId, materialId, async (t) => repo.setPolicy(labId, materialId, input, user.id, t));
      return material(labId, materialId);
    },

    async receiveLot(labId: string, user: Actor, input: ReceiveLotInput): Promise<LotView> {
      if (input.expiresOn && input.expiresOn < input.receivedOn) throw badRequest('expiresOn is before receivedOn', 'expiresOn');
      if (input.receivedOn > today(Date.now() + 86_400_000)) throw badRequest('receivedOn is in the future', 'receivedOn');
      const lotId = await underLock(labId, input.materialId, async (t, _policy, name) => {
        if (await repo.lotCodeTaken(input.materialId, input.code, t)) {
          throw conflict('lot_code_taken', `code: ${name} already has a lot ${input.code}; give this delivery its own code`, 'code');
        }
        const id = await repo.createLot(
          { labId, materialId: input.materialId, code: input.code, makerLot: input.makerLot ?? '', receivedOn: input.receivedOn, expiresOn: input.expiresOn ?? null, note: input.note ?? '', createdBy: user.id },
          t,
        );
        await repo.addMovement({ labId, materialId: input.materialId, lotId: id, kind: 'received', deltaKg: input.kg, at: new Date(`${input.receivedOn}T12:00:00Z`), byUser: user.id }, t);
        return id;
      });
      return lotView((await repo.lot(labId, lotId))!);
    },

    /** A discard or a stock count, on a fresh lot or the reused pool. */
    async recordMovement(labId: string, user: Actor, input: MovementInput): Promise<MovementView> {
      const at = input.at ? new Date(input.at) : new Date();
      if (at.getTime() > Date.now() + 120_000) throw badRequest('at is in the future', 'at');
      const id = await underLock(labId, input.materialId, async (t, _policy, name) => {
        const lotId = input.lotId ?? null;
        let onHand: number;
        let pool = null as Awaited<ReturnType<typeof repo.pool>> | null;
        let label: string;
        if (lotId) {
          const lot = (await repo.lots(input.materialId, t)).find((l) => l.id === lotId);
          if (!lot) throw badRequest(`lotId is not a lot of ${name}`, 'lotId');
          onHand = lot.onHandKg;
          label = `lot ${lot.code}`;
        } else {
          pool = await repo.pool(input.materialId, t);
          onHand = pool.massKg;
          label = `the reused ${name}`;
        }
        const base = { labId, materialId: input.materialId, lotId, at, byUser: user.id, reason: input.reason };
        if (input.kind === 'discarded') {
          if (input.kg > onHand + KG_EPS) {
            throw conflict('powder_short', `kg: ${label} holds ${kgText(onHand)}; ${kgText(input.kg)} cannot be discarded from it`, 'kg', { shortfallKg: clean(input.kg - onHand) });
          }
          return repo.addMovement({ ...base, kind: 'discarded', deltaKg: -input.kg, poolAgeAfter: pool ? takeFromPool(pool, input.kg).meanAgeBuilds : null }, t);
        }
        const delta = clean(input.countedKg - onHand);
        // Powder found beyond the book mixes in at the pool's age; a shortfall leaves the age as it was.
        const after = pool ? (delta >= 0 ? addToPool(pool, delta, pool.meanAgeBuilds) : takeFromPool(pool, -delta)) : null;
        return repo.addMovement({ ...base, kind: 'adjusted', deltaKg: delta, countedKg: input.countedKg, poolAgeAfter: after ? after.meanAgeBuilds : null }, t);
      });
      const [m] = (await repo.movements({ materialId: input.materialId }, 50)).filter((x) => x.id === id);
      return movementView(m);
    },

    async lot(labId: string, lotId: string): Promise<LotDetailView> {
      const lot = UUID.test(lotId) ? await repo.lot(labId, lotId) : null;
      if (!lot) throw notFound('That lot');
      const m = await materialOf(labId, lot.materialId);
      const [movements, builds] = await Promise.all([repo.movements({ lotId }), repo.buildsOfLot(lotId)]);
      return {
        lot: lotView(lot),
        material: m,
        movements: movements.map(movementView),
        builds: builds.map((b) => ({
          plan: { id: b.plan_id, name: b.plan_name, status: b.status },
          runId: b.run_id,
          startedAt: iso(b.started_at),
          kg: clean(b.kg),
          requests: b.requests ?? [],
        })),
      };
    },

    /** A melt volume-rate (ISO 1133-1) of the reused powder, judged against the material's threshold. */
    async addCheck(labId: string, user: Actor, input: MeltFlowInput): Promise<MeltFlowView> {
      const measuredAt = input.at ? new Date(input.at) : new Date();
      if (measuredAt.getTime() > Date.now() + 120_000) throw badRequest('at is in the future', 'at');
      const materialId = input.materialId;
      await underLock(labId, materialId, async (t, policy) => {
        // Aged polyamide powder flows less when molten (its chains grow longer with every heat cycle), so the threshold is a floor.
        const threshold = policy.minMvrCm3Per10Min;
        await repo.addCheck(
          {
            labId,
            materialId,
            mvrCm3Per10Min: input.mvrCm3Per10Min,
            testTempC: input.testTempC ?? null,
            testLoadKg: input.testLoadKg ?? null,
            thresholdCm3Per10Min: threshold,
            passed: threshold === null || input.mvrCm3Per10Min >= threshold,
            note: input.note ?? '',
            measuredAt,
            measuredBy: user.id,
          },
          t,
        );
      });
      const [last] = await repo.checks(materialId, 1);
      return checkView(last);
    },

    async release(labId: string, checkId: string, user: Actor, input: ReleaseInput): Promise<MeltFlowView> {
      if (!UUID.test(checkId)) throw notFound('That check');
      let materialId = '';
      await sequelize.transaction(async (t) => {
        const check = await repo.checkRow(labId, checkId, t);
        if (!check) throw notFound('That check');
        materialId = check.materialId;
        await repo.lockMaterial(labId, check.materialId, t);
        if (check.passed) throw conflict('not_failed', 'This check passed: there is nothing to release.');
        if (check.released) throw conflict('already_released', 'This check was released already.');
        await repo.release(checkId, user.id, input.reason, t);
      });
      return checkView((await repo.checks(materialId)).find((c) => c.id === checkId)!);
    },

    /** What a plan takes from the stock (planners' view), or what its run took and gave back. */
    async plan(labId: string, planId: string, nowMs = Date.now()): Promise<PlanPowderView> {
      const row = UUID.test(planId) ? await repo.runOfPlan(labId, planId) : null;
      if (!row) throw notFound('That plan');
      const m = await materialOf(labId, row.material_id);
      const [pool, lots, [last], policies] = await Promise.all([repo.pool(m.id), repo.lots(m.id), repo.checks(m.id, 1), repo.policies([m.id])]);
      const policy = policies.get(m.id)!;
      const planned = plannedPowder(row.chosen_layout_id ? await repo.layoutEstimate(row.chosen_layout_id) : null);
      const freshOnHand = clean(lots.reduce((a, l) => a + l.onHandKg, 0));
      const blocked = reuseBlocked(meltState(last));
      let run: PlanPowderView['run'] = null;
      if (row.run_id) {
        const moves = await repo.movements({ runId: row.run_id });
        const rec = moves.find((x) => x.kind === 'recovered');
        const reusedLoad = moves.find((x) => x.kind === 'loaded' && x.lotId === null);
        run = {
          id: row.run_id,
          draws: moves.filter((x) => x.kind === 'loaded' && x.lotId && x.deltaKg < 0).reverse().map((x) => ({ lotId: x.lotId!, code: x.lotCode ?? '', kg: -x.deltaKg })),
          reusedKg: reusedLoad ? -reusedLoad.deltaKg : 0,
          fillAgeBuilds: moves.find((x) => x.kind === 'loaded' && x.fillAgeBuilds !== null)?.fillAgeBuilds ?? null,
          recovery: rec ? { recoveredKg: rec.deltaKg, discardedKg: rec.cakeDiscardedKg ?? 0, at: iso(rec.at), by: rec.byId ? { id: rec.byId, name: rec.byName ?? '' } : null } : null,
          reusedFromLots: reusedLoad ? await repo.lotsBehindPool(m.id, row.run_id) : [],
        };
      }
      const proposal = planned && !row.run_id ? proposeDraws(lots, planned.freshKg, today(nowMs)) : null;
      // The other queued builds of this material, at their predicted starts: what they take of the fresh stock first.
      const ahead = row.run_id ? [] : ((await demands(labId, nowMs)).get(m.id) ?? []).filter((d) => d.planId !== row.plan_id);
      return {
        plan: { id: row.plan_id, name: row.plan_name, status: row.status },
        material: m,
        tracked: pool.tracked,
        policy,
        lots: oldestFirst(lots.filter((l) => l.onHandKg > KG_EPS)).map((l) => ({ id: l.id, code: l.code, receivedOn: l.receivedOn, expiresOn: l.expiresOn, onHandKg: l.onHandKg })),
        lastCheck: meltState(last),
        queuedFreshKg: clean(ahead.reduce((a, d) => a + d.freshKg, 0)),
        queuedPlans: ahead.length,
        planned,
        stock: { freshKg: freshOnHand, reusedKg: pool.massKg, reusedMeanAgeBuilds: pool.meanAgeBuilds, reuseBlocked: blocked },
        proposal,
        reusedShortfallKg: planned && !row.run_id ? clean(Math.max(0, planned.reusedKg - pool.massKg)) : 0,
        warnings: planned && !row.run_id ? buildWarnings(planned, pool.meanAgeBuilds, policy, meltState(last)) : [],
        after: planned && !row.run_id ? { freshKg: clean(freshOnHand - planned.freshKg), reusedKg: clean(pool.massKg - planned.reusedKg) } : null,
        run,
      };
    },

    /** After breakout: sieved powder back into the reused stock, the rest of the cake thrown away. */
    async recordRecovery(labId: string, planId: string, user: Actor, input: RecoveryInput): Promise<PlanPowderView> {
      const row = UUID.test(planId) ? await repo.runOfPlan(labId, planId) : null;
      if (!row) throw notFound('That plan');
      if (!row.run_id || !BROKEN_OUT.has(row.status)) {
        throw conflict('not_broken_out', 'Recovered powder is recorded after breakout; this build has not been broken out.', undefined, { status: row.status });
      }
      const discardedKg = input.discardedKg ?? 0;
      const loadedKg = (row.fresh_loaded ?? 0) + (row.reused_loaded ?? 0);
      if (input.recoveredKg + discardedKg > loadedKg + KG_EPS) {
        throw badRequest(
          `recoveredKg: ${kgText(input.recoveredKg)} recovered${discardedKg ? ` and ${kgText(discardedKg)} discarded` : ''} is more than the ${kgText(loadedKg)} loaded into this build`,
          'recoveredKg',
        );
      }
      const at = input.at ? new Date(input.at) : new Date();
      if (at.getTime() > Date.now() + 120_000) throw badRequest('at is in the future', 'at');
      if (row.started_at && at < new Date(row.started_at)) throw badRequest('at is before the build started', 'at');
      try {
        await underLock(labId, row.material_id, async (t) => {
          const prior = await repo.movements({ runId: row.run_id! }, 50, t);
          if (prior.some((x) => x.kind === 'recovered')) throw conflict('already_recorded', "This build's recovered powder is recorded already; correct the stock with a count.");
          const pool = await repo.pool(row.material_id, t);
          const loadAge = prior.find((x) => x.kind === 'loaded' && x.fillAgeBuilds !== null)?.fillAgeBuilds;
          // A build started before the lab kept its ledger: its fill is presumed mixed at today's pool age.
          const fillAge = loadAge ?? fillMeanAge(row.fresh_loaded ?? 0, row.reused_loaded ?? 0, pool.meanAgeBuilds);
          await repo.addMovement(
            {
              labId,
              materialId: row.material_id,
              lotId: null,
              kind: 'recovered',
              deltaKg: input.recoveredKg,
              cakeDiscardedKg: discardedKg,
              reason: input.reason ?? '',
              runId: row.run_id,
              planId: row.plan_id,
              poolAgeAfter: recoverIntoPool(pool, input.recoveredKg, fillAge).meanAgeBuilds,
              at,
              byUser: user.id,
            },
            t,
          );
        });
      } catch (err) {
        if ((err as { name?: string }).name === 'SequelizeUniqueConstraintError') {
          throw conflict('already_recorded', "This build's recovered powder is recorded already; correct the stock with a count.");
        }
        throw err;
      }
      return this.plan(labId, planId);
    },

    /** The lots a request's parts were printed from. */
    async requestLots(labId: string, requestId: string): Promise<RequestLotsView> {
      const request = UUID.test(requestId) ? await repo.request(labId, requestId) : null;
      if (!request) throw notFound('That request');
      const runs = await repo.runsOfRequest(labId, requestId);
      const materials = new Map((await repo.materials(labId)).map((m) => [m.id, m.name]));
      const builds = [];
      for (const r of runs) {
        const moves = await repo.movements({ runId: r.run_id });
        const reused = moves.find((x) => x.kind === 'loaded' && x.lotId === null);
        builds.push({
          plan: { id: r.plan_id, name: r.plan_name, status: r.status },
          runId: r.run_id,
          startedAt: iso(r.started_at),
          freshLots: moves
            .filter((x) => x.kind === 'loaded' && x.lotId && x.deltaKg < 0)
            .reverse()
            .map((x) => ({ id: x.lotId!, code: x.lotCode ?? '', materialName: materials.get(r.material_id) ?? '', kg: -x.deltaKg })),
          reusedKg: reused ? -reused.deltaKg : 0,
          reusedFromLots: reused ? await repo.lotsBehindPool(r.material_id, r.run_id) : [],
        });
      }
      return { request, builds };
    },
  };
}
export type PowderService = ReturnType<typeof powderService>;
