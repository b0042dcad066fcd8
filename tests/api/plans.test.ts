import { addMember, startTestApp, signUp, waitForMail } from '../helpers/app';
import { createPlan, gridLayout, labWithProfiles, makeRequest, planInstance } from '../helpers/plans';
import type { Running } from '../../server/boot';
import { estimateLayout } from '../../shared/estimate';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const plannedCount = async (lineId: string) => {
  const [rows] = (await running.db.sequelize.query('SELECT planned_count FROM request_lines WHERE id = $1', { bind: [lineId] })) as [any[], unknown];
  return rows[0].planned_count as number;
};

const BRACKET = { name: 'Bracket', sizeMm: [40, 20, 10] as [number, number, number], quantity: 30 };
const CLIP = { name: 'Clip', sizeMm: [12, 8, 5] as [number, number, number], quantity: 50, orientation: 'keep_up' as const };

async function planReady(tag: string) {
  const lab = await labWithProfiles(running, tag);
  const req = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [BRACKET, CLIP], { title: 'Robot arm', dueDate: '2027-02-10', priority: 'high' });
  const plan = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, [
    { id: req.lines[0].id, quantity: 20 },
    { id: req.lines[1].id, quantity: 50 },
  ]);
  return { ...lab, req, plan };
}

describe('creating a plan', () => {
  test('a planner makes a draft from open request lines; the lines show part, size, rule and request; planned counts follow', async () => {
    const { agent: lead, labId, machineId, materialId, userId, machine } = await labWithProfiles(running, 'create');
    const planner = await addMember(running, lead, labId, ['planner'], 'planner');
    const req = await makeRequest(running, labId, userId, materialId, [BRACKET, CLIP], { title: 'Robot arm', dueDate: '2027-02-10', priority: 'high' });
    const res = await planner.agent.post(`/api/labs/${labId}/plans`).send({
      name: 'Week 6 nylon',
      machineId,
      materialId,
      lines: [{ requestLineId: req.lines[0].id, quantity: 12 }, { requestLineId: req.lines[1].id, quantity: 50 }],
    });
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ id: expect.any(String), version: 1, status: 'draft' });

    const view = (await planner.agent.get(`/api/labs/${labId}/plans/${res.body.id}`)).body;
    expect(view).toMatchObject({ name: 'Week 6 nylon', status: 'draft', version: 1, editable: true, chosenLayoutId: null });
    expect(view.machine).toMatchObject({ id: machineId, chamberMm: machine.chamberMm });
    expect(view.lines).toHaveLength(2);
    expect(view.lines[0]).toMatchObject({
      requestLineId: req.lines[0].id,
      quantity: 12,
      orientation: 'any',
      part: { name: 'Bracket', sizeMm: [40, 20, 10], volumeMm3: 8000, watertight: true },
      request: { title: 'Robot arm', dueDate: '2027-02-10', priority: 'high' },
      lineQuantity: 30,
    });
    expect(view.lines[1].orientation).toBe('keep_up');
    // Whether a part's mesh is closed shows with it (a layout by shape counts an open one as its box).
    await running.db.sequelize.query('UPDATE parts SET watertight = false WHERE id = $1', { bind: [view.lines[0].part.id] });
    const again = (await planner.agent.get(`/api/labs/${labId}/plans/${res.body.id}`)).body;
    expect(again.lines.map((l: any) => l.part.watertight)).toEqual([false, true]);
    const open = (await planner.agent.get(`/api/labs/${labId}/plans/open-lines?materialId=${materialId}`)).body;
    expect(open.find((l: any) => l.part.id === view.lines[0].part.id)?.part.watertight).toBe(false);
    // Closed means watertight and consistently oriented, as the server's check and slices count it.
    await running.db.sequelize.query(`UPDATE parts SET watertight = true, metrics = jsonb_set(metrics, '{oriented}', 'false') WHERE id = $1`, { bind: [view.lines[0].part.id] });
    const unoriented = (await planner.agent.get(`/api/labs/${labId}/plans/${res.body.id}`)).body;
    expect(unoriented.lines.map((l: any) => l.part.watertight)).toEqual([false, true]);
    const openAgain = (await planner.agent.get(`/api/labs/${labId}/plans/open-lines?materialId=${materialId}`)).body;
    expect(openAgain.find((l: any) => l.part.id === view.lines[0].part.id)?.part.watertight).toBe(false);
    // So does its mesh's triangle count, as measured on upload (the editor suggests the time heavy meshes need).
    const [[stored]] = (await running.db.sequelize.query('SELECT triangles FROM parts WHERE id = $1', { bind: [view.lines[0].part.id] })) as [Array<{ triangles: number }>, unknown];
    expect(stored.triangles).toBeGreaterThan(0);
    expect(again.lines[0].part.triangles).toBe(stored.triangles);
    expect(open.find((l: any) => l.part.id === view.lines[0].part.id)?.part.triangles).toBe(stored.triangles);
    expect(view.events).toEqual([expect.objectContaining({ from: null, to: 'draft', by: { id: planner.userId, name: 'Test planner' } })]);
    expect(await plannedCount(req.lines[0].id)).toBe(12);
    expect(await plannedCount(req.lines[1].id)).toBe(50);
  });

  test('a quantity above what the request line still needs is refused, naming the line', async () => {
    const { agent: lead, labId, machineId, materialId, userId } = await labWithProfiles(running, 'need');
    const req = await makeRequest(running, labId, userId, materialId, [BRACKET]);
    await createPlan(lead, labId, machineId, materialId, [{ id: req.lines[0].id, quantity: 25 }]);
    const res = await lead.post(`/api/labs/${labId}/plans`).send({ name: 'Too many', machineId, materialId, lines: [{ requestLineId: req.lines[0].id, quantity: 6 }] });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('lines[0].quantity');
    expect(res.body.error.message).toMatch(/still needs only 5/);
    expect(await plannedCount(req.lines[0].id)).toBe(25);
  });

  test('planned counts move by what each save takes or gives back, so parts given back by a run stay open', async () => {
    const { agent: lead, labId, machineId, materialId, userId } = await labWithProfiles(running, 'delta');
    const req = await makeRequest(running, labId, userId, materialId, [BRACKET]);
    const a = await createPlan(lead, labId, machineId, materialId, [{ id: req.lines[0].id, quantity: 30 }]);
    // As a run does at breakout: 4 failed parts go back to the request as open quantity.
    await running.db.sequelize.query('UPDATE request_lines SET planned_count = planned_count - 4 WHERE id = $1', { bind: [req.lines[0].id] });
    const b = await lead.post(`/api/labs/${labId}/plans`).send({ name: 'Reprint', machineId, materialId, lines: [{ requestLineId: req.lines[0].id, quantity: 4 }] });
    expect(b.status).toBe(201);
    expect(await plannedCount(req.lines[0].id)).toBe(30);
    const lowered = await lead.put(`/api/labs/${labId}/plans/${a.id}`).send({ version: 1, lines: [{ requestLineId: req.lines[0].id, quantity: 20 }] });
    expect(lowered.body.lines[0].quantity).toBe(20);
    expect(await plannedCount(req.lines[0].id)).toBe(20);
    const open = (await lead.get(`/api/labs/${labId}/plans/open-lines?materialId=${materialId}`)).body;
    expect(open.map((l: any) => l.remaining)).toEqual([10]);
  });

  test('lines of another material, a closed request or another lab are refused', async () => {
    const { agent: lead, labId, machineId, materialId, userId, material } = await labWithProfiles(running, 'badlines');
    const other = await lead.post(`/api/labs/${labId}/materials`).send({ ...material, name: 'Other powder' });
    const otherReq = await makeRequest(running, labId, userId, other.body.id, [BRACKET]);
    const closed = await makeRequest(running, labId, userId, materialId, [BRACKET], { status: 'cancelled' });
    const foreign = await labWithProfiles(running, 'foreignlines');
    const foreignReq = await makeRequest(running, foreign.labId, foreign.userId, foreign.materialId, [BRACKET]);
    const post = (requestLineId: string) => lead.post(`/api/labs/${labId}/plans`).send({ name: 'X', machineId, materialId, lines: [{ requestLineId, quantity: 1 }] });
    const wrongMaterial = await post(otherReq.lines[0].id);
    expect(wrongMaterial.status).toBe(400);
    expect(wrongMaterial.body.error).toMatchObject({ field: 'lines[0].requestLineId', message: expect.stringMatching(/another material/) });
    expect((await post(closed.lines[0].id)).body.error.message).toMatch(/cancelled, not open/);
    expect((await post(foreignReq.lines[0].id)).body.error.message).toMatch(/not a request line of this lab/);
    const foreignMachine = await lead.post(`/api/labs/${labId}/plans`).send({ name: 'X', machineId: foreign.machineId, materialId, lines: [{ requestLineId: closed.lines[0].id, quantity: 1 }] });
    expect(foreignMachine.body.error.field).toBe('machineId');
  });
});

describe('open request lines', () => {
  test('the lines a plan can take list what each still needs, most urgent first, in the chosen material', async () => {
    const { agent: lead, labId, machineId, materialId, userId, material } = await labWithProfiles(running, 'openlines');
    const later = await makeRequest(running, labId, userId, materialId, [BRACKET], { title: 'Later', dueDate: '2027-05-01', priority: 'normal' });
    await makeRequest(running, labId, userId, materialId, [CLIP], { title: 'Urgent', dueDate: '2027-06-01', priority: 'urgent' });
    const other = await lead.post(`/api/labs/${labId}/materials`).send({ ...material, name: 'Other powder' });
    await makeRequest(running, labId, userId, other.body.id, [BRACKET], { title: 'Other powder' });
    const { id } = await createPlan(lead, labId, machineId, materialId, [{ id: later.lines[0].id, quantity: 25 }]);

    const open = (await lead.get(`/api/labs/${labId}/plans/open-lines?materialId=${materialId}`)).body;
    expect(open.map((l: any) => [l.request.title, l.remaining, l.plannedCount])).toEqual([['Urgent', 50, 0], ['Later', 5, 25]]);
    expect(open[1]).toMatchObject({ requestLineId: later.lines[0].id, part: { name: 'Bracket', sizeMm: [40, 20, 10] } });
    const forThePlan = (await lead.get(`/api/labs/${labId}/plans/open-lines?materialId=${materialId}&planId=${id}`)).body;
    expect(forThePlan.find((l: any) => l.requestLineId === later.lines[0].id).remaining).toBe(30);
  });
});

describe('permissions', () => {
  test('a designer cannot create plans; another lab\'s plan is not found', async () => {
    const { agent: lead, labId, machineId, materialId, userId } = await labWithProfiles(running, 'perm');
    const req = await makeRequest(running, labId, userId, materialId, [BRACKET]);
    const designer = await addMember(running, lead, labId, ['designer'], 'designer');
    const res = await designer.agent.post(`/api/labs/${labId}/plans`).send({ name: 'X', machineId, materialId, lines: [{ requestLineId: req.lines[0].id, quantity: 1 }] });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    const { id } = await createPlan(lead, labId, machineId, materialId, [{ id: req.lines[0].id, quantity: 2 }]);
    expect((await designer.agent.get(`/api/labs/${labId}/plans/${id}`)).status).toBe(200);
    expect((await designer.agent.put(`/api/labs/${labId}/plans/${id}`).send({ version: 1, name: 'Mine' })).status).toBe(403);

    const stranger = await signUp(running, 'stranger');
    expect((await stranger.agent.get(`/api/labs/${labId}/plans/${id}`)).status).toBe(404);
    // Their own lab id with this lab's plan id: still not found.
    expect((await stranger.agent.get(`/api/labs/${stranger.labId}/plans/${id}`)).status).toBe(404);
    expect((await stranger.agent.put(`/api/labs/${stranger.labId}/plans/${id}`).send({ version: 1, name: 'Taken' })).status).toBe(404);
  });
});

describe('saving with a version', () => {
  test('a save at the version read answers the next version; a save from a stale copy answers 409 and changes nothing', async () => {
    const { agent, labId, req, plan } = await planReady('version');
    const url = `/api/labs/${labId}/plans/${plan.id}`;
    const first = await agent.put(url).send({ version: 1, name: 'Renamed', lines: [{ requestLineId: req.lines[0].id, quantity: 30 }, { requestLineId: req.lines[1].id, quantity: 10, orientation: 'fixed' }], draft: { camera: 'top' } });
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ version: 2, name: 'Renamed', draft: { camera: 'top' } });
    expect(first.body.lines.map((l: any) => [l.quantity, l.orientation, l.orientationOverride])).toEqual([[30, 'any', null], [10, 'fixed', 'fixed']]);
    expect(await plannedCount(req.lines[1].id)).toBe(10);

    const stale = await agent.put(url).send({ version: 1, name: 'From the other tab' });
    expect(stale.status).toBe(409);
    expect(stale.body.error).toMatchObject({ code: 'version_conflict', currentVersion: 2 });
    const now = (await agent.get(url)).body;
    expect(now).toMatchObject({ name: 'Renamed', version: 2 });
  });

  test('of two saves sent at once from the same version, one wins and the other answers 409', async () => {
    const { agent, labId, plan } = await planReady('race');
    const url = `/api/labs/${labId}/plans/${plan.id}`;
    const answers = await Promise.all([agent.put(url).send({ version: 1, name: 'Tab A' }), agent.put(url).send({ version: 1, name: 'Tab B' })]);
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409]);
    const winner = answers.find((r) => r.status === 200)!.body.name;
    expect((await agent.get(url)).body).toMatchObject({ name: winner, version: 2 });
  });
});

describe('layouts', () => {
  test('a valid layout is stored with its estimate and reads back with the same placements', async () => {
    const { agent, labId, plan, machine, material } = await planReady('layouts');
    const instance = planInstance(plan.view, machine, material);
    const result = gridLayout(instance);
    const res = await agent.post(`/api/labs/${labId}/plans/${plan.id}/layouts`).send({ instance, result, label: 'Grid' });
    expect(res.status).toBe(201);
    // The parts' files are real boxes, so their sections are their footprints, in each layer whose middle lies inside them.
    const footprints = new Array(result.layers).fill(0);
    for (const p of result.placements) {
      for (let L = 0; L < result.layers; L++) {
        const z = (L + 0.5) * instance.layerHeight!;
        if (z > p.position[2] && z <= p.position[2] + p.size[2]) footprints[L] += p.size[0] * p.size[1];
      }
    }
    expect(res.body.estimate.profileSource).toBe('mesh');
    res.body.estimate.areaPerLayerMm2.forEach((a: number, L: number) => expect(a).toBeCloseTo(footprints[L], 3));
    // The same shared estimate the editor shows, on the plan's machine and material with the parts' own volumes.
    const expected = estimateLayout({
      layout: { placements: result.placements, heightMm: result.height, margin: instance.margin as any },
      machine,
      material,
      layerHeightMm: instance.layerHeight,
      partsVolumeMm3: 20 * 8000 + 50 * 480,
      partCount: 70,
      areaPerLayerMm2: footprints,
    });
    expect(res.body.estimate.layerCount).toBe(result.layers);
    expect(res.body.estimate.partCount).toBe(70);
    expect(res.body.estimate.print.printSeconds).toBeCloseTo(expected.print.printSeconds, 6);
    expect(res.body.estimate.powder.packingDensity).toBeCloseTo(expected.powder.packingDensity, 9);
    expect(res.body.estimate.areaPerLayerMm2).toHaveLength(result.layers);

    const back = await agent.get(`/api/labs/${labId}/plans/${plan.id}/layouts/${res.body.id}`);
    expect(back.status).toBe(200);
    expect(back.body).toMatchObject({ label: 'Grid', matchesPlan: true, chosen: false, placedCount: 70, layers: result.layers });
    expect(back.body.result.placements).toEqual(result.placements);
    const stranger = await signUp(running, 'layoutstranger');
    expect((await stranger.agent.get(`/api/labs/${stranger.labId}/plans/${plan.id}/layouts/${res.body.id}`)).status).toBe(404);
    const view = (await agent.get(`/api/labs/${labId}/plans/${plan.id}`)).body;
    expect(view.layouts).toEqual([expect.objectContaining({ id: res.body.id, label: 'Grid', placedCount: 70, unplacedCount: 0 })]);
    expect(view.layouts[0].estimate.areaPerLayerMm2).toBeUndefined();
  });

  test('an invalid layout or one packed for another build is refused with 400 naming the problem', async () => {
    const { agent, labId, plan, machine, material } = await planReady('badlayout');
    const url = `/api/labs/${labId}/plans/${plan.id}/layouts`;
    const instance = planInstance(plan.view, machine, material);
    const result = gridLayout(instance);
    const overlapping = { ...result, placements: result.placements.map((p, i) => (i === 1 ? { ...p, position: result.placements[0].position } : p)) };
    const overlap = await agent.post(url).send({ instance, result: overlapping });
    expect(overlap.status).toBe(400);
    expect(overlap.body.error.field).toMatch(/^result\./);
    expect(overlap.body.error.problems.length).toBeGreaterThan(0);

    const wrongChamber = await agent.post(url).send({ instance: { ...instance, chamber: [300, 300, 380] }, result });
    expect(wrongChamber.status).toBe(400);
    expect(wrongChamber.body.error.field).toBe('instance.chamber[0]');

    const tighter = await agent.post(url).send({ instance: { ...instance, spacing: 1 }, result });
    expect(tighter.body.error.field).toBe('instance.spacing');

    const fewer = { ...instance, parts: instance.parts.map((p, i) => (i === 0 ? { ...p, quantity: 5 } : p)) };
    const res = await agent.post(url).send({ instance: fewer, result: gridLayout(fewer) });
    expect(res.body.error.field).toBe('instance.parts[0].quantity');

    const turned = { ...instance, parts: instance.parts.map((p, i) => (i === 1 ? { ...p, orientations: ['xyz', 'zxy'] } : p)) };
    expect((await agent.post(url).send({ instance: turned, result: gridLayout(turned as any) })).body.error.field).toBe('instance.parts[1].orientations');

    const badInstance = await agent.post(url).send({ instance: { ...instance, parts: [{ id: 'x', size: [1, -1, 1], quantity: 1 }] }, result });
    expect(badInstance.body.error.field).toBe('instance.parts[0].size[1]');
    expect((await agent.get(`/api/labs/${labId}/plans/${plan.id}`)).body.layouts).toEqual([]);
  });

  test('a layout saved by an older engine still opens', async () => {
    const { agent, labId, plan, machine, material } = await planReady('oldengine');
    const instance = planInstance(plan.view, machine, material);
    const result = gridLayout(instance);
    const { id } = (await agent.post(`/api/labs/${labId}/plans/${plan.id}/layouts`).send({ instance, result })).body;
    // As an earlier engine would have left it: another result label, no time limit or seed in the stored instance.
    await running.db.sequelize.query(
      `UPDATE layouts SET result_format = 'pack-result/0', instance = instance - 'timeLimitMs' - 'seed' WHERE id = $1`,
      { bind: [id] },
    );
    const back = await agent.get(`/api/labs/${labId}/plans/${plan.id}/layouts/${id}`);
    expect(back.status).toBe(200);
    expect(back.body.resultFormat).toBe('pack-result/0');
    expect(back.body.result.placements).toEqual(result.placements);
  });

  test('a layout stored in the first placement format (29 bytes a placement, no header) still opens', async () => {
    const { agent, labId, plan, machine, material } = await planReady('format1');
    const instance = planInstance(plan.view, machine, material);
    const result = gridLayout(instance);
    const { id } = (await agent.post(`/api/labs/${labId}/plans/${plan.id}/layouts`).send({ instance, result })).body;
    // Written as the first format laid them out: Float64 corners, Uint32 part indices, Uint8 orientation codes, little-endian.
    const partIds = instance.parts.map((p) => p.id);
    const n = result.placements.length;
    const bytes = Buffer.alloc(29 * n);
    result.placements.forEach((p, i) => {
      p.position.forEach((v, a) => bytes.writeDoubleLE(v, 24 * i + 8 * a));
      bytes.writeUInt32LE(partIds.indexOf(p.id), 24 * n + 4 * i);
      bytes.writeUInt8(['xyz', 'xzy', 'yxz', 'yzx', 'zxy', 'zyx'].indexOf(p.orientation), 28 * n + i);
    });
    await running.db.sequelize.query('UPDATE layouts SET placements_format = 1, placements = $2 WHERE id = $1', { bind: [id, bytes] });
    const back = await agent.get(`/api/labs/${labId}/plans/${plan.id}/layouts/${id}`);
    expect(back.status).toBe(200);
    expect(back.body.result.placements).toEqual(result.placements);
  });

  test('choosing, deleting and going stale when the lines change', async () => {
    const { agent, labId, plan, machine, material, req } = await planReady('choose');
    const base = `/api/labs/${labId}/plans/${plan.id}`;
    const instance = planInstance(plan.view, machine, material);
    const a = (await agent.post(`${base}/layouts`).send({ instance, result: gridLayout(instance), locked: true })).body.id;
    const b = (await agent.post(`${base}/layouts`).send({ instance: { ...instance, seed: 2 }, result: gridLayout(instance) })).body.id;
    const chosen = await agent.post(`${base}/layouts/${a}/choose`);
    expect(chosen.status).toBe(200);
    expect(chosen.body).toMatchObject({ chosenLayoutId: a, version: 2 });
    expect((await agent.delete(`${base}/layouts/${a}`)).body.error.code).toBe('locked');
    expect((await agent.delete(`${base}/layouts/${b}`)).status).toBe(204);

    const changed = await agent.put(base).send({ version: 2, lines: [{ requestLineId: req.lines[0].id, quantity: 21 }, { requestLineId: req.lines[1].id, quantity: 50 }] });
    expect(changed.status).toBe(200);
    expect(changed.body.layouts[0]).toMatchObject({ id: a, matchesPlan: false });
    const stale = await agent.post(`${base}/submit`);
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('layout_stale');
  });
});

describe('sending for review', () => {
  test('a plan with a chosen layout goes to review, every lead is e-mailed, it lists for the leads and is read-only', async () => {
    const { agent, labId, plan, machine, material, email } = await planReady('submit');
    const secondLead = await addMember(running, agent, labId, ['lead'], 'lead2');
    const planner = await addMember(running, agent, labId, ['planner'], 'planner');
    const base = `/api/labs/${labId}/plans/${plan.id}`;
    expect((await planner.agent.post(`${base}/submit`)).body.error.code).toBe('no_chosen_layout');

    const instance = planInstance(plan.view, machine, material);
    const layout = (await planner.agent.post(`${base}/layouts`).send({ instance, result: gridLayout(instance) })).body.id;
    await planner.agent.post(`${base}/layouts/${layout}/choose`);
    const before = running.mailer.caught!.length;
    const sent = await planner.agent.post(`${base}/submit`).send({ comment: 'Densest so far' });
    expect(sent.status).toBe(200);
    expect(sent.body).toMatchObject({ status: 'in_review', version: 3 });
    for (const to of [email, secondLead.email]) {
      const mail = await waitForMail(running, before, to);
      expect(mail.subject).toContain('Waiting for your review');
      expect(mail.text).toContain(`/review/${plan.id}`);
    }

    const inReview = (await secondLead.agent.get(`/api/labs/${labId}/plans?status=in_review`)).body;
    expect(inReview.map((p: any) => p.id)).toEqual([plan.id]);
    expect(inReview[0]).toMatchObject({ lineCount: 2, partCount: 70, earliestDueDate: '2027-02-10', layoutCount: 1, chosenLayoutId: layout });
    expect((await agent.get(`/api/labs/${labId}/plans?status=draft`)).body).toEqual([]);

    const edit = await planner.agent.put(base).send({ version: 3, name: 'Sneaky' });
    expect(edit.status).toBe(409);
    expect(edit.body.error.code).toBe('read_only');
    expect((await planner.agent.post(`${base}/layouts`).send({ instance, result: gridLayout(instance) })).body.error.code).toBe('read_only');
    expect((await planner.agent.post(`${base}/layouts/${layout}/choose`)).status).toBe(409);
    expect((await planner.agent.post(`${base}/submit`)).body.error).toMatchObject({ code: 'invalid_transition', allowed: ['approved', 'changes_requested', 'cancelled'] });
    const view = (await planner.agent.get(base)).body;
    expect(view).toMatchObject({ status: 'in_review', editable: false, name: 'Plan' });
    expect(view.events.map((e: any) => [e.from, e.to, e.comment])).toEqual([[null, 'draft', null], ['draft', 'in_review', 'Densest so far']]);
  });
});

describe('cancelling and profiles in use', () => {
  test('cancelling a plan opens its quantities again; a cancelled plan cannot change state', async () => {
    const { agent, labId, plan, req } = await planReady('cancel');
    expect(await plannedCount(req.lines[0].id)).toBe(20);
    const res = await agent.post(`/api/labs/${labId}/plans/${plan.id}/cancel`).send({ comment: 'Merged into another build' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('cancelled');
    expect(await plannedCount(req.lines[0].id)).toBe(0);
    const again = await agent.post(`/api/labs/${labId}/plans/${plan.id}/cancel`);
    expect(again.status).toBe(409);
    expect(again.body.error).toMatchObject({ code: 'invalid_transition', allowed: [] });
  });

  test('a machine or material used by a plan cannot be deleted (409 in_use)', async () => {
    const { agent, labId, machineId, materialId } = await planReady('inuse');
    const m = await agent.delete(`/api/labs/${labId}/machines/${machineId}`);
    expect(m.status).toBe(409);
    expect(m.body.error).toMatchObject({ code: 'in_use', message: expect.stringMatching(/machine is used by build plans/) });
    expect((await agent.delete(`/api/labs/${labId}/materials/${materialId}`)).body.error.code).toBe('in_use');
    expect((await agent.get(`/api/labs/${labId}/machines/${machineId}`)).status).toBe(200);
  });
});
