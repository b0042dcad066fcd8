import { addMember, startTestApp, waitForMail } from '../helpers/app';
import { GEAR, sentForReview } from '../helpers/plans';
import { labWithCrew, queuedPlan, startBody } from './runs-fixtures';
import { UNDO_WINDOW_MS } from '../../server/services/takeBack';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

/** As if the plan's approval had been given `ms` ago. */
async function ageApproval(planId: string, ms: number) {
  await running.db.sequelize.query(
    `UPDATE plan_events SET created_at = created_at - ($2::double precision * interval '1 millisecond') WHERE plan_id = $1 AND to_status IN ('approved', 'queued')`,
    { bind: [planId, ms] },
  );
}

describe('undoing an approval', () => {
  test('the lead who approved puts the plan back in review within the window: it leaves the queue and the plans behind move up', async () => {
    const { agent: lead, labId, ids, userId, machineId, planner } = await sentForReview(running, 'undo-approve', 2);
    const url = (id: string) => `/api/labs/${labId}/plans/${id}`;
    // With a second approver required, the lead who undoes an approval still is not the one who sent the plan.
    expect((await lead.patch(`/api/labs/${labId}/settings`).send({ secondApproval: true })).body.secondApproval).toBe(true);
    const approved = await lead.post(`${url(ids[0])}/review`).send({ decision: 'approve' });
    const until = Date.parse(approved.body.undoUntil);
    expect(until - Date.now()).toBeGreaterThan(UNDO_WINDOW_MS - 10_000);
    expect(until - Date.now()).toBeLessThanOrEqual(UNDO_WINDOW_MS);
    await lead.post(`${url(ids[1])}/review`).send({ decision: 'approve' });

    const mailsBefore = running.mailer.caught!.length;
    const undone = await lead.post(`${url(ids[0])}/review/undo`);
    expect(undone.status).toBe(200);
    expect(undone.body).toMatchObject({ status: 'in_review', queuePosition: null, notified: [planner.email] });
    // The planner who sent it is told, as they were of the approval.
    const mail = await waitForMail(running, mailsBefore, planner.email);
    expect(mail.subject).toBe('Approval undone: plan Plan 1');
    expect(mail.text).toMatch(/undid the approval of the build plan "Plan 1".*waiting for review again/s);
    expect(mail.text).toContain(`/plans/${ids[0]}`);
    const view = (await lead.get(url(ids[0]))).body;
    expect(view.events.at(-1)).toMatchObject({ from: 'queued', to: 'in_review', by: { id: userId }, comment: 'Approval undone' });
    const queue = (await lead.get(`/api/labs/${labId}/machines/${machineId}/queue`)).body;
    expect(queue.plans.map((p: { planId: string; queuePosition: number }) => [p.planId, p.queuePosition])).toEqual([[ids[1], 1]]);
    // In review again: it can be decided anew, and undone only once.
    expect((await lead.post(`${url(ids[0])}/review/undo`)).status).toBe(409);
    const again = running.mailer.caught!.length;
    expect((await lead.post(`${url(ids[0])}/review`).send({ decision: 'approve' })).body).toMatchObject({ status: 'queued', queuePosition: 2, notified: [planner.email] });
    expect((await waitForMail(running, again, planner.email)).subject).toBe('Approved: plan Plan 1');
  });

  test("after the window the server answers 409 saying why; another lead or a planner may not undo someone's approval (403)", async () => {
    const lab = await sentForReview(running, 'undo-late', 2);
    const url = (id: string) => `/api/labs/${lab.labId}/plans/${id}`;
    await lab.agent.post(`${url(lab.ids[0])}/review`).send({ decision: 'approve' });
    await ageApproval(lab.ids[0], UNDO_WINDOW_MS + 1000);
    const late = await lab.agent.post(`${url(lab.ids[0])}/review/undo`);
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('undo_window_passed');
    expect(late.body.error.message).toMatch(/only within 2 minutes.*Return the plan to draft instead/);
    expect((await lab.agent.get(url(lab.ids[0]))).body.status).toBe('queued');

    await lab.agent.post(`${url(lab.ids[1])}/review`).send({ decision: 'approve' });
    expect((await lab.planner.agent.post(`${url(lab.ids[1])}/review/undo`)).status).toBe(403);
    const other = await addMember(running, lab.agent, lab.labId, ['lead'], 'other-lead');
    const notTheirs = await other.agent.post(`${url(lab.ids[1])}/review/undo`);
    expect(notTheirs.status).toBe(403);
    expect(notTheirs.body.error.message).toMatch(/Only the lead who approved/);
    expect((await lab.agent.get(url(lab.ids[1]))).body.status).toBe('queued');
  });
});

describe('undoing a queue move', () => {
  test('the lead puts the order back within the window, once; later, after another change, or by another role, it is refused', async () => {
    const lab = await labWithCrew(running, 'undo-move');
    const a = await queuedPlan(running, lab, [GEAR], { name: 'A' });
    const b = await queuedPlan(running, lab, [GEAR], { name: 'B' });
    const c = await queuedPlan(running, lab, [GEAR], { name: 'C' });
    const q = `/api/labs/${lab.labId}/machines/${lab.machineId}/queue`;
    const names = (body: { plans: Array<{ name: string }> }) => body.plans.map((p) => p.name);

    const moved = await lab.agent.put(q).send({ planIds: [c.planId, a.planId, b.planId] });
    expect(names(moved.body)).toEqual(['C', 'A', 'B']);
    expect(Date.parse(moved.body.move.undoUntil) - Date.now()).toBeGreaterThan(UNDO_WINDOW_MS - 10_000);
    const undoUrl = `${q}/moves/${moved.body.move.id}/undo`;
    expect((await lab.operator.agent.post(undoUrl)).status).toBe(403);
    const undone = await lab.agent.post(undoUrl);
    expect(undone.status).toBe(200);
    expect(names(undone.body)).toEqual(['A', 'B', 'C']);
    const twice = await lab.agent.post(undoUrl);
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('already_undone');

    const late = await lab.agent.put(q).send({ planIds: [b.planId, a.planId, c.planId] });
    await running.db.sequelize.query(`UPDATE queue_moves SET created_at = created_at - interval '3 minutes' WHERE id = $1`, { bind: [late.body.move.id] });
    const tooLate = await lab.agent.post(`${q}/moves/${late.body.move.id}/undo`);
    expect(tooLate.status).toBe(409);
    expect(tooLate.body.error.code).toBe('undo_window_passed');

    const again = await lab.agent.put(q).send({ planIds: [a.planId, b.planId, c.planId] });
    await lab.agent.put(q).send({ planIds: [c.planId, b.planId, a.planId] });
    const stale = await lab.agent.post(`${q}/moves/${again.body.move.id}/undo`);
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('queue_changed');
    expect(names((await lab.agent.get(q)).body)).toEqual(['C', 'B', 'A']);

    // The moves are in the lab's audit log with who made them.
    const audit = (await lab.agent.get(`/api/labs/${lab.labId}/audit?kind=queue`)).body.entries;
    expect(audit.filter((e: { action: string }) => e.action === 'created')).toHaveLength(4);
    expect(audit.every((e: { actor: { id: string } }) => e.actor.id === lab.userId)).toBe(true);
  });
});

describe('returning a plan to draft', () => {
  test('a planner returns a queued plan to draft with a reason, kept in its history and the audit log; it leaves the queue and is editable', async () => {
    const lab = await sentForReview(running, 'return-draft', 2);
    const url = (id: string) => `/api/labs/${lab.labId}/plans/${id}`;
    for (const id of lab.ids) await lab.agent.post(`${url(id)}/review`).send({ decision: 'approve' });

    const bare = await lab.planner.agent.post(`${url(lab.ids[0])}/return-to-draft`).send({ reason: '  ' });
    expect(bare.status).toBe(400);
    expect(bare.body.error.field).toBe('reason');

    const back = await lab.planner.agent.post(`${url(lab.ids[0])}/return-to-draft`).send({ reason: 'The customer changed the gear to a finer pitch' });
    expect(back.status).toBe(200);
    expect(back.body).toMatchObject({ status: 'draft', queuePosition: null });
    const view = (await lab.planner.agent.get(url(lab.ids[0]))).body;
    expect(view).toMatchObject({ status: 'draft', editable: true, queuePosition: null });
    expect(view.events.at(-1)).toMatchObject({ from: 'queued', to: 'draft', by: { id: lab.planner.userId }, comment: 'The customer changed the gear to a finer pitch' });
    expect(Number.isNaN(Date.parse(view.events.at(-1).at))).toBe(false);
    expect((await lab.agent.get(url(lab.ids[1]))).body.queuePosition).toBe(1);

    const audit = (await lab.agent.get(`/api/labs/${lab.labId}/audit?kind=plan`)).body.entries;
    const entry = audit.find((e: { action: string }) => e.action === 'returned_to_draft');
    expect(entry).toMatchObject({
      actor: { id: lab.planner.userId },
      target: { id: lab.ids[0] },
      after: { status: 'draft', from: 'queued', reason: 'The customer changed the gear to a finer pitch' },
    });
    // A designer may not; a draft has nothing to return.
    const designer = await addMember(running, lab.agent, lab.labId, ['designer'], 'designer');
    expect((await designer.agent.post(`${url(lab.ids[1])}/return-to-draft`).send({ reason: 'x' })).status).toBe(403);
    expect((await lab.agent.post(`${url(lab.ids[0])}/return-to-draft`).send({ reason: 'again' })).status).toBe(409);
  });

  test("the planner who sent the plan is e-mailed the reason when someone else returns it to draft; their own return mails nobody", async () => {
    const lab = await sentForReview(running, 'return-draft-mail', 2);
    const url = (id: string) => `/api/labs/${lab.labId}/plans/${id}`;
    for (const id of lab.ids) await lab.agent.post(`${url(id)}/review`).send({ decision: 'approve' });

    const before = running.mailer.caught!.length;
    const byLead = await lab.agent.post(`${url(lab.ids[0])}/return-to-draft`).send({ reason: 'The powder lot for this machine was recalled' });
    expect(byLead.status).toBe(200);
    expect(byLead.body.notified).toEqual([lab.planner.email]);
    const mail = await waitForMail(running, before, lab.planner.email);
    expect(mail.subject).toBe('Returned to draft: plan Plan 1');
    expect(mail.text).toContain('The powder lot for this machine was recalled');
    expect(mail.text).toContain(`/plans/${lab.ids[0]}`);

    const own = running.mailer.caught!.length;
    const byPlanner = await lab.planner.agent.post(`${url(lab.ids[1])}/return-to-draft`).send({ reason: 'Adding two more gears' });
    expect(byPlanner.status).toBe(200);
    expect(byPlanner.body.notified).toEqual([]);
    expect(running.mailer.caught!.slice(own).filter((m) => m.to.includes(lab.planner.email))).toEqual([]);
  });

  test('once printing has started the plan cannot be returned to draft', async () => {
    const lab = await labWithCrew(running, 'return-printing');
    const { base, estimate } = await queuedPlan(running, lab, [GEAR]);
    expect((await lab.operator.agent.post(`${base}/run/advance`).send(startBody(estimate))).status).toBe(200);
    const refused = await lab.agent.post(`${base}/return-to-draft`).send({ reason: 'Too late' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/printing cannot be returned to draft/);
    expect((await lab.agent.post(`${base}/review/undo`)).status).toBe(409);
  });
});
