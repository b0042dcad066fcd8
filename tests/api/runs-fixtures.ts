import type { Running } from '../../server/boot';
import { addMember } from '../helpers/app';
import { createPlan, gridLayout, labWithProfiles, makeRequest, planInstance, type FixturePart } from '../helpers/plans';
import type { PackInstanceInput, PackResult } from '../../shared/packing';

type Lab = Awaited<ReturnType<typeof labWithProfiles>>;

/** A lab with its lead (all roles), an operator and a designer. */
export async function labWithCrew(running: Running, tag: string, machine: Partial<Lab['machine']> = {}) {
  const lab = await labWithProfiles(running, tag);
  if (Object.keys(machine).length > 0) {
    const res = await lab.agent.patch(`/api/labs/${lab.labId}/machines/${lab.machineId}`).send(machine);
    if (res.status !== 200) throw new Error(`machine patch failed: ${res.status} ${JSON.stringify(res.body)}`);
    Object.assign(lab.machine, machine);
  }
  const operator = await addMember(running, lab.agent, lab.labId, ['operator'], 'operator');
  const designer = await addMember(running, lab.agent, lab.labId, ['designer'], 'designer');
  return { ...lab, operator, designer };
}

/**
 * A plan of `parts` packed on a grid, chosen, sent for review and approved by
 * the lead, so it is queued on the lab's machine.
 */
export async function queuedPlan(
  running: Running,
  lab: Lab,
  parts: FixturePart[],
  opts: { name?: string; dueDate?: string; approve?: boolean; layout?: (instance: PackInstanceInput) => PackResult; lines?: Array<{ id: string; quantity: number }> } = {},
) {
  // Either a new request of `parts`, or (with `lines`) open quantities of existing request lines.
  const req = opts.lines
    ? ({ requestId: '', lines: opts.lines } as unknown as Awaited<ReturnType<typeof makeRequest>>)
    : await makeRequest(running, lab.labId, lab.userId, lab.materialId, parts, { dueDate: opts.dueDate });
  const plan = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, req.lines, opts.name ?? 'Run plan');
  const base = `/api/labs/${lab.labId}/plans/${plan.id}`;
  const instance = planInstance(plan.view, lab.machine, lab.material);
  const layout = await lab.agent.post(`${base}/layouts`).send({ instance, result: (opts.layout ?? gridLayout)(instance) });
  if (layout.status !== 201) throw new Error(`layout failed: ${layout.status} ${JSON.stringify(layout.body)}`);
  await lab.agent.post(`${base}/layouts/${layout.body.id}/choose`);
  const sent = await lab.agent.post(`${base}/submit`);
  if (sent.status !== 200) throw new Error(`submit failed: ${JSON.stringify(sent.body)}`);
  if (opts.approve !== false) {
    const ok = await lab.agent.post(`${base}/review`).send({ decision: 'approve' });
    if (ok.status !== 200) throw new Error(`approve failed: ${JSON.stringify(ok.body)}`);
  }
  return { planId: plan.id, base, request: req, layoutId: layout.body.id as string, estimate: layout.body.estimate };
}

export const CHECKED = { chamberInPlace: true, opticalWindowClean: true };

/** The start body with just enough powder for the estimate. */
export function startBody(estimate: { powder: { freshPowderKg: number; reusedPowderKg: number } }, at?: string) {
  return {
    to: 'printing',
    checklist: CHECKED,
    freshPowderKg: Math.ceil(estimate.powder.freshPowderKg * 10) / 10,
    reusedPowderKg: Math.ceil(estimate.powder.reusedPowderKg * 10) / 10,
    ...(at ? { at } : {}),
  };
}

/** The id of a plan's run, as a card shows it: every step after the start names it. */
export async function runIdOf(agent: { get(url: string): PromiseLike<{ body: { id: string | null } }> }, base: string): Promise<string> {
  const res = await agent.get(`${base}/run`);
  if (!res.body.id) throw new Error(`no run yet at ${base}`);
  return res.body.id;
}

/**
 * Moves a plan's approval back in time, as if the lead had approved it `msAgo` ago: a run cannot be recorded as
 * started before its plan's approval, so a test of runs recorded late needs an approval earlier still.
 */
export async function backdateApproval(running: Running, planId: string, msAgo: number) {
  await running.db.sequelize.query(
    `UPDATE plan_events SET created_at = now() - ($2::double precision * interval '1 millisecond') WHERE plan_id = $1 AND to_status IN ('approved', 'queued')`,
    { bind: [planId, msAgo] },
  );
}
