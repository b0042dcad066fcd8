import { Op, col, fn, literal, where, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { ReadingCheckStatus } from '../../../shared/floor';

/** A plan's run at the machine, as a plain record (never an ORM instance). */
export type RunRecord = {
  id: string;
  planId: string;
  machineId: string;
  layoutId: string | null;
  checklist: { chamberInPlace: boolean; opticalWindowClean: boolean };
  freshPowderLoadedKg: number;
  reusedPowderLoadedKg: number;
  startedAt: Date;
  startedBy: string | null;
  startedByName: string | null;
  printEndedAt: Date | null;
  leftMachineAt: Date | null;
  breakoutAt: Date | null;
  finishingAt: Date | null;
  doneAt: Date | null;
  abortedAt: Date | null;
  abortReason: string | null;
  finishingChecklist: { powderRemoved: boolean; blasted: boolean; inspected: boolean } | null;
  estimatedPrintHours: number;
  estimatedCoolingHours: number;
  actualPrintHours: number | null;
  actualCoolingHours: number | null;
  powderUsedKg: number | null;
};

export type ReadingRecord = {
  id: string;
  tempC: number;
  place: 'machine' | 'outside';
  takenAt: Date;
  userId: string | null;
  userName: string | null;
  checkStatus: ReadingCheckStatus;
  coolestC: number | null;
  confirmedByReadingId: string | null;
  acceptedBy: string | null;
  acceptedByName: string | null;
  acceptedReason: string | null;
  acceptedAt: Date | null;
};

export type RunLineRecord = { planLineId: string; plannedCount: number; goodCount: number; failedCount: number };

export type NewRun = {
  planId: string;
  labId: string;
  machineId: string;
  layoutId: string | null;
  checklist: RunRecord['checklist'];
  freshPowderLoadedKg: number;
  reusedPowderLoadedKg: number;
  startedAt: Date;
  startedBy: string;
  estimatedPrintHours: number;
  estimatedCoolingHours: number;
  printTimeScaleUsed: number;
  coolingScaleUsed: number;
  estimatedPreheatHours: number;
  estimatedLayerHours: number | null;
  estimatedScanHours: number | null;
};

/** The fields a step of the run sets. */
export type RunStep = Partial<
  Pick<RunRecord, 'printEndedAt' | 'leftMachineAt' | 'breakoutAt' | 'finishingAt' | 'doneAt' | 'abortedAt' | 'abortReason' | 'finishingChecklist' | 'actualPrintHours' | 'actualCoolingHours' | 'powderUsedKg'>
>;

/** Another build on the machine, as the check that one build prints at a time names it. */
export type OtherBuild = { planId: string; name: string; at: Date };

/** A request of a run's lines, with its designer's address and its lines' totals now. */
export type RunRequest = { id: string; title: string; status: string; email: string | null; quantity: number; printed: number };

/**
 * Runs, their readings and per-line counts, read and written through the
 * models. Every write takes the caller's transaction: a run's step is one
 * transaction under the plan's row lock.
 */
export function runsRepository(db: Database) {
  const { Run, RunReading, RunLine, Plan, PlanEvent, Layout, Machine, Request, RequestLine, User } = db.models;
  const name = { model: User, attributes: ['name'], required: false };

  return {
    /**
     * Locks the row of the plan's machine (as approvals and the queue's reorder take it), so two starts on one
     * machine, of the same plan or of two, are checked one after the other. Nothing when there is no such plan.
     */
    async lockMachineOfPlan(labId: string, planId: string, transaction: Transaction): Promise<void> {
      const plan = await Plan.findOne({ where: { id: planId, labId }, attributes: ['machineId'], transaction });
      if (plan) await Machine.findByPk(plan.machineId, { attributes: ['id'], transaction, lock: transaction.LOCK.UPDATE });
    },

    /** The chosen layout's estimate, without its per-layer areas (large, and a run never reads them). */
    async estimate<T>(layoutId: string, transaction?: Transaction): Promise<T | null> {
      const row = await Layout.findByPk(layoutId, { attributes: [[literal(`"estimate" - 'areaPerLayerMm2'`), 'estimate']], transaction });
      return row ? (row.get('estimate') as T) : null;
    },

    async runOfPlan(planId: string, transaction?: Transaction): Promise<RunRecord | null> {
      const r = await Run.findOne({ where: { planId }, include: [{ ...name, as: 'starter' }], transaction });
      if (!r) return null;
      return {
        id: r.id,
        planId: r.planId,
        machineId: r.machineId,
        layoutId: r.layoutId,
        checklist: r.checklist,
        freshPowderLoadedKg: r.freshPowderLoadedKg,
        reusedPowderLoadedKg: r.reusedPowderLoadedKg,
        startedAt: r.startedAt,
        startedBy: r.startedBy,
        startedByName: r.starter?.name ?? null,
        printEndedAt: r.printEndedAt,
        leftMachineAt: r.leftMachineAt,
        breakoutAt: r.breakoutAt,
        finishingAt: r.finishingAt,
        doneAt: r.doneAt,
        abortedAt: r.abortedAt,
        abortReason: r.abortReason,
        finishingChecklist: r.finishingChecklist ?? null,
        estimatedPrintHours: r.estimatedPrintHours,
        estimatedCoolingHours: r.estimatedCoolingHours,
        actualPrintHours: r.actualPrintHours,
        actualCoolingHours: r.actualCoolingHours,
        powderUsedKg: r.powderUsedKg,
      };
    },

    /** The run's temperature readings in the order they were taken. */
    async readings(runId: string, transaction?: Transaction): Promise<ReadingRecord[]> {
      const rows = await RunReading.findAll({
        where: { runId },
        include: [
          { ...name, as: 'user' },
          { ...name, as: 'acceptor' },
        ],
        order: [
          ['takenAt', 'ASC'],
          ['createdAt', 'ASC'],
        ],
        transaction,
      });
      return rows.map((g) => ({
        id: g.id,
        tempC: g.tempC,
        place: g.place as ReadingRecord['place'],
        takenAt: g.takenAt,
        userId: g.userId,
        userName: g.user?.name ?? null,
        checkStatus: g.checkStatus,
        coolestC: g.coolestC,
        confirmedByReadingId: g.confirmedByReadingId,
        acceptedBy: g.acceptedBy,
        acceptedByName: g.acceptor?.name ?? null,
        acceptedReason: g.acceptedReason,
        acceptedAt: g.acceptedAt,
      }));
    },

    /** The counts entered at breakout, one per plan line. */
    async lines(runId: string, transaction?: Transaction): Promise<RunLineRecord[]> {
      const rows = await RunLine.findAll({ where: { runId }, attributes: ['planLineId', 'plannedCount', 'goodCount', 'failedCount'], transaction });
      return rows.map((l) => ({ planLineId: l.planLineId, plannedCount: l.plannedCount, goodCount: l.goodCount, failedCount: l.failedCount }));
    },

    /** When the plan was last approved, or null. */
    async approvedAt(planId: string, transaction?: Transaction): Promise<Date | null> {
      return (await PlanEvent.max<Date | null, InstanceType<typeof PlanEvent>>('createdAt', { where: { planId, toStatus: 'approved' }, transaction })) ?? null;
    },

    /** Another build on the machine whose print has not ended (nor been aborted), or null. */
    async printingOn(machineId: string, exceptPlanId: string, transaction?: Transaction): Promise<OtherBuild | null> {
      const r = await Run.findOne({
        where: { machineId, planId: { [Op.ne]: exceptPlanId }, printEndedAt: null, abortedAt: null },
        include: [{ model: Plan, as: 'plan', attributes: ['name'], required: true }],
        transaction,
      });
      return r ? { planId: r.planId, name: r.plan!.name, at: r.startedAt } : null;
    },

    /** Of the machine's other builds, the one whose print ended (or was aborted) last after `after`, with when; or null. */
    async printedAfter(machineId: string, exceptPlanId: string, after: Date, transaction?: Transaction): Promise<OtherBuild | null> {
      const ended = fn('COALESCE', col('Run.print_ended_at'), col('Run.aborted_at'));
      const r = await Run.findOne({
        where: { [Op.and]: [{ machineId, planId: { [Op.ne]: exceptPlanId } }, where(ended, Op.gt, after)] },
        include: [{ model: Plan, as: 'plan', attributes: ['name'], required: true }],
        order: [[ended, 'DESC']],
        transaction,
      });
      return r ? { planId: r.planId, name: r.plan!.name, at: (r.printEndedAt ?? r.abortedAt)! } : null;
    },

    async create(run: NewRun, transaction: Transaction): Promise<string> {
      return (await Run.create(run, { transaction })).id;
    },

    async update(runId: string, step: RunStep, transaction: Transaction): Promise<void> {
      await Run.update(step, { where: { id: runId }, transaction });
    },

    /** A started plan leaves its machine's queue (its updated time stays: nobody edited the plan). */
    async leaveQueue(planId: string, transaction: Transaction): Promise<void> {
      await Plan.update({ queuePosition: null }, { where: { id: planId }, transaction, silent: true });
    },

    async addCounts(runId: string, counts: Array<{ planLineId: string; requestLineId: string; plannedCount: number; goodCount: number; failedCount: number }>, transaction: Transaction): Promise<void> {
      await RunLine.bulkCreate(
        counts.map((c) => ({ runId, ...c })),
        { transaction },
      );
    },

    /** Lowers request lines' planned counts by what a run gives back (never below nothing). */
    async givePlannedBack(back: ReadonlyArray<readonly [string, number]>, transaction: Transaction): Promise<void> {
      const changed = new Map(back.filter(([, n]) => n > 0));
      if (changed.size === 0) return;
      const rows = await RequestLine.findAll({ where: { id: [...changed.keys()] }, transaction, lock: transaction.LOCK.UPDATE });
      for (const row of rows) await row.update({ plannedCount: Math.max(row.plannedCount - changed.get(row.id)!, 0) }, { transaction });
    },

    /** The run's good parts count as printed in their request lines. */
    async addPrinted(runId: string, transaction: Transaction): Promise<void> {
      const lines = await RunLine.findAll({ where: { runId }, attributes: ['requestLineId', 'goodCount'], transaction });
      for (const l of lines) await RequestLine.increment('printedCount', { by: l.goodCount, where: { id: l.requestLineId }, transaction });
    },

    /** The requests with their designer's e-mail and their lines' quantities and printed parts (at most the quantity per line). */
    async requests(requestIds: string[], transaction?: Transaction): Promise<RunRequest[]> {
      const rows = await Request.findAll({
        where: { id: requestIds },
        attributes: ['id', 'title', 'status'],
        include: [
          { model: RequestLine, as: 'lines', attributes: ['quantity', 'printedCount'], required: true },
          { model: User, as: 'creator', attributes: ['email'], required: false },
        ],
        transaction,
      });
      return rows.map((r) => ({
        id: r.id,
        title: r.title,
        status: r.status,
        email: r.creator?.email ?? null,
        quantity: r.lines!.reduce((s, l) => s + l.quantity, 0),
        printed: r.lines!.reduce((s, l) => s + Math.min(l.printedCount, l.quantity), 0),
      }));
    },

    async markRequestsDone(requestIds: string[], transaction: Transaction): Promise<void> {
      await Request.update({ status: 'done' }, { where: { id: requestIds }, transaction });
    },

    /** Records a reading; returns its id. */
    async addReading(
      r: { runId: string; tempC: number; place: 'machine' | 'outside'; takenAt: Date; userId: string; checkStatus: ReadingCheckStatus; coolestC: number | null },
      transaction: Transaction,
    ): Promise<string> {
      return (await RunReading.create(r, { transaction })).id;
    },

    /** A doubted reading is confirmed by a later one that agrees with it. */
    async confirmReading(readingId: string, byReadingId: string, transaction: Transaction): Promise<void> {
      await RunReading.update({ checkStatus: 'confirmed', confirmedByReadingId: byReadingId }, { where: { id: readingId }, transaction });
    },

    async acceptReading(readingId: string, userId: string, reason: string, transaction: Transaction): Promise<void> {
      await RunReading.update({ checkStatus: 'accepted', acceptedBy: userId, acceptedReason: reason, acceptedAt: new Date() }, { where: { id: readingId }, transaction });
    },
  };
}
export type RunsRepository = ReturnType<typeof runsRepository>;
