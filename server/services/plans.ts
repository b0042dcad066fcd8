import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { plansRepository, type PlanLineInput } from '../db/repositories/plans';
import { layoutsRepository } from '../db/repositories/layouts';
import type { Mailer } from '../mail/mailer';
import { AppError, badRequest, conflict, notFound } from '../errors';
import type { LabsService } from './labs';
import {
  type Actor,
  INACTIVE_STATUSES,
  checkPlanId,
  invalidTransition,
  readOnly,
  lockPlan,
  applyTransition,
  recordEvent,
  adjustPlanned,
  reopenIfSentBack,
  effectiveRule,
  linesKey,
  planLines,
  profileRow,
  iso,
  person,
  layoutSummary,
} from './planCommon';
import { allowedNext, canTransition, isEditable } from '../../shared/plans/status';
import {
  planMachineViewSchema,
  planMaterialViewSchema,
  type OpenLinesQuery,
  type PlanCreate,
  type PlanListQuery,
  type PlanUpdate,
  type OpenLineView,
  type PlanEventView,
  type PlanLineView,
  type PlanListItem,
  type PlanCreated,
  type PlanMoved,
  type PlanView,
} from '../../shared/schemas/plans';

function addDeltas(into: Map<string, number>, lines: Array<{ requestLineId: string; quantity: number }>, sign: 1 | -1) {
  for (const l of lines) into.set(l.requestLineId, (into.get(l.requestLineId) ?? 0) + sign * l.quantity);
}


type LineInput = PlanLineInput;

/**
 * Checks the lines a planner picked: each a request line of this lab, its
 * request open and in the plan's material, and no more than it still needs
 * (its quantity less its planned count, not counting what this plan itself
 * holds). Locks the request lines so two plans cannot both take the last of one.
 */
async function checkLines(db: Database, labId: string, materialId: string, lines: LineInput[], planId: string | null, transaction: Transaction) {
  const repo = plansRepository(db);
  const rows = await repo.lockPickedLines(
    labId,
    lines.map((l) => l.requestLineId),
    transaction,
  );
  const own = planId ? await repo.lineQuantities(planId, transaction) : [];
  const byId = new Map(rows.map((r) => [r.id, r]));
  const ownBy = new Map(own.map((o) => [o.request_line_id, o.quantity]));
  const problems: Array<{ field: string; message: string }> = [];
  lines.forEach((line, i) => {
    const row = byId.get(line.requestLineId);
    if (!row) {
      problems.push({ field: `lines[${i}].requestLineId`, message: 'is not a request line of this lab' });
      return;
    }
    const what = `"${row.part_name}" of request "${row.title}"`;
    if (row.status !== 'open') {
      problems.push({ field: `lines[${i}].requestLineId`, message: `is ${what}, which is ${row.status}, not open` });
      return;
    }
    if (row.material_id !== materialId) {
      problems.push({ field: `lines[${i}].requestLineId`, message: `is ${what}, which asks for another material than this plan's` });
      return;
    }
    const need = row.quantity - (row.planned_count - (ownBy.get(row.id) ?? 0));
    if (line.quantity > need) {
      problems.push({
        field: `lines[${i}].quantity`,
        message:
          need > 0
            ? `is ${line.quantity}, but ${what} still needs only ${need} (${row.quantity} asked, ${row.quantity - need} in other plans)`
            : `is ${line.quantity}, but ${what} needs no more: all ${row.quantity} are in other plans`,
      });
    }
  });
  if (problems.length > 0) {
    const first = problems[0];
    throw new AppError(400, 'invalid_input', `${first.field} ${first.message}`, first.field, { problems });
  }
}



export type PlansDeps = { labs: LabsService; mailer: Mailer; appUrl: string; log?: (msg: string) => void };

/** Build plans: creating them from request lines, listing, reading, saving with a version, sending for review, cancelling. */
export function plansService(db: Database, deps: PlansDeps) {
  const { sequelize } = db;
  const repo = plansRepository(db);
  const layoutsRepo = layoutsRepository(db);

  async function get(labId: string, planId: string): Promise<PlanView> {
    const plan = await repo.withCreator(labId, checkPlanId(planId));
    if (!plan) throw notFound('That plan');
    const [machine, material, lines, layouts, events] = await Promise.all([
      profileRow(db, 'machines', labId, plan.machine_id),
      profileRow(db, 'materials', labId, plan.material_id),
      planLines(db, plan.id),
      layoutsRepo.summaries(plan.id),
      repo.events(plan.id),
    ]);
    const holds = !INACTIVE_STATUSES.includes(plan.status);
    const key = linesKey(lines);
    const lineViews: PlanLineView[] = lines.map((l) => ({
      id: l.id,
      requestLineId: l.request_line_id,
      quantity: l.quantity,
      orientation: effectiveRule(l),
      orientationOverride: l.orientation,
      part: {
        id: l.part_id,
        name: l.part_name,
        sizeMm: [l.size_x_mm, l.size_y_mm, l.size_z_mm],
        volumeMm3: l.volume_mm3,
        watertight: l.watertight,
        triangles: l.triangles,
        orientation: l.part_orientation,
      },
      request: { id: l.request_id, title: l.request_title, dueDate: l.due_date, priority: l.priority, status: l.request_status },
      lineQuantity: l.line_quantity,
      plannedElsewhere: Math.max(0, l.line_planned - (holds ? l.quantity : 0)),
      printedCount: l.printed_count,
    }));
    const eventViews: PlanEventView[] = events.map((e) => ({
      id: e.id,
      from: e.from_status,
      to: e.to_status,
      by: person(e.user_id, e.user_name),
      at: iso(e.created_at),
      comment: e.comment,
    }));
    return {
      id: plan.id,
      labId: plan.lab_id,
      name: plan.name,
      status: plan.status,
      version: plan.version,
      editable: isEditable(plan.status),
      allowedTransitions: [...allowedNext(plan.status)],
      // The stored profiles, shaped by the view (a plan's machine and material cannot be deleted while it exists).
      machine: planMachineViewSchema.parse(machine),
      material: planMaterialViewSchema.parse(material),
      chosenLayoutId: plan.chosen_layout_id,
      queuePosition: plan.queue_position,
      draft: plan.draft ?? null,
      createdBy: person(plan.created_by, plan.created_by_name),
      createdAt: iso(plan.created_at),
      updatedAt: iso(plan.updated_at),
      lines: lineViews,
      layouts: layouts.map((row) => layoutSummary(row, plan, key)),
      events: eventViews,
    };
  }

  async function notify(to: string[], subject: string, text: string): Promise<string[]> {
    const sent: string[] = [];
    for (const address of to) {
      try {
        await deps.mailer.send({ to: address, subject, text });
        sent.push(address);
      } catch (err) {
        // The status change stands; the plan shows on home even when a message did not go out.
        deps.log?.(`could not e-mail ${address}: ${(err as Error).message}`);
      }
    }
    return sent;
  }

  return {
    get,
    notify,

    async create(labId: string, user: Actor, input: PlanCreate): Promise<PlanCreated> {
      return sequelize.transaction(async (transaction) => {
        if (!(await profileRow(db, 'machines', labId, input.machineId, transaction))) {
          throw badRequest('machineId is not a machine of this lab', 'machineId');
        }
        if (!(await profileRow(db, 'materials', labId, input.materialId, transaction))) {
          throw badRequest('materialId is not a material of this lab', 'materialId');
        }
        await checkLines(db, labId, input.materialId, input.lines, null, transaction);
        const id = await repo.create({ labId, name: input.name, machineId: input.machineId, materialId: input.materialId, createdBy: user.id }, transaction);
        await repo.setLines(id, input.lines, transaction);
        await recordEvent(db, id, null, 'draft', user.id, null, transaction);
        const deltas = new Map<string, number>();
        addDeltas(deltas, input.lines, 1);
        await adjustPlanned(db, deltas, transaction);
        return { id, version: 1, status: 'draft' as const };
      });
    },

    async list(labId: string, q: PlanListQuery): Promise<PlanListItem[]> {
      const rows = await repo.list(labId, { status: q.status ?? null, machineId: q.machineId ?? null });
      return rows.map((r) => ({
        id: r.id,
        name: r.name,
        status: r.status,
        version: r.version,
        machine: { id: r.machine_id, name: r.machine_name },
        material: { id: r.material_id, name: r.material_name },
        chosenLayoutId: r.chosen_layout_id,
        queuePosition: r.queue_position,
        lineCount: Number(r.line_count),
        partCount: Number(r.part_count),
        earliestDueDate: r.earliest_due_date,
        layoutCount: Number(r.layout_count),
        createdBy: person(r.created_by, r.created_by_name),
        createdAt: iso(r.created_at),
        updatedAt: iso(r.updated_at),
      }));
    },

    /**
     * Request lines of open requests that still need parts, most urgent first
     * (priority, then due date): what a planner picks for a plan.
     */
    async openLines(labId: string, q: OpenLinesQuery): Promise<OpenLineView[]> {
      const rows = await repo.openLines(labId, { materialId: q.materialId ?? null, exceptPlanId: q.planId ?? null });
      return rows
        .map((r) => ({
          requestLineId: r.id,
          part: { id: r.part_id, name: r.part_name, sizeMm: [r.size_x_mm, r.size_y_mm, r.size_z_mm] as [number, number, number], volumeMm3: r.volume_mm3, watertight: r.watertight, triangles: r.triangles, orientation: r.orientation },
          request: { id: r.request_id, title: r.title, dueDate: r.due_date, priority: r.priority, materialId: r.material_id },
          quantity: r.quantity,
          plannedCount: Math.max(0, Number(r.held)),
          remaining: r.quantity - Math.max(0, Number(r.held)),
        }))
        .filter((l) => l.remaining > 0);
    },

    /**
     * Saves the planner's changes if nobody saved since `version` was read;
     * otherwise 409 version_conflict with the current version, and nothing changes.
     */
    async update(labId: string, planId: string, user: Actor, input: PlanUpdate): Promise<PlanView> {
      await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!isEditable(plan.status)) throw readOnly(plan.status);
        if (plan.version !== input.version) {
          throw conflict(
            'version_conflict',
            `Someone saved this plan after you opened it (you have version ${input.version}, the plan is at ${plan.version}). Reload it, or keep your changes and save them over the newer version.`,
            'version',
            { currentVersion: plan.version, yourVersion: input.version },
          );
        }
        const read = plan.version;
        if (input.lines) {
          const before = await planLines(db, plan.id, transaction);
          await checkLines(db, labId, plan.material_id, input.lines, plan.id, transaction);
          await repo.setLines(plan.id, input.lines, transaction);
          const deltas = new Map<string, number>();
          addDeltas(deltas, before.map((l) => ({ requestLineId: l.request_line_id, quantity: l.quantity })), -1);
          addDeltas(deltas, input.lines, 1);
          await adjustPlanned(db, deltas, transaction);
        }
        await reopenIfSentBack(db, plan, user.id, transaction);
        const saved = await repo.saveEdits(plan.id, plan.version, { name: input.name, draft: input.draft }, transaction);
        if (saved === null) {
          throw conflict('version_conflict', 'Someone saved this plan at the same moment; reload it and try again.', 'version', {
            yourVersion: read,
          });
        }
      });
      return get(labId, planId);
    },

    /** draft -> in_review with a chosen layout that still fits the lines; every lead of the lab is e-mailed. */
    async submit(labId: string, planId: string, user: Actor, comment: string | null): Promise<PlanMoved> {
      const { plan, version } = await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        await reopenIfSentBack(db, plan, user.id, transaction);
        if (!canTransition(plan.status, 'in_review')) throw invalidTransition(plan.status, 'in_review');
        if (!plan.chosen_layout_id) {
          throw conflict('no_chosen_layout', 'Choose one of the layouts before sending the plan for review.');
        }
        const layoutKey = await layoutsRepo.linesKeyOf(plan.chosen_layout_id, transaction);
        if (layoutKey !== linesKey(await planLines(db, plan.id, transaction))) {
          throw conflict('layout_stale', "The chosen layout was packed before the plan's lines changed; pack again and choose the new layout.");
        }
        const version = await applyTransition(db, plan, 'in_review', user.id, comment, transaction);
        return { plan, version };
      });
      const leads = (await deps.labs.members(labId)).filter((m) => m.roles.includes('lead')).map((m) => m.email);
      const notified = await notify(
        leads,
        `Waiting for your review: plan ${plan.name}`,
        [
          `${user.name} sent the build plan "${plan.name}" for review.`,
          ...(comment ? ['', `Their note: ${comment}`] : []),
          '',
          'Open it to approve it into its machine\'s queue or send it back with a comment:',
          `${deps.appUrl}/review/${plan.id}`,
        ].join('\n'),
      );
      return { id: plan.id, status: plan.status, version, notified };
    },

    /** Any status before printing -> cancelled; the request lines' quantities are open again. */
    async cancel(labId: string, planId: string, user: Actor, comment: string | null): Promise<PlanMoved> {
      return sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        const version = await applyTransition(db, plan, 'cancelled', user.id, comment, transaction);
        await repo.setQueuePosition(plan.id, null, transaction);
        const lines = await planLines(db, plan.id, transaction);
        const deltas = new Map<string, number>();
        addDeltas(deltas, lines.map((l) => ({ requestLineId: l.request_line_id, quantity: l.quantity })), -1);
        await adjustPlanned(db, deltas, transaction);
        return { id: plan.id, status: plan.status, version };
      });
    },
  };
}
export type PlansService = ReturnType<typeof plansService>;
