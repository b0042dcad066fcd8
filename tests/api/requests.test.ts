import { randomUUID } from 'node:crypto';
import { addMember, signUp, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { earliestDueDate } from '../../server/services/requests';
import { demoMaterials } from '../../shared/demo/profiles';
import { prism, writeBinaryStl } from '../../shared/geometry';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const daysFromNow = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);
const cubeStl = (sizeMm: number) => {
  const u = writeBinaryStl(prism([[0, 0], [sizeMm, 0], [sizeMm, sizeMm], [0, sizeMm]], 0, sizeMm), `req ${randomUUID()}`);
  return Buffer.from(u.buffer, u.byteOffset, u.byteLength);
};

/** A lab with a lead (who signed up), a designer, a material and two parts. */
async function labWithParts(tag: string) {
  const lead = await signUp(running, tag);
  const designer = await addMember(running, lead.agent, lead.labId, ['designer'], `${tag}-designer`);
  const material = (await lead.agent.post(`/api/labs/${lead.labId}/materials`).send({ ...demoMaterials[0], name: 'Nylon grey' })).body;
  const up = await designer.agent
    .post(`/api/labs/${lead.labId}/parts`)
    .attach('file', cubeStl(10), 'latch.stl')
    .attach('file', cubeStl(14), 'cover.stl');
  const byName = Object.fromEntries(up.body.parts.map((p: { name: string; id: string }) => [p.name, p.id]));
  return { lead, designer, labId: lead.labId, materialId: material.id as string, latch: byName.latch as string, cover: byName.cover as string };
}

const body = (materialId: string, lines: { partId: string; quantity: number }[], extra: Record<string, unknown> = {}) => ({
  title: 'Gripper batch',
  materialId,
  dueDate: daysFromNow(7),
  priority: 'high',
  notes: 'For the trade fair demo units.',
  lines,
  ...extra,
});

describe('filing a request', () => {
  test('a designer files a request and reads it back with zero planned and printed per line', async () => {
    const { designer, labId, materialId, latch, cover } = await labWithParts('file');
    const res = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 40 }, { partId: cover, quantity: 2 }]));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      title: 'Gripper batch',
      materialId,
      materialName: 'Nylon grey',
      priority: 'high',
      status: 'open',
      planned: false,
      createdBy: { id: designer.userId },
      totals: { quantity: 42, planned: 0, printed: 0 },
    });
    expect(res.body.lines).toEqual([
      { id: expect.any(String), partId: latch, partName: 'latch', quantity: 40, plannedCount: 0, printedCount: 0, failedCount: 0, stillToMakeCount: 40, openCount: 40 },
      { id: expect.any(String), partId: cover, partName: 'cover', quantity: 2, plannedCount: 0, printedCount: 0, failedCount: 0, stillToMakeCount: 2, openCount: 2 },
    ]);
    const one = await designer.agent.get(`/api/labs/${labId}/requests/${res.body.id}`);
    expect(one.status).toBe(200);
    expect(one.body.lines).toHaveLength(2);
  });

  test.each([
    ['a quantity of 0', (m: string, p: string) => body(m, [{ partId: p, quantity: 0 }]), 'lines[0].quantity'],
    ['a quantity over 100,000', (m: string, p: string) => body(m, [{ partId: p, quantity: 100_001 }]), 'lines[0].quantity'],
    ['a fractional quantity', (m: string, p: string) => body(m, [{ partId: p, quantity: 2.5 }]), 'lines[0].quantity'],
    ['a due date in the past', (m: string, p: string) => body(m, [{ partId: p, quantity: 1 }], { dueDate: daysFromNow(-3) }), 'dueDate'],
    ['a due date that is not a date', (m: string, p: string) => body(m, [{ partId: p, quantity: 1 }], { dueDate: 'next week' }), 'dueDate'],
    ['no lines', (m: string) => body(m, []), 'lines'],
    ['the same part twice', (m: string, p: string) => body(m, [{ partId: p, quantity: 1 }, { partId: p, quantity: 2 }]), 'lines[1].partId'],
    ['an unknown priority', (m: string, p: string) => body(m, [{ partId: p, quantity: 1 }], { priority: 'yesterday' }), 'priority'],
    ['an unknown material', (_m: string, p: string) => body(randomUUID(), [{ partId: p, quantity: 1 }]), 'materialId'],
    ['an unknown part', (m: string) => body(m, [{ partId: randomUUID(), quantity: 1 }]), 'lines[0].partId'],
  ])('a request with %s is refused with 400 naming the field', async (_what, make, field) => {
    const { designer, labId, materialId, latch } = await labWithParts('invalid');
    const before = (await designer.agent.get(`/api/labs/${labId}/requests`)).body.total;
    const res = await designer.agent.post(`/api/labs/${labId}/requests`).send(make(materialId, latch));
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe(field);
    expect((await designer.agent.get(`/api/labs/${labId}/requests`)).body.total).toBe(before);
  });

  test('an empty title or no material is refused with a message that says what to give', async () => {
    const { designer, labId, materialId, latch } = await labWithParts('messages');
    const noTitle = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 1 }], { title: '   ' }));
    expect(noTitle.status).toBe(400);
    expect(noTitle.body.error).toMatchObject({ field: 'title', message: expect.stringContaining('give the request a short title') });
    const noMaterial = await designer.agent.post(`/api/labs/${labId}/requests`).send(body('', [{ partId: latch, quantity: 1 }]));
    expect(noMaterial.status).toBe(400);
    expect(noMaterial.body.error).toMatchObject({ field: 'materialId', message: expect.stringContaining("one of the lab's materials: choose one") });
  });

  test("another lab's part or material is refused as unknown, without showing its data", async () => {
    const mine = await labWithParts('mine');
    const theirs = await labWithParts('theirs');
    const part = await mine.designer.agent.post(`/api/labs/${mine.labId}/requests`).send(body(mine.materialId, [{ partId: theirs.latch, quantity: 5 }]));
    expect(part.status).toBe(400);
    expect(part.body.error.field).toBe('lines[0].partId');
    expect(JSON.stringify(part.body)).not.toContain('latch');
    const material = await mine.designer.agent.post(`/api/labs/${mine.labId}/requests`).send(body(theirs.materialId, [{ partId: mine.latch, quantity: 5 }]));
    expect(material.status).toBe(400);
    expect(material.body.error.field).toBe('materialId');
  });

  test("today's date is accepted as a due date", async () => {
    const { designer, labId, materialId, latch } = await labWithParts('today');
    const res = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 1 }], { dueDate: daysFromNow(0) }));
    expect(res.status).toBe(201);
    // Noon UTC on 2 March is still 1 March in UTC−12 (the westernmost zone), never 28 February.
    expect(earliestDueDate(new Date('2026-03-02T11:00:00Z'))).toBe('2026-03-01');
    expect(earliestDueDate(new Date('2026-03-02T12:00:00Z'))).toBe('2026-03-02');
  });

  test('an operator or a planner may not file a request; everyone in the lab reads them; another lab sees 404', async () => {
    const { lead, designer, labId, materialId, latch } = await labWithParts('roles');
    const op = await addMember(running, lead.agent, labId, ['operator'], 'op');
    const planner = await addMember(running, lead.agent, labId, ['planner'], 'pl');
    const req = body(materialId, [{ partId: latch, quantity: 3 }]);
    expect((await op.agent.post(`/api/labs/${labId}/requests`).send(req)).status).toBe(403);
    expect((await planner.agent.post(`/api/labs/${labId}/requests`).send(req)).status).toBe(403);
    const created = await designer.agent.post(`/api/labs/${labId}/requests`).send(req);
    expect((await op.agent.get(`/api/labs/${labId}/requests/${created.body.id}`)).status).toBe(200);
    const stranger = await signUp(running, 'stranger');
    expect((await stranger.agent.get(`/api/labs/${labId}/requests/${created.body.id}`)).status).toBe(404);
    expect((await stranger.agent.get(`/api/labs/${stranger.labId}/requests/${created.body.id}`)).status).toBe(404);
  });
});

describe('listing requests', () => {
  test('planners see open requests soonest first, the most urgent first on the same day', async () => {
    const { designer, labId, materialId, latch } = await labWithParts('list');
    const file = (title: string, due: number, priority: string) =>
      designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 1 }], { title, dueDate: daysFromNow(due), priority }));
    await file('Later normal', 10, 'normal');
    await file('Soon low', 2, 'low');
    await file('Soon urgent', 2, 'urgent');
    const cancelled = await file('Cancelled one', 1, 'urgent');
    await designer.agent.patch(`/api/labs/${labId}/requests/${cancelled.body.id}`).send({ status: 'cancelled' });

    const titles = (res: { body: { items: { title: string }[] } }) => res.body.items.map((r) => r.title);
    const open = await designer.agent.get(`/api/labs/${labId}/requests`).query({ status: 'open', sort: 'dueDate' });
    expect(open.status).toBe(200);
    expect(titles(open)).toEqual(['Soon urgent', 'Soon low', 'Later normal']);
    expect(open.body.total).toBe(3);
    const byPriority = await designer.agent.get(`/api/labs/${labId}/requests`).query({ status: 'open', sort: 'priority' });
    expect(titles(byPriority)).toEqual(['Soon urgent', 'Later normal', 'Soon low']);
    const all = await designer.agent.get(`/api/labs/${labId}/requests`).query({ pageSize: 2, page: 2 });
    expect(all.body.total).toBe(4);
    expect(all.body.items).toHaveLength(2);
    const bad = await designer.agent.get(`/api/labs/${labId}/requests`).query({ status: 'lost' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('status');
  });
});

describe('changing a request', () => {
  test('the designer changes the lines, keeping the line of a part still listed', async () => {
    const { designer, labId, materialId, latch, cover } = await labWithParts('patch');
    const created = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 4 }]));
    const latchLine = created.body.lines[0].id;
    const res = await designer.agent
      .patch(`/api/labs/${labId}/requests/${created.body.id}`)
      .send({ lines: [{ partId: cover, quantity: 9 }, { partId: latch, quantity: 6 }], priority: 'urgent', notes: '' });
    expect(res.status).toBe(200);
    expect(res.body.priority).toBe('urgent');
    expect(res.body.lines.map((l: { partName: string; quantity: number }) => [l.partName, l.quantity])).toEqual([['cover', 9], ['latch', 6]]);
    expect(res.body.lines[1].id).toBe(latchLine);
    const bad = await designer.agent.patch(`/api/labs/${labId}/requests/${created.body.id}`).send({ lines: [{ partId: latch, quantity: -1 }] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('lines[0].quantity');
    const unknown = await designer.agent.patch(`/api/labs/${labId}/requests/${created.body.id}`).send({ colour: 'red' });
    expect(unknown.body.error.field).toBe('colour');
  });

  test('once any of it is planned the request cannot be changed (409)', async () => {
    const { designer, labId, materialId, latch } = await labWithParts('planned');
    const created = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 4 }]));
    // What a build plan does when it takes two of the line.
    await running.db.sequelize.query('UPDATE request_lines SET planned_count = 2 WHERE request_id = $1', { bind: [created.body.id] });
    const res = await designer.agent.patch(`/api/labs/${labId}/requests/${created.body.id}`).send({ title: 'Renamed' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('already_planned');
    const after = await designer.agent.get(`/api/labs/${labId}/requests/${created.body.id}`);
    expect(after.body).toMatchObject({ title: 'Gripper batch', planned: true, totals: { planned: 2 } });
  });

  test('another designer may not change it, a lead may', async () => {
    const { lead, designer, labId, materialId, latch } = await labWithParts('owner');
    const other = await addMember(running, lead.agent, labId, ['designer'], 'other');
    const created = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 4 }]));
    expect((await other.agent.patch(`/api/labs/${labId}/requests/${created.body.id}`).send({ title: 'Mine' })).status).toBe(403);
    const byLead = await lead.agent.patch(`/api/labs/${labId}/requests/${created.body.id}`).send({ dueDate: daysFromNow(30) });
    expect(byLead.status).toBe(200);
    expect(byLead.body.dueDate).toBe(daysFromNow(30));
  });

  test('a part named in a request cannot be deleted (409) until the request lets go of it', async () => {
    const { designer, labId, materialId, latch, cover } = await labWithParts('inuse');
    const created = await designer.agent.post(`/api/labs/${labId}/requests`).send(body(materialId, [{ partId: latch, quantity: 4 }]));
    const del = await designer.agent.delete(`/api/labs/${labId}/parts/${latch}`);
    expect(del.status).toBe(409);
    expect(del.body.error).toMatchObject({ code: 'in_use', message: expect.stringContaining('Gripper batch') });
    await designer.agent.patch(`/api/labs/${labId}/requests/${created.body.id}`).send({ lines: [{ partId: cover, quantity: 1 }] });
    expect((await designer.agent.delete(`/api/labs/${labId}/parts/${latch}`)).status).toBe(204);
  });
});
