/**
 * The lab's audit log: every change of members, roles, invites, machines,
 * materials, parts, requests, plans, runs and every sign-in is recorded with
 * who, when, what and (for changes) before and after, in the same transaction
 * as the change; the log cannot be altered; leads read it with filters and
 * pages. Record-keeping after the common practice of OWASP's Logging Cheat
 * Sheet ("which events to log": authentication successes and failures,
 * changes of privileges, data changes; logs protected from tampering).
 * Also the lab setting "a plan needs a second person's approval" (the
 * four-eyes rule, common practice for releases of work).
 */
import { writeBinaryStl, prism } from '../../shared/geometry';
import { addMember, agent, PASSWORD, signUp, startTestApp, uniqueEmail, waitForMail } from '../helpers/app';
import { createPlan, gridLayout, GEAR, makeRequest, planInstance, sentForReview } from '../helpers/plans';
import { labWithCrew, queuedPlan, startBody } from './runs-fixtures';
import type { Running } from '../../server/boot';

jest.setTimeout(120_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

type Entry = { id: string; at: string; kind: string; action: string; actor: { id: string; name: string | null } | null; target: { id: string | null; label: string | null }; before: Record<string, unknown> | null; after: Record<string, unknown> | null };

async function allEntries(lead: ReturnType<typeof agent>, labId: string, query = ''): Promise<Entry[]> {
  const res = await lead.get(`/api/labs/${labId}/audit?limit=200${query}`);
  expect(res.status).toBe(200);
  return res.body.entries;
}

test('each kind of change is recorded with who did it, and a change with its before and after', async () => {
  const lab = await labWithCrew(running, 'audited');
  const { agent: lead, labId, userId: leadId } = lab;
  const base = `/api/labs/${labId}`;

  // members and roles
  expect((await lead.patch(`${base}/members/${lab.designer.userId}`).send({ roles: ['designer', 'planner'] })).status).toBe(200);
  // invites: sent and revoked
  const inv = await lead.post(`${base}/invites`).send({ email: uniqueEmail('later'), roles: ['operator'] });
  expect((await lead.delete(`${base}/invites/${inv.body.id}`)).status).toBe(204);
  // machines and materials: changed, and one made and removed
  expect((await lead.patch(`${base}/machines/${lab.machineId}`).send({ name: 'Renamed machine' })).status).toBe(200);
  const extra = await lead.post(`${base}/materials`).send({ ...lab.material, name: 'Spare powder' });
  expect((await lead.delete(`${base}/materials/${extra.body.id}`)).status).toBe(204);
  // parts: uploaded by the designer, then removed
  const stl = Buffer.from(writeBinaryStl(prism([[0, 0], [20, 0], [20, 10], [0, 10]], 0, 5), 'bracket'));
  const up = await lab.designer.agent.post(`${base}/parts`).attach('file', stl, 'bracket.stl');
  expect(up.status).toBe(201);
  const partId = up.body.parts[0].id as string;
  // requests: filed by the designer
  const filed = await lab.designer.agent
    .post(`${base}/requests`)
    .send({ title: 'Audited batch', materialId: lab.materialId, dueDate: '2027-06-01', priority: 'normal', notes: '', lines: [{ partId, quantity: 3 }] });
  expect(filed.status).toBe(201);
  // plans (created, sent, approved) and a run started by the operator
  const queued = await queuedPlan(running, lab, [GEAR]);
  const started = await lab.operator.agent.post(`${queued.base}/run/advance`).send(startBody(queued.estimate));
  expect(started.status).toBe(200);
  // sign-ins, failed and successful
  await agent(running).post('/api/auth/sign-in').send({ email: lab.operator.email, password: 'not the password at all' });
  await agent(running).post('/api/auth/sign-in').send({ email: lab.operator.email, password: PASSWORD });

  const entries = await allEntries(lead, labId);
  const find = (kind: string, action: string, pred: (e: Entry) => boolean = () => true) => entries.find((e) => e.kind === kind && e.action === action && pred(e));

  const roles = find('member', 'changed', (e) => e.target.id === lab.designer.userId)!;
  expect(roles).toMatchObject({ actor: { id: leadId }, before: { roles: ['designer'] }, after: { roles: ['designer', 'planner'] } });
  expect(find('member', 'created', (e) => e.target.id === lab.operator.userId)).toMatchObject({ actor: { id: lab.operator.userId } });
  expect(find('invite', 'created', (e) => e.target.id === inv.body.id)).toMatchObject({ actor: { id: leadId } });
  const revoked = find('invite', 'changed', (e) => e.target.id === inv.body.id)!;
  expect(revoked.actor?.id).toBe(leadId);
  expect(revoked.before).toMatchObject({ revoked_at: null });
  expect(revoked.after!.revoked_at).not.toBeNull();
  // The token's digest is never copied into the log.
  expect(JSON.stringify(entries)).not.toContain('token_hash');
  expect(find('machine', 'changed', (e) => e.target.id === lab.machineId)).toMatchObject({ actor: { id: leadId }, after: { name: 'Renamed machine' } });
  expect(find('material', 'created', (e) => e.target.id === extra.body.id)).toMatchObject({ actor: { id: leadId }, target: { label: 'Spare powder' } });
  expect(find('material', 'deleted', (e) => e.target.id === extra.body.id)).toMatchObject({ actor: { id: leadId }, before: { name: 'Spare powder' } });
  expect(find('part', 'created', (e) => e.target.id === partId)).toMatchObject({ actor: { id: lab.designer.userId } });
  expect(find('request', 'created', (e) => e.target.id === filed.body.id)).toMatchObject({ actor: { id: lab.designer.userId }, target: { label: 'Audited batch' } });
  const approved = find('plan', 'changed', (e) => e.target.id === queued.planId && e.after?.status === 'approved')!;
  expect(approved).toMatchObject({ actor: { id: leadId }, before: { status: 'in_review' } });
  expect(find('plan', 'created', (e) => e.target.id === queued.planId)).toMatchObject({ actor: { id: leadId } });
  expect(find('run', 'created')).toMatchObject({ actor: { id: lab.operator.userId } });
  expect(find('sign_in', 'failed', (e) => e.actor?.id === lab.operator.userId)).toBeDefined();
  expect(find('sign_in', 'signed_in', (e) => e.actor?.id === lab.operator.userId)).toBeDefined();
  for (const e of entries) expect(Number.isNaN(Date.parse(e.at))).toBe(false);
});

test('a change that fails leaves no entry: the record is written in the same transaction', async () => {
  const owner = await signUp(running, 'atomic');
  const before = (await allEntries(owner.agent, owner.labId)).length;
  // Demoting the last lead is refused after the row was read and locked.
  const res = await owner.agent.patch(`/api/labs/${owner.labId}/members/${owner.userId}`).send({ roles: ['designer'] });
  expect(res.status).toBe(409);
  expect((await allEntries(owner.agent, owner.labId)).length).toBe(before);
});

test('the log cannot be changed or emptied, even by the database user the server runs as', async () => {
  const owner = await signUp(running, 'tamper');
  const q = (sql: string) => running.db.sequelize.query(sql);
  await expect(q('UPDATE audit_log SET actor_id = NULL')).rejects.toThrow(/append-only/);
  await expect(q('DELETE FROM audit_log')).rejects.toThrow(/append-only/);
  await expect(q('TRUNCATE audit_log')).rejects.toThrow(/append-only/);
  expect((await allEntries(owner.agent, owner.labId)).length).toBeGreaterThan(0);
});

test('leads filter by kind, actor and dates and read it page by page; other members may not read it', async () => {
  const owner = await signUp(running, 'filters');
  const base = `/api/labs/${owner.labId}`;
  const member = await addMember(running, owner.agent, owner.labId, ['planner'], 'filtered');
  for (const name of ['One', 'Two', 'Three']) await owner.agent.post(`${base}/invites`).send({ email: uniqueEmail(name), roles: ['designer'] });

  const invites = await allEntries(owner.agent, owner.labId, '&kind=invite');
  expect(invites.length).toBeGreaterThanOrEqual(4);
  expect(invites.every((e) => e.kind === 'invite')).toBe(true);
  const byMember = await allEntries(owner.agent, owner.labId, `&actor=${member.userId}`);
  expect(byMember.length).toBeGreaterThan(0);
  expect(byMember.every((e) => e.actor?.id === member.userId)).toBe(true);
  expect(await allEntries(owner.agent, owner.labId, '&to=2000-01-01')).toEqual([]);
  const today = new Date().toISOString().slice(0, 10);
  expect((await allEntries(owner.agent, owner.labId, `&from=${today}&to=${today}`)).length).toBeGreaterThan(0);

  const all = await allEntries(owner.agent, owner.labId);
  const seen: string[] = [];
  let cursor: string | null = null;
  do {
    const res = await owner.agent.get(`${base}/audit?limit=2${cursor ? `&before=${cursor}` : ''}`);
    expect(res.body.entries.length).toBeLessThanOrEqual(2);
    seen.push(...res.body.entries.map((e: Entry) => e.id));
    cursor = res.body.next;
  } while (cursor);
  expect(seen).toEqual(all.map((e) => e.id));

  const bad = await owner.agent.get(`${base}/audit?kind=weather`);
  expect(bad.status).toBe(400);
  expect(bad.body.error.field).toBe('kind');
  expect((await owner.agent.get(`${base}/audit?from=yesterday`)).body.error.field).toBe('from');
  expect((await member.agent.get(`${base}/audit`)).status).toBe(403);
  const stranger = await signUp(running, 'stranger');
  expect((await stranger.agent.get(`${base}/audit`)).status).toBe(404);
});

describe("a second person's approval", () => {
  test('with two leads it is on by default: the lead who sent a plan cannot approve it, the other lead can', async () => {
    const lab = await sentForReview(running, 'four-eyes');
    const base = `/api/labs/${lab.labId}`;
    const second = await addMember(running, lab.agent, lab.labId, ['lead', 'planner'], 'second-lead');
    expect((await lab.agent.get(`${base}/settings`)).body).toEqual({ secondApproval: true, secondApprovalSet: false, leads: 2, currency: 'EUR', minPackingDensityPercent: 8 });

    // The second lead packs and sends a plan of their own.
    const req = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [GEAR]);
    const plan = await createPlan(second.agent, lab.labId, lab.machineId, lab.materialId, [{ id: req.lines[0].id, quantity: 5 }], 'Own plan');
    const planBase = `${base}/plans/${plan.id}`;
    const instance = planInstance(plan.view, lab.machine, lab.material);
    const layout = await second.agent.post(`${planBase}/layouts`).send({ instance, result: gridLayout(instance) });
    await second.agent.post(`${planBase}/layouts/${layout.body.id}/choose`);
    expect((await second.agent.post(`${planBase}/submit`)).status).toBe(200);

    const own = await second.agent.post(`${planBase}/review`).send({ decision: 'approve' });
    expect(own.status).toBe(403);
    expect(own.body.error.code).toBe('second_approval_required');
    expect(own.body.error.message).toMatch(/second person's approval/);
    expect((await second.agent.get(planBase)).body.status).toBe('in_review');
    expect((await lab.agent.post(`${planBase}/review`).send({ decision: 'approve' })).status).toBe(200);
    // The planner's plan is approved by either lead: neither sent it.
    expect((await second.agent.post(`${base}/plans/${lab.ids[0]}/review`).send({ decision: 'approve' })).status).toBe(200);
  });

  test('a lab with one lead may turn it on, and then its lead cannot approve their own plan; only leads change it', async () => {
    const lab = await labWithCrew(running, 'solo');
    const base = `/api/labs/${lab.labId}`;
    expect((await lab.agent.get(`${base}/settings`)).body).toMatchObject({ secondApproval: false, secondApprovalSet: false, leads: 1 });
    expect((await lab.operator.agent.patch(`${base}/settings`).send({ secondApproval: true })).status).toBe(403);
    expect((await lab.agent.patch(`${base}/settings`).send({ secondApproval: 'yes' })).body.error.field).toBe('secondApproval');
    const on = await lab.agent.patch(`${base}/settings`).send({ secondApproval: true });
    expect(on.body).toMatchObject({ secondApproval: true, secondApprovalSet: true });
    const waiting = await queuedPlan(running, lab, [GEAR], { approve: false });
    const own = await lab.agent.post(`${waiting.base}/review`).send({ decision: 'approve' });
    expect(own.status).toBe(403);
    expect(own.body.error.code).toBe('second_approval_required');
    // Sending back is not an approval: still allowed.
    expect((await lab.agent.post(`${waiting.base}/review`).send({ decision: 'changes_requested', comment: 'Fewer gears' })).status).toBe(200);
    const setting = (await allEntries(lab.agent, lab.labId, '&kind=lab')).find((e) => e.after && 'second_approval' in e.after);
    expect(setting).toMatchObject({ actor: { id: lab.userId }, before: { second_approval: null }, after: { second_approval: true } });
  });
});

test('an invite accepted by someone not signed in names them as the one acting', async () => {
  const owner = await signUp(running, 'accepting');
  const email = uniqueEmail('joiner');
  const before = running.mailer.caught!.length;
  await owner.agent.post(`/api/labs/${owner.labId}/invites`).send({ email, roles: ['designer'] });
  const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await waitForMail(running, before, email)).text)![1];
  const acc = await agent(running).post(`/api/invites/${token}/accept`).send({ name: 'Joiner', password: PASSWORD });
  expect(acc.status).toBe(200);
  const joined = (await allEntries(owner.agent, owner.labId, '&kind=member')).find((e) => e.action === 'created' && e.target.id === acc.body.user.id);
  expect(joined).toMatchObject({ actor: { id: acc.body.user.id, name: 'Joiner' }, target: { label: 'Joiner' }, after: { roles: ['designer'] } });
});
