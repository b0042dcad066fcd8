import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import type { Mailer } from '../mail/mailer';
import { AppError, badRequest, conflict, notFound } from '../errors';
import type { LabsService } from './labs';
import {
  type Actor,
  INACTIVE_STATUSES,
  INACTIVE_SQL,
  checkPlanId,
  type PlanRow,
  type LayoutSummaryRow,
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
import { allowedNext, canTransition, isEditable, type PlanStatus } from '../../shared/plans/status';
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
  type PlanOrientationRule,
  type PlanCreated,
  type PlanMoved,
  type PlanView,
} from '../../shared/schemas/plans';

/** A plan as the list shows it: its machine, material and author by name, and its lines and layouts counted (counts come as text). */
type PlanListRow = {
  id: string;
  name: string;
  status: PlanStatus;
  version: number;
  chosen_layout_id: string | null;
  queue_position: number | null;
  created_at: Date;
  updated_at: Date;
  machine_id: string;
  machine_name: string;
  material_id: string;
  material_name: string;
  created_by: string | null;
  created_by_name: string | null;
  line_count: string;
  part_count: string;
  earliest_due_date: string | null;
  layout_count: string;
};

/** An open request line with its part and request, and how much of it other plans hold (a sum, as text). */
type OpenLineRow = {
  id: string;
  quantity: number;
  part_id: string;
  part_name: string;
  size_x_mm: number;
  size_y_mm: number;
  size_z_mm: number;
  volume_mm3: number;
  orientation: OpenLineView['part']['orientation'];
  request_id: string;
  title: string;
  due_date: string;
  priority: OpenLineView['request']['priority'];
  material_id: string | null;
  held: string;
};

type PlanEventRow = {
  id: string;
  from_status: PlanStatus | null;
  to_status: PlanStatus;
  user_id: string | null;
  user_name: string | null;
  comment: string | null;
  created_at: Date;
};

function addDeltas(into: Map<string, number>, lines: Array<{ requestLineId: string; quantity: number }>, sign: 1 | -1) {
  for (const l of lines) into.set(l.requestLineId, (into.get(l.requestLineId) ?? 0) + sign * l.quantity);
}


type LineInput = { requestLineId: string; quantity: number; orientation?: PlanOrientationRule | null };

/**
 * Checks the lines a planner picked: each a request line of this lab, its
 * request open and in the plan's material, and no more than it still needs
 * (its quantity less its planned count, not counting what this plan itself
 * holds). Locks the request lines so two plans cannot both take the last of one.
 */
async function checkLines(db: Database, labId: string, materialId: string, lines: LineInput[], planId: string | null, transaction: Transaction) {
  const ids = lines.map((l) => l.requestLineId);
  const rows = await db.sequelize.query<{
    id: string;
    quantity: number;
    planned_count: number;
    status: string;
    material_id: string | null;
    title: string;
    part_name: string;
  }>(
    `SELECT rl.id, rl.quantity, rl.planned_count, r.status, r.material_id, r.title, p.name AS part_name
       FROM request_lines rl JOIN requests r ON r.id = rl.request_id JOIN parts p ON p.id = rl.part_id
      WHERE rl.id = ANY($1::uuid[]) AND r.lab_id = $2
      FOR UPDATE OF rl`,
    { bind: [ids, labId], type: QueryTypes.SELECT, transaction },
  );
  const own = planId
    ? await db.sequelize.query<{ request_line_id: string; quantity: number }>('SELECT request_line_id, quantity FROM plan_lines WHERE plan_id = $1', {
        bind: [planId],
        type: QueryTypes.SELECT,
        transaction,
      })
    : [];
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

async function insertLines(db: Database, planId: string, lines: LineInput[], transaction: Transaction) {
  if (lines.length === 0) return;
  const values: string[] = [];
  const bind: unknown[] = [planId];
  lines.forEach((l, i) => {
    bind.push(l.requestLineId, i, l.quantity, l.orientation ?? null);
    const k = bind.length;
    values.push(`(gen_random_uuid(), $1, $${k - 3}, $${k - 2}, $${k - 1}, $${k}, now(), now())`);
  });
  await db.sequelize.query(
    `INSERT INTO plan_lines (id, plan_id, request_line_id, position, quantity, orientation, created_at, updated_at) VALUES ${values.join(', ')}`,
    { bind, transaction },
  );
}


export type PlansDeps = { labs: LabsService; mailer: Mailer; appUrl: string; log?: (msg: string) => void };

/** Build plans: creating them from request lines, listing, reading, saving with a version, sending for review, cancelling. */
export function plansService(db: Database, deps: PlansDeps) {
  const { sequelize } = db;

  async function get(labId: string, planId: string): Promise<PlanView> {
    const [plan] = await sequelize.query<PlanRow & { created_by_name: string | null }>(
      `SELECT p.*, u.name AS created_by_name FROM plans p LEFT JOIN users u ON u.id = p.created_by WHERE p.id = $1 AND p.lab_id = $2`,
      { bind: [checkPlanId(planId), labId], type: QueryTypes.SELECT },
    );
    if (!plan) throw notFound('That plan');
    const [machine, material, lines, layouts, events] = await Promise.all([
      profileRow(db, 'machines', labId, plan.machine_id),
      profileRow(db, 'materials', labId, plan.material_id),
      planLines(db, plan.id),
      sequelize.query<LayoutSummaryRow>(
        `SELECT l.id, l.label, l.locked, l.settings, l.lines_key, l.result_format, l.placement_count, l.summary,
                l.estimate - 'areaPerLayerMm2' AS estimate_summary, l.created_by, l.created_at, u.name AS created_by_name
           FROM layouts l LEFT JOIN users u ON u.id = l.created_by WHERE l.plan_id = $1 ORDER BY l.created_at`,
        { bind: [plan.id], type: QueryTypes.SELECT },
      ),
      sequelize.query<PlanEventRow>(
        `SELECT e.id, e.from_status, e.to_status, e.user_id, u.name AS user_name, e.comment, e.created_at
           FROM plan_events e LEFT JOIN users u ON u.id = e.user_id WHERE e.plan_id = $1 ORDER BY e.created_at, e.id`,
        { bind: [plan.id], type: QueryTypes.SELECT },
      ),
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
        const [rows] = (await sequelize.query(
          `INSERT INTO plans (id, lab_id, name, machine_id, material_id, status, version, created_by, created_at, updated_at)
           VALUES (gen_random_uuid(), $1, $2, $3, $4, 'draft', 1, $5, now(), now()) RETURNING id`,
          { bind: [labId, input.name, input.machineId, input.materialId, user.id], transaction },
        )) as [Array<{ id: string }>, unknown];
        const id = rows[0].id;
        await insertLines(db, id, input.lines, transaction);
        await recordEvent(db, id, null, 'draft', user.id, null, transaction);
        const deltas = new Map<string, number>();
        addDeltas(deltas, input.lines, 1);
        await adjustPlanned(db, deltas, transaction);
        return { id, version: 1, status: 'draft' as const };
      });
    },

    async list(labId: string, q: PlanListQuery): Promise<PlanListItem[]> {
      const rows = await sequelize.query<PlanListRow>(
        `SELECT p.id, p.name, p.status, p.version, p.chosen_layout_id, p.queue_position, p.created_at, p.updated_at,
                p.machine_id, m.name AS machine_name, p.material_id, mt.name AS material_name,
                p.created_by, u.name AS created_by_name,
                (SELECT COUNT(*) FROM plan_lines pl WHERE pl.plan_id = p.id) AS line_count,
                (SELECT COALESCE(SUM(pl.quantity), 0) FROM plan_lines pl WHERE pl.plan_id = p.id) AS part_count,
                (SELECT to_char(MIN(r.due_date), 'YYYY-MM-DD') FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id
                   JOIN requests r ON r.id = rl.request_id WHERE pl.plan_id = p.id) AS earliest_due_date,
                (SELECT COUNT(*) FROM layouts l WHERE l.plan_id = p.id) AS layout_count
           FROM plans p
           JOIN machines m ON m.id = p.machine_id
           JOIN materials mt ON mt.id = p.material_id
           LEFT JOIN users u ON u.id = p.created_by
          WHERE p.lab_id = $1 AND ($2::text[] IS NULL OR p.status = ANY($2::text[])) AND ($3::uuid IS NULL OR p.machine_id = $3::uuid)
          ORDER BY p.updated_at DESC`,
        { bind: [labId, q.status ?? null, q.machineId ?? null], type: QueryTypes.SELECT },
      );
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
      const rows = await sequelize.query<OpenLineRow>(
        `SELECT rl.id, rl.quantity, p.id AS part_id, p.name AS part_name, p.size_x_mm, p.size_y_mm, p.size_z_mm, p.volume_mm3,
                p.orientation, r.id AS request_id, r.title, to_char(r.due_date, 'YYYY-MM-DD') AS due_date, r.priority, r.material_id,
                rl.planned_count - COALESCE((SELECT SUM(pl.quantity) FROM plan_lines pl JOIN plans pp ON pp.id = pl.plan_id
                           WHERE pl.request_line_id = rl.id AND pp.id = $3::uuid AND pp.status NOT IN ${INACTIVE_SQL}), 0) AS held
           FROM request_lines rl JOIN requests r ON r.id = rl.request_id JOIN parts p ON p.id = rl.part_id
          WHERE r.lab_id = $1 AND r.status = 'open' AND ($2::uuid IS NULL OR r.material_id = $2::uuid)
          ORDER BY CASE r.priority WHEN 'urgent' THEN 0 WHEN 'high' THEN 1 WHEN 'normal' THEN 2 ELSE 3 END, r.due_date, r.created_at, rl.position`,
        { bind: [labId, q.materialId ?? null, q.planId ?? null], type: QueryTypes.SELECT },
      );
      return rows
        .map((r) => ({
          requestLineId: r.id,
          part: { id: r.part_id, name: r.part_name, sizeMm: [r.size_x_mm, r.size_y_mm, r.size_z_mm] as [number, number, number], volumeMm3: r.volume_mm3, orientation: r.orientation },
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
          await sequelize.query('DELETE FROM plan_lines WHERE plan_id = $1', { bind: [plan.id], transaction });
          await insertLines(db, plan.id, input.lines, transaction);
          const deltas = new Map<string, number>();
          addDeltas(deltas, before.map((l) => ({ requestLineId: l.request_line_id, quantity: l.quantity })), -1);
          addDeltas(deltas, input.lines, 1);
          await adjustPlanned(db, deltas, transaction);
        }
        await reopenIfSentBack(db, plan, user.id, transaction);
        const sets = ['version = version + 1', 'updated_at = now()'];
        const bind: unknown[] = [plan.id, plan.version];
        if (input.name !== undefined) {
          bind.push(input.name);
          sets.push(`name = $${bind.length}`);
        }
        if (input.draft !== undefined) {
          bind.push(input.draft === null ? null : JSON.stringify(input.draft));
          sets.push(`draft = $${bind.length}::jsonb`);
        }
        const [rows] = (await sequelize.query(`UPDATE plans SET ${sets.join(', ')} WHERE id = $1 AND version = $2 RETURNING version`, {
          bind,
          transaction,
        })) as [Array<{ version: number }>, unknown];
        if (rows.length === 0) {
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
        const [layout] = await sequelize.query<{ lines_key: string }>('SELECT lines_key FROM layouts WHERE id = $1', {
          bind: [plan.chosen_layout_id],
          type: QueryTypes.SELECT,
          transaction,
        });
        if (layout.lines_key !== linesKey(await planLines(db, plan.id, transaction))) {
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
        await sequelize.query('UPDATE plans SET queue_position = NULL WHERE id = $1', { bind: [plan.id], transaction });
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
