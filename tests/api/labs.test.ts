import request from 'supertest';
import { addMember, agent, PASSWORD, signUp, startTestApp, uniqueEmail, waitForMail } from '../helpers/app';
import type { Running } from '../../server/boot';
import { demoMachines, demoMaterials } from '../../shared/demo/profiles';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const machine = (name: string) => ({ ...demoMachines[0], name });
const material = (name: string) => ({ ...demoMaterials[0], name });

describe('machines', () => {
  test('a lead adds, reads, changes and deletes a machine', async () => {
    const { agent: lead, labId } = await signUp(running, 'machines');
    const created = await lead.post(`/api/labs/${labId}/machines`).send(machine('Bay 1'));
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ id: expect.any(String), labId, name: 'Bay 1', chamberMm: demoMachines[0].chamberMm });
    const id = created.body.id;
    expect((await lead.get(`/api/labs/${labId}/machines`)).body.map((m: { name: string }) => m.name)).toEqual(['Bay 1']);
    const patched = await lead.patch(`/api/labs/${labId}/machines/${id}`).send({ laserPowerW: 45, name: 'Bay 1b' });
    expect(patched.status).toBe(200);
    expect(patched.body).toMatchObject({ laserPowerW: 45, name: 'Bay 1b', recoatSeconds: demoMachines[0].recoatSeconds });
    expect((await lead.get(`/api/labs/${labId}/machines/${id}`)).body.laserPowerW).toBe(45);
    expect((await lead.delete(`/api/labs/${labId}/machines/${id}`)).status).toBe(204);
    expect((await lead.get(`/api/labs/${labId}/machines/${id}`)).status).toBe(404);
  });

  test('an invalid profile answers 400 naming the nested field', async () => {
    const { agent: lead, labId } = await signUp(running, 'badmachine');
    const res = await lead.post(`/api/labs/${labId}/machines`).send({ ...machine('Bad'), chamberMm: [300, -1, 300] });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('chamberMm[1]');
    const unknown = await lead.post(`/api/labs/${labId}/machines`).send({ ...machine('Bad'), colour: 'red' });
    expect(unknown.body.error.field).toBe('colour');
  });

  test('two machines of one lab cannot share a name (409)', async () => {
    const { agent: lead, labId } = await signUp(running, 'samename');
    await lead.post(`/api/labs/${labId}/machines`).send(machine('Twin'));
    const res = await lead.post(`/api/labs/${labId}/machines`).send(machine('Twin'));
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'name_taken', field: 'name' });
  });

  test('materials follow the same shape and rules', async () => {
    const { agent: lead, labId } = await signUp(running, 'materials');
    const created = await lead.post(`/api/labs/${labId}/materials`).send(material('Powder A'));
    expect(created.status).toBe(201);
    const bad = await lead.patch(`/api/labs/${labId}/materials/${created.body.id}`).send({ refreshRatio: 1.5 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('refreshRatio');
    expect((await lead.get(`/api/labs/${labId}/materials`)).body).toHaveLength(1);
  });
});

describe('roles', () => {
  test('an operator reads machines but may not add one or change roles', async () => {
    const { agent: lead, labId, userId: leadId } = await signUp(running, 'roles');
    const op = await addMember(running, lead, labId, ['operator'], 'op');
    expect((await op.agent.get(`/api/labs/${labId}/machines`)).status).toBe(200);
    const add = await op.agent.post(`/api/labs/${labId}/machines`).send(machine('Nope'));
    expect(add.status).toBe(403);
    expect(add.body.error.code).toBe('forbidden');
    const change = await op.agent.patch(`/api/labs/${labId}/members/${leadId}`).send({ roles: ['operator'] });
    expect(change.status).toBe(403);
    const invites = await op.agent.get(`/api/labs/${labId}/invites`);
    expect(invites.status).toBe(403);
  });

  test('a lead changes a member\'s roles and removes a member; the last lead stays', async () => {
    const { agent: lead, labId, userId: leadId } = await signUp(running, 'lead');
    const m = await addMember(running, lead, labId, ['designer'], 'des');
    const res = await lead.patch(`/api/labs/${labId}/members/${m.userId}`).send({ roles: ['planner', 'designer'] });
    expect(res.status).toBe(200);
    expect(res.body.roles).toEqual(['designer', 'planner']);
    const last = await lead.patch(`/api/labs/${labId}/members/${leadId}`).send({ roles: ['planner'] });
    expect(last.status).toBe(409);
    expect(last.body.error.code).toBe('last_lead');
    expect((await lead.delete(`/api/labs/${labId}/members/${leadId}`)).status).toBe(409);
    expect((await lead.delete(`/api/labs/${labId}/members/${m.userId}`)).status).toBe(204);
    expect((await m.agent.get(`/api/labs/${labId}/machines`)).status).toBe(404);
    const members = await lead.get(`/api/labs/${labId}/members`);
    expect(members.body.map((x: { userId: string }) => x.userId)).toEqual([leadId]);
  });
});

describe('isolation between labs', () => {
  test('a member of lab B gets 404 for lab A and for lab A\'s machine', async () => {
    const a = await signUp(running, 'labA');
    const b = await signUp(running, 'labB');
    const m = await a.agent.post(`/api/labs/${a.labId}/machines`).send(machine('Secret'));
    expect((await b.agent.get(`/api/labs/${a.labId}/machines`)).status).toBe(404);
    expect((await b.agent.get(`/api/labs/${a.labId}/machines/${m.body.id}`)).status).toBe(404);
    // Lab B's own path with lab A's machine id: not found either.
    expect((await b.agent.get(`/api/labs/${b.labId}/machines/${m.body.id}`)).status).toBe(404);
    expect((await b.agent.patch(`/api/labs/${b.labId}/machines/${m.body.id}`).send({ laserPowerW: 1 })).status).toBe(404);
    expect((await b.agent.delete(`/api/labs/${b.labId}/machines/${m.body.id}`)).status).toBe(404);
    const after = await a.agent.get(`/api/labs/${a.labId}/machines/${m.body.id}`);
    expect(after.body.laserPowerW).toBe(demoMachines[0].laserPowerW);
    expect((await b.agent.get(`/api/labs/not-a-uuid/members`)).status).toBe(404);
  });
});

describe('invites', () => {
  test('the e-mailed link signs a new member up with the invite\'s roles', async () => {
    const { agent: lead, labId } = await signUp(running, 'inviter');
    const email = uniqueEmail('invitee');
    const before = running.mailer.caught!.length;
    const inv = await lead.post(`/api/labs/${labId}/invites`).send({ email, roles: ['planner', 'operator'] });
    expect(inv.status).toBe(201);
    const mail = await waitForMail(running, before, email);
    expect(mail.subject).toMatch(/invited you/);
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
    const info = await request(running.app).get(`/api/invites/${token}`);
    expect(info.body).toMatchObject({ email, roles: ['planner', 'operator'], existingUser: false, labName: 'Lab of inviter' });
    const a = agent(running);
    const acc = await a.post(`/api/invites/${token}/accept`).send({ name: 'Invited Person', password: PASSWORD });
    expect(acc.status).toBe(200);
    expect(acc.body.labs).toEqual([{ id: labId, name: 'Lab of inviter', roles: ['planner', 'operator'] }]);
    // The link works once.
    expect((await agent(running).post(`/api/invites/${token}/accept`).send({ name: 'X', password: PASSWORD })).status).toBe(404);
    const listed = await lead.get(`/api/labs/${labId}/invites`);
    expect(listed.body[0]).toMatchObject({ email, acceptedAt: expect.any(String) });
  });

  test('an existing user accepts with their password and keeps their own lab', async () => {
    const { agent: lead, labId } = await signUp(running, 'inviter2');
    const other = await signUp(running, 'existing');
    const before = running.mailer.caught!.length;
    await lead.post(`/api/labs/${labId}/invites`).send({ email: other.email, roles: ['designer'] });
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await waitForMail(running, before, other.email)).text)![1];
    expect((await request(running.app).get(`/api/invites/${token}`)).body.existingUser).toBe(true);
    const wrong = await agent(running).post(`/api/invites/${token}/accept`).send({ password: 'wrong-password-here' });
    expect(wrong.status).toBe(401);
    // A short wrong password is still a wrong password, not a malformed request.
    expect((await agent(running).post(`/api/invites/${token}/accept`).send({ password: 'short' })).status).toBe(401);
    const acc = await other.agent.post(`/api/invites/${token}/accept`).send({});
    expect(acc.status).toBe(200);
    expect(acc.body.labs.map((l: { id: string }) => l.id).sort()).toEqual([labId, other.labId].sort());
    const again = await lead.post(`/api/labs/${labId}/invites`).send({ email: other.email, roles: ['designer'] });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('already_member');
  });

  test('a new account made from an invite needs a password of at least 10 characters', async () => {
    const { agent: lead, labId } = await signUp(running, 'weakpw');
    const email = uniqueEmail('weak');
    const before = running.mailer.caught!.length;
    await lead.post(`/api/labs/${labId}/invites`).send({ email, roles: ['designer'] });
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await waitForMail(running, before, email)).text)![1];
    const res = await agent(running).post(`/api/invites/${token}/accept`).send({ name: 'Weak', password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('password');
  });

  test('a revoked invite link stops working', async () => {
    const { agent: lead, labId } = await signUp(running, 'revoker');
    const email = uniqueEmail('revoked');
    const before = running.mailer.caught!.length;
    const inv = await lead.post(`/api/labs/${labId}/invites`).send({ email, roles: ['designer'] });
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await waitForMail(running, before, email)).text)![1];
    expect((await lead.delete(`/api/labs/${labId}/invites/${inv.body.id}`)).status).toBe(204);
    expect((await request(running.app).get(`/api/invites/${token}`)).status).toBe(404);
  });

  test('inviting needs at least one known role', async () => {
    const { agent: lead, labId } = await signUp(running, 'badinvite');
    const none = await lead.post(`/api/labs/${labId}/invites`).send({ email: uniqueEmail(), roles: [] });
    expect(none.status).toBe(400);
    expect(none.body.error.field).toBe('roles');
    const unknown = await lead.post(`/api/labs/${labId}/invites`).send({ email: uniqueEmail(), roles: ['admin'] });
    expect(unknown.body.error.field).toBe('roles[0]');
  });
});
