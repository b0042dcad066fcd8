import { addMember, startTestApp, waitForMail } from '../helpers/app';
import { createPlan, GEAR, makeRequest, sentForReview } from '../helpers/plans';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const plansInReview = (tag: string, count = 1) => sentForReview(running, tag, count);

describe('review', () => {
  test('a lead approves: the plan is recorded approved, then queued at the end of its machine\'s queue, and the planner is told', async () => {
    const { agent: lead, labId, ids, planner, userId } = await plansInReview('approve', 2);
    const before = running.mailer.caught!.length;
    const first = await lead.post(`/api/labs/${labId}/plans/${ids[0]}/review`).send({ decision: 'approve', comment: 'Good density' });
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ status: 'queued', queuePosition: 1 });
    const second = await lead.post(`/api/labs/${labId}/plans/${ids[1]}/review`).send({ decision: 'approve' });
    expect(second.body).toMatchObject({ status: 'queued', queuePosition: 2 });
    const mail = await waitForMail(running, before, planner.email);
    expect(mail.subject).toContain('Approved');

    const view = (await planner.agent.get(`/api/labs/${labId}/plans/${ids[0]}`)).body;
    expect(view).toMatchObject({ status: 'queued', queuePosition: 1, editable: false });
    expect(view.events.map((e: any) => [e.from, e.to, e.by?.id, e.comment])).toEqual([
      [null, 'draft', planner.userId, null],
      ['draft', 'in_review', planner.userId, null],
      ['in_review', 'approved', userId, 'Good density'],
      ['approved', 'queued', userId, null],
    ]);
    for (const e of view.events) expect(Number.isNaN(Date.parse(e.at))).toBe(false);
    const queued = (await lead.get(`/api/labs/${labId}/plans?status=queued`)).body;
    expect(queued.map((p: any) => p.queuePosition).sort()).toEqual([1, 2]);
  });

  test('sending back needs a comment, e-mails the planner with it, and the planner\'s next save reopens the draft', async () => {
    const { agent: lead, labId, ids, planner } = await plansInReview('sendback');
    const url = `/api/labs/${labId}/plans/${ids[0]}`;
    const bare = await lead.post(`${url}/review`).send({ decision: 'changes_requested' });
    expect(bare.status).toBe(400);
    expect(bare.body.error.field).toBe('comment');
    const before = running.mailer.caught!.length;
    const back = await lead.post(`${url}/review`).send({ decision: 'changes_requested', comment: 'Turn the gears flat to save layers' });
    expect(back.status).toBe(200);
    expect(back.body.status).toBe('changes_requested');
    const mail = await waitForMail(running, before, planner.email);
    expect(mail.subject).toContain('Needs changes');
    expect(mail.text).toContain('Turn the gears flat to save layers');

    const plan = (await planner.agent.get(url)).body;
    expect(plan.editable).toBe(true);
    const saved = await planner.agent.put(url).send({ version: plan.version, name: 'Plan 1, flat gears' });
    expect(saved.status).toBe(200);
    expect(saved.body.status).toBe('draft');
    expect(saved.body.events.slice(-2).map((e: any) => [e.from, e.to, e.comment])).toEqual([
      ['in_review', 'changes_requested', 'Turn the gears flat to save layers'],
      ['changes_requested', 'draft', null],
    ]);
    expect((await planner.agent.post(`${url}/submit`)).body.status).toBe('in_review');
  });

  test('a transition the plan\'s status does not allow answers 409 with the allowed ones', async () => {
    const { agent: lead, labId, machineId, materialId, userId, ids } = await plansInReview('transitions');
    const req = await makeRequest(running, labId, userId, materialId, [GEAR]);
    const draft = await createPlan(lead, labId, machineId, materialId, [{ id: req.lines[0].id, quantity: 1 }]);
    const onDraft = await lead.post(`/api/labs/${labId}/plans/${draft.id}/review`).send({ decision: 'approve' });
    expect(onDraft.status).toBe(409);
    expect(onDraft.body.error).toMatchObject({ code: 'invalid_transition', status: 'draft', allowed: ['in_review', 'cancelled'] });

    await lead.post(`/api/labs/${labId}/plans/${ids[0]}/review`).send({ decision: 'approve' });
    const twice = await lead.post(`/api/labs/${labId}/plans/${ids[0]}/review`).send({ decision: 'changes_requested', comment: 'Too late' });
    expect(twice.status).toBe(409);
    expect(twice.body.error).toMatchObject({ code: 'invalid_transition', status: 'queued', allowed: ['printing', 'cancelled'] });
    expect(twice.body.error.message).toMatch(/queued cannot become sent back/);
  });

  test('only a lead decides: an operator or a planner may not approve', async () => {
    const { agent: lead, labId, ids, planner } = await plansInReview('reviewroles');
    const operator = await addMember(running, lead, labId, ['operator'], 'operator');
    for (const who of [operator, planner]) {
      const res = await who.agent.post(`/api/labs/${labId}/plans/${ids[0]}/review`).send({ decision: 'approve' });
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    expect((await operator.agent.post(`/api/labs/${labId}/plans/${ids[0]}/cancel`)).status).toBe(403);
    expect((await lead.get(`/api/labs/${labId}/plans/${ids[0]}`)).body.status).toBe('in_review');
  });

  test('a queued plan can still be cancelled, which takes it out of the queue', async () => {
    const { agent: lead, labId, ids } = await plansInReview('cancelqueued');
    await lead.post(`/api/labs/${labId}/plans/${ids[0]}/review`).send({ decision: 'approve' });
    const res = await lead.post(`/api/labs/${labId}/plans/${ids[0]}/cancel`).send({ comment: 'Customer withdrew' });
    expect(res.body.status).toBe('cancelled');
    const view = (await lead.get(`/api/labs/${labId}/plans/${ids[0]}`)).body;
    expect(view.queuePosition).toBeNull();
    expect(view.events.at(-1)).toMatchObject({ from: 'queued', to: 'cancelled', comment: 'Customer withdrew' });
  });
});
