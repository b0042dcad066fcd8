import { addMember, startTestApp, signUp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { labWithCrew, queuedPlan, startBody } from './runs-fixtures';
import { seedPowderHistory } from '../../server/db/seeders/powder';
import { lotDetailView, materialDetailView, planPowderView, powderOverview, requestLotsView } from '../../shared/schemas/powder';

// Each test builds a lab, plans and layouts through the API.
jest.setTimeout(60_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const GEAR = { name: 'Gear', sizeMm: [30, 30, 8] as [number, number, number], quantity: 12 };
type Lab = Awaited<ReturnType<typeof labWithCrew>>;
const url = (lab: Lab, path = '') => `/api/labs/${lab.labId}/powder${path}`;

async function receive(lab: Lab, body: Record<string, unknown>) {
  return lab.agent.post(url(lab, '/lots')).send({ materialId: lab.materialId, receivedOn: '2026-10-01', ...body });
}
/** The material's stock, checked against the schema the screens parse it with. */
async function stock(lab: Lab) {
  return materialDetailView.parse((await lab.agent.get(url(lab, `/materials/${lab.materialId}`))).body);
}
/** A plan through print and cooling to breakout (a reading below the handling temperature lets it out). */
async function toBreakout(lab: Lab, base: string, start: Record<string, unknown>) {
  const op = lab.operator.agent;
  const s = await op.post(`${base}/run/advance`).send(start);
  if (s.status !== 200) throw new Error(`start: ${s.status} ${JSON.stringify(s.body)}`);
  const runId = s.body.id;
  await op.post(`${base}/run/advance`).send({ runId, to: 'cooling' });
  // Right after the print the cooling model cannot explain 30 °C: the lead accepts the reading, with a reason.
  const r = await op.post(`${base}/run/readings`).send({ runId, tempC: 30, where: 'outside' });
  await lab.agent.post(`${base}/run/readings/${r.body.readings[0].id}/accept`).send({ runId, reason: 'Test cake, cooled by hand' });
  const b = await op.post(`${base}/run/advance`).send({ runId, to: 'breakout' });
  if (b.status !== 200) throw new Error(`breakout: ${b.status} ${JSON.stringify(b.body)}`);
}

describe('receiving lots and moving powder at the shelf', () => {
  test('bad kilograms, a lot code used twice in a material and another lab\'s material are refused naming the field, and nothing is written', async () => {
    const lab = await labWithCrew(running, 'pw-bad');
    const op = lab.operator.agent;

    const negative = await op.post(url(lab, '/lots')).send({ materialId: lab.materialId, code: 'A-1', kg: -5, receivedOn: '2026-10-01' });
    expect(negative.status).toBe(400);
    expect(negative.body.error).toMatchObject({ code: 'invalid_input', field: 'kg' });
    const text = await op.post(url(lab, '/lots')).send({ materialId: lab.materialId, code: 'A-1', kg: '25', receivedOn: '2026-10-01' });
    expect(text.status).toBe(400);
    expect(text.body.error).toMatchObject({ field: 'kg', message: 'kg must be a number of kilograms' });
    const zero = await receive(lab, { code: 'A-1', kg: 0 });
    expect(zero.body.error.field).toBe('kg');

    const first = await receive(lab, { code: 'A-1', kg: 25, makerLot: 'M 4471-b' });
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ code: 'A-1', receivedKg: 25, onHandKg: 25, makerLot: 'M 4471-b' });
    const again = await receive(lab, { code: 'A-1', kg: 10 });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatchObject({ code: 'lot_code_taken', field: 'code' });
    expect(again.body.error.message).toMatch(/already has a lot A-1/);

    // The same code in another material is another lot.
    const other = await lab.agent.post(`/api/labs/${lab.labId}/materials`).send({ ...lab.material, name: 'Second powder' });
    const second = await lab.agent.post(url(lab, '/lots')).send({ materialId: other.body.id, code: 'A-1', kg: 5, receivedOn: '2026-10-02' });
    expect(second.status).toBe(201);

    const stranger = await signUp(running, 'pw-stranger');
    const foreign = await stranger.agent.post(`/api/labs/${stranger.labId}/powder/lots`).send({ materialId: lab.materialId, code: 'X', kg: 5, receivedOn: '2026-10-01' });
    expect(foreign.status).toBe(404);
    expect(foreign.body.error).toMatchObject({ field: 'materialId', message: 'materialId is not a material of this lab' });
    const foreignCount = await stranger.agent.post(`/api/labs/${stranger.labId}/powder/movements`).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: 0, reason: 'x' });
    expect(foreignCount.status).toBe(404);
    expect(foreignCount.body.error.field).toBe('materialId');

    const after = await stock(lab);
    expect(after.freshKg).toBe(25);
    expect(after.lots.map((l: any) => [l.code, l.onHandKg])).toEqual([['A-1', 25]]);
    expect(after.movements).toHaveLength(1);
  });

  test('a discard or a count is a movement: the stock is their sum, and more than is on hand cannot be discarded', async () => {
    const lab = await labWithCrew(running, 'pw-moves');
    const lot = (await receive(lab, { code: 'B-7', kg: 40 })).body;
    const op = lab.operator.agent;
    const tooMuch = await op.post(url(lab, '/movements')).send({ kind: 'discarded', materialId: lab.materialId, lotId: lot.id, kg: 40.5, reason: 'wet' });
    expect(tooMuch.status).toBe(409);
    expect(tooMuch.body.error.field).toBe('kg');
    const noReason = await op.post(url(lab, '/movements')).send({ kind: 'discarded', materialId: lab.materialId, lotId: lot.id, kg: 1 });
    expect(noReason.body.error.field).toBe('reason');
    const discard = await op.post(url(lab, '/movements')).send({ kind: 'discarded', materialId: lab.materialId, lotId: lot.id, kg: 2.5, reason: 'bag torn, powder on the floor' });
    expect(discard.status).toBe(201);
    expect(discard.body).toMatchObject({ kind: 'discarded', deltaKg: -2.5, lot: { code: 'B-7' }, by: { id: lab.operator.userId } });
    // A count of 36.9 kg against a book of 37.5 kg records -0.6 kg, with who and why.
    const count = await op.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, lotId: lot.id, countedKg: 36.9, reason: 'monthly count' });
    expect(count.status).toBe(201);
    expect(count.body).toMatchObject({ kind: 'adjusted', countedKg: 36.9, reason: 'monthly count' });
    expect(count.body.deltaKg).toBeCloseTo(-0.6, 9);
    const pool = await op.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: 12, reason: 'reused bin weighed' });
    expect(pool.body).toMatchObject({ deltaKg: 12, lot: null });

    const s = await stock(lab);
    expect(s.freshKg).toBeCloseTo(36.9, 9);
    expect(s.reusedKg).toBe(12);
    expect(s.movements.map((m: any) => m.kind).sort()).toEqual(['adjusted', 'adjusted', 'discarded', 'received']);
    expect(s.history.at(-1)).toMatchObject({ freshKg: 36.9, reusedKg: 12 });

    // A planner reads the stock but does not move it.
    const planner = await addMember(running, lab.agent, lab.labId, ['planner'], 'planner');
    expect((await planner.agent.get(url(lab))).status).toBe(200);
    const refused = await planner.agent.post(url(lab, '/movements')).send({ kind: 'discarded', materialId: lab.materialId, lotId: lot.id, kg: 1, reason: 'x' });
    expect(refused.status).toBe(403);
  });
});

describe('powder at the machine', () => {
  test('a material with no stock records is not tracked: its builds start unchecked and draw nothing, until the first lot is received', async () => {
    const lab = await labWithCrew(running, 'pw-untracked');
    const first = await queuedPlan(running, lab, [GEAR], { name: 'Before the ledger' });
    const view = planPowderView.parse((await lab.designer.agent.get(url(lab, `/plans/${first.planId}`))).body);
    expect(view).toMatchObject({ tracked: false, stock: { freshKg: 0, reusedKg: 0 }, lots: [] });
    const untracked = powderOverview.parse((await lab.agent.get(url(lab))).body).materials[0];
    expect(untracked).toMatchObject({ tracked: false, freshKg: 0 });
    // What the queue needs is known, but no stock is kept to hold it against: no reorder date, no running out, no
    // shortage (a shelf nobody counted is not an empty one).
    expect(untracked.forecast.neededKg).toBeGreaterThan(0);
    expect(untracked.forecast).toMatchObject({ points: [], belowReorderAt: null, runsOutAt: null, runsOutPlan: null, shortage: false });
    const started = await lab.operator.agent.post(`${first.base}/run/advance`).send(startBody(first.estimate));
    expect(started.status).toBe(200);
    expect((await stock(lab)).movements).toEqual([]);

    // One lot received: from now on every start is checked against the shelf.
    await receive(lab, { code: 'FIRST', kg: 0.1 });
    const twin = await lab.agent.post(`/api/labs/${lab.labId}/machines`).send({ ...lab.machine, name: 'Second machine' });
    const second = await queuedPlan(running, { ...lab, machineId: twin.body.id }, [GEAR], { name: 'After the ledger' });
    const body = startBody(second.estimate);
    const tracked = planPowderView.parse((await lab.designer.agent.get(url(lab, `/plans/${second.planId}`))).body);
    expect(tracked).toMatchObject({ tracked: true, lots: [{ code: 'FIRST', onHandKg: 0.1 }] });
    expect(tracked.proposal!.shortfallKg).toBeCloseTo(second.estimate.powder.freshPowderKg - 0.1, 3);
    const refused = await lab.operator.agent.post(`${second.base}/run/advance`).send(body);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatchObject({ code: 'powder_short', field: 'freshPowderKg', material: 'Powder of pw-untracked', kind: 'fresh' });
    expect(refused.body.error.message).toContain('the usable lots hold 0.1 kg');
    expect(refused.body.error.shortfallKg).toBeCloseTo(body.freshPowderKg - 0.1, 3);
    expect((await stock(lab)).freshKg).toBe(0.1);
  });

  test('planners see what a plan takes, what the queue ahead takes, and the material\'s rules it would break', async () => {
    const lab = await labWithCrew(running, 'pw-planner');
    const ahead = await queuedPlan(running, lab, [GEAR], { name: 'Ahead' });
    const mine = await queuedPlan(running, lab, [GEAR], { name: 'Mine' });
    await receive(lab, { code: 'P-1', kg: 100 });
    const policy = { maxMeanAgeBuilds: 0.1, minRefreshRatio: 0.9, minMvrCm3Per10Min: null, reorderLevelKg: 20, leadTimeDays: 7 };
    expect((await lab.agent.put(url(lab, `/materials/${lab.materialId}/policy`)).send(policy)).status).toBe(200);
    // A first count of the reused bin: 50 kg, counted as 0 builds old (the empty pool's age).
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: 50, reason: 'count' });
    const v = planPowderView.parse((await lab.designer.agent.get(url(lab, `/plans/${mine.planId}`))).body);
    expect(v.policy).toEqual(policy);
    expect(v.queuedPlans).toBe(1);
    expect(v.queuedFreshKg).toBeCloseTo(ahead.estimate.powder.freshPowderKg, 3);
    expect(v.after!.freshKg).toBeCloseTo(100 - mine.estimate.powder.freshPowderKg, 3);
    // The estimate's fill is mostly reused powder (its refresh is below 90 %): the refresh rule warns; the pool is 0 builds old, so the age rule does not.
    const ratio = mine.estimate.powder.freshPowderKg / (mine.estimate.powder.freshPowderKg + mine.estimate.powder.reusedPowderKg);
    expect(ratio).toBeLessThan(0.9);
    expect(v.warnings.map((w) => w.code)).toEqual(['refresh']);
  });


  test('a start draws its fresh powder from the oldest lots and its reused powder from the pool; a start the stock cannot cover is refused naming the material and the shortfall', async () => {
    const lab = await labWithCrew(running, 'pw-draw');
    const { planId, base, estimate } = await queuedPlan(running, lab, [GEAR]);
    const body = startBody(estimate);
    const fresh = body.freshPowderKg;
    await receive(lab, { code: 'NEW', kg: 50, receivedOn: '2026-11-20' });
    const old = (await receive(lab, { code: 'OLD', kg: fresh / 2, receivedOn: '2026-09-01' })).body;
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: body.reusedPowderKg / 2, reason: 'first count' });

    // The planner's view: what the plan takes, from which lots, and the reused powder it lacks.
    const view = (await lab.designer.agent.get(url(lab, `/plans/${planId}`))).body;
    expect(view.planned.freshKg).toBeCloseTo(estimate.powder.freshPowderKg, 9);
    expect(view.proposal.draws.map((d: any) => d.code)).toEqual(['OLD', 'NEW']);
    expect(view.reusedShortfallKg).toBeCloseTo(estimate.powder.reusedPowderKg - body.reusedPowderKg / 2, 3);

    const short = await lab.operator.agent.post(`${base}/run/advance`).send(body);
    expect(short.status).toBe(409);
    expect(short.body.error).toMatchObject({ code: 'powder_short', field: 'reusedPowderKg', material: `Powder of pw-draw`, kind: 'reused' });
    expect(short.body.error.message).toMatch(/^Not enough reused Powder of pw-draw: .* short\.$/);
    expect(short.body.error.shortfallKg).toBeCloseTo(body.reusedPowderKg / 2, 3);
    // Nothing moved and the plan still waits.
    expect((await stock(lab)).movements).toHaveLength(3);
    expect((await lab.agent.get(`${base}/run`)).body.status).toBe('queued');

    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: body.reusedPowderKg + 5, reason: 'found a second bin' });
    const ok = await lab.operator.agent.post(`${base}/run/advance`).send(body);
    expect(ok.status).toBe(200);
    const after = planPowderView.parse((await lab.agent.get(url(lab, `/plans/${planId}`))).body);
    expect(after.run!.draws).toEqual([
      { lotId: old.id, code: 'OLD', kg: fresh / 2 },
      { lotId: expect.any(String), code: 'NEW', kg: expect.closeTo(fresh / 2, 9) },
    ]);
    expect(after.run!.reusedKg).toBeCloseTo(body.reusedPowderKg, 9);
    const s = await stock(lab);
    expect(s.freshKg).toBeCloseTo(50 + fresh / 2 - fresh, 9);
    expect(s.reusedKg).toBeCloseTo(5, 9);
  });

  test('the operator may name the lots; lots that do not add up to the fresh powder loaded are refused', async () => {
    const lab = await labWithCrew(running, 'pw-pick');
    const { planId, base, estimate } = await queuedPlan(running, lab, [GEAR]);
    const body = startBody(estimate);
    await receive(lab, { code: 'OLD', kg: 100, receivedOn: '2026-09-01' });
    const picked = (await receive(lab, { code: 'OPEN-BAG', kg: 100, receivedOn: '2026-11-01' })).body;
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: 100, reason: 'count' });
    const wrong = await lab.operator.agent.post(`${base}/run/advance`).send({ ...body, lots: [{ lotId: picked.id, kg: body.freshPowderKg + 1 }] });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.field).toBe('lots');
    const ok = await lab.operator.agent.post(`${base}/run/advance`).send({ ...body, lots: [{ lotId: picked.id, kg: body.freshPowderKg }] });
    expect(ok.status).toBe(200);
    expect((await lab.agent.get(url(lab, `/plans/${planId}`))).body.run.draws.map((d: any) => d.code)).toEqual(['OPEN-BAG']);
  });

  test('two operators loading the last powder at once: one build starts, the other is refused, and the stock never goes below zero', async () => {
    const lab = await labWithCrew(running, 'pw-race');
    const twin = await lab.agent.post(`/api/labs/${lab.labId}/machines`).send({ ...lab.machine, name: 'Twin machine' });
    expect(twin.status).toBe(201);
    const one = await queuedPlan(running, lab, [GEAR], { name: 'First' });
    const two = await queuedPlan(running, { ...lab, machineId: twin.body.id }, [GEAR], { name: 'Second' });
    const body = startBody(one.estimate);
    // Enough for one build and a half.
    await receive(lab, { code: 'LAST', kg: body.freshPowderKg * 1.5 });
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: body.reusedPowderKg * 3, reason: 'count' });

    const [a, b] = await Promise.all([
      lab.operator.agent.post(`${one.base}/run/advance`).send(body),
      lab.agent.post(`${two.base}/run/advance`).send(startBody(two.estimate)),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const lost = a.status === 409 ? a : b;
    expect(lost.body.error).toMatchObject({ code: 'powder_short', field: 'freshPowderKg', kind: 'fresh' });
    const s = await stock(lab);
    expect(s.freshKg).toBeCloseTo(body.freshPowderKg * 0.5, 6);
    expect(s.freshKg).toBeGreaterThanOrEqual(0);
    expect(s.movements.filter((m: any) => m.kind === 'loaded')).toHaveLength(2); // one lot draw and one reused draw, of the winner only
  });

  test('after breakout the operator records recovered and discarded powder; the pool takes it in a build older, once, and never more than was loaded', async () => {
    const lab = await labWithCrew(running, 'pw-recover');
    const { planId, base, estimate } = await queuedPlan(running, lab, [GEAR]);
    const body = startBody(estimate);
    await receive(lab, { code: 'F-1', kg: 100 });
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: body.reusedPowderKg, reason: 'count' });
    const early = await lab.operator.agent.post(url(lab, `/plans/${planId}/recovery`)).send({ recoveredKg: 1 });
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe('not_broken_out');

    await toBreakout(lab, base, body);
    const loaded = body.freshPowderKg + body.reusedPowderKg;
    const tooMuch = await lab.operator.agent.post(url(lab, `/plans/${planId}/recovery`)).send({ recoveredKg: loaded, discardedKg: 0.5 });
    expect(tooMuch.status).toBe(400);
    expect(tooMuch.body.error.field).toBe('recoveredKg');
    const negative = await lab.operator.agent.post(url(lab, `/plans/${planId}/recovery`)).send({ recoveredKg: -1 });
    expect(negative.body.error.field).toBe('recoveredKg');

    const recovered = Math.round(body.reusedPowderKg * 0.9 * 1000) / 1000;
    const ok = await lab.operator.agent.post(url(lab, `/plans/${planId}/recovery`)).send({ recoveredKg: recovered, discardedKg: 0.05, reason: 'caked near the parts' });
    expect(ok.status).toBe(201);
    expect(ok.body.run.recovery).toMatchObject({ recoveredKg: recovered, discardedKg: 0.05, by: { id: lab.operator.userId } });
    const s = await stock(lab);
    expect(s.reusedKg).toBeCloseTo(recovered, 9);
    // The pool was emptied into the build (its age 0 as counted), so what came back has the fill's age + 1:
    // fill age = reused x 0 / loaded = 0, so the pool is 1 build old.
    expect(s.reusedMeanAgeBuilds).toBeCloseTo(1, 9);
    const twice = await lab.operator.agent.post(url(lab, `/plans/${planId}/recovery`)).send({ recoveredKg: 1 });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('already_recorded');
  });
});

describe('melt-flow checks', () => {
  test('a melt volume-rate below the material\'s threshold blocks reuse until a lead releases it with a reason', async () => {
    const lab = await labWithCrew(running, 'pw-mvr');
    const { base, estimate } = await queuedPlan(running, lab, [GEAR]);
    const body = startBody(estimate);
    await receive(lab, { code: 'F-1', kg: 100 });
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: 100, reason: 'count' });
    const policy = { maxMeanAgeBuilds: 3, minRefreshRatio: 0.3, minMvrCm3Per10Min: 20, reorderLevelKg: 0, leadTimeDays: 7 };
    expect((await lab.operator.agent.put(url(lab, `/materials/${lab.materialId}/policy`)).send(policy)).status).toBe(403);
    const set = await lab.agent.put(url(lab, `/materials/${lab.materialId}/policy`)).send(policy);
    expect(set.status).toBe(200);
    expect(set.body.policy).toEqual(policy);
    const badRatio = await lab.agent.put(url(lab, `/materials/${lab.materialId}/policy`)).send({ ...policy, minRefreshRatio: 1.5 });
    expect(badRatio.body.error.field).toBe('minRefreshRatio');

    const failed = await lab.operator.agent.post(url(lab, '/checks')).send({ materialId: lab.materialId, mvrCm3Per10Min: 14.2, testTempC: 235, testLoadKg: 5 });
    expect(failed.status).toBe(201);
    expect(failed.body).toMatchObject({ passed: false, thresholdCm3Per10Min: 20, releasedAt: null });
    expect((await stock(lab)).reuseBlocked).toBe(true);

    const refused = await lab.operator.agent.post(`${base}/run/advance`).send(body);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatchObject({ code: 'reuse_blocked', field: 'reusedPowderKg' });

    const byOperator = await lab.operator.agent.post(url(lab, `/checks/${failed.body.id}/release`)).send({ reason: 'fine' });
    expect(byOperator.status).toBe(403);
    const noReason = await lab.agent.post(url(lab, `/checks/${failed.body.id}/release`)).send({});
    expect(noReason.body.error.field).toBe('reason');
    const released = await lab.agent.post(url(lab, `/checks/${failed.body.id}/release`)).send({ reason: 'Second measurement 21.0 on a dried sample; first sample was damp.' });
    expect(released.status).toBe(200);
    expect(released.body).toMatchObject({ releasedBy: { id: lab.userId }, releaseReason: expect.stringMatching(/dried sample/) });
    expect((await lab.agent.post(url(lab, `/checks/${failed.body.id}/release`)).send({ reason: 'again' })).status).toBe(409);

    const started = await lab.operator.agent.post(`${base}/run/advance`).send(body);
    expect(started.status).toBe(200);
    const passed = await lab.operator.agent.post(url(lab, '/checks')).send({ materialId: lab.materialId, mvrCm3Per10Min: 24 });
    expect(passed.body.passed).toBe(true);
    expect((await stock(lab)).lastCheck?.mvrCm3Per10Min).toBe(24);
  });
});

describe('forecast, reorder and traceability', () => {
  test('when the queue would take the stock below the reorder level within the lead time, home shows it and the leads get one e-mail', async () => {
    const lab = await labWithCrew(running, 'pw-reorder');
    const { estimate } = await queuedPlan(running, lab, [GEAR], { name: 'Queued gears' });
    const fresh = estimate.powder.freshPowderKg;
    const before = running.mailer.caught!.length;
    const reorderMails = () => running.mailer.caught!.slice(before).filter((x) => x.subject.includes('Reorder powder'));
    await receive(lab, { code: 'R-1', kg: fresh + 2 });
    const policy = { maxMeanAgeBuilds: 3, minRefreshRatio: 0.3, minMvrCm3Per10Min: null, reorderLevelKg: 5, leadTimeDays: 14 };
    await lab.agent.put(url(lab, `/materials/${lab.materialId}/policy`)).send(policy);
    // The change that brings the shortage into sight sends the e-mail, with nobody looking at the stock.
    for (const until = Date.now() + 10_000; reorderMails().length === 0 && Date.now() < until; ) await new Promise((r) => setTimeout(r, 50));
    expect(reorderMails()).toHaveLength(1);
    const first = powderOverview.parse((await lab.agent.get(url(lab))).body);
    const m = first.materials.find((x) => x.material.id === lab.materialId)!;
    expect(m.forecast.shortage).toBe(true);
    expect(m.forecast.neededKg).toBeCloseTo(fresh, 3); // to the gram
    expect(m.forecast.points.map((p: any) => p.stockKg)).toEqual([fresh + 2, 2].map((x) => Math.round(x * 1000) / 1000));
    expect(m.forecast.points[1].planName).toBe('Queued gears');
    await (await lab.agent.get(url(lab))); // looking sends nothing new, nor does another look at the forecasts
    await running.services.powder.sweepShortages();
    const mails = reorderMails();
    expect(mails).toHaveLength(1);
    expect(mails[0].to).toContain(lab.email);
    expect(mails[0].text).toMatch(/reorder level of 5\.0 kg/);

    // Received enough: the shortage closes; a later dip mails again.
    await receive(lab, { code: 'R-2', kg: 50, receivedOn: '2026-10-05' });
    expect((await lab.agent.get(url(lab))).body.materials[0].forecast.shortage).toBe(false);
  });

  test('a lot lists the builds and requests it went into; a request lists the lots its parts were printed from', async () => {
    const lab = await labWithCrew(running, 'pw-trace');
    const first = await queuedPlan(running, lab, [GEAR], { name: 'Build one' });
    const body = startBody(first.estimate);
    const lot = (await receive(lab, { code: 'T-1', kg: 100 })).body;
    await lab.agent.post(url(lab, '/movements')).send({ kind: 'adjusted', materialId: lab.materialId, countedKg: body.reusedPowderKg, reason: 'count' });
    await toBreakout(lab, first.base, body);
    await lab.operator.agent.post(url(lab, `/plans/${first.planId}/recovery`)).send({ recoveredKg: body.reusedPowderKg });
    // A second build reuses the first one's powder: its reused share may hold lot T-1.
    const second = await queuedPlan(running, lab, [GEAR], { name: 'Build two' });
    await receive(lab, { code: 'T-0', kg: 100, receivedOn: '2026-08-01' });
    const started = await lab.operator.agent.post(`${second.base}/run/advance`).send(startBody(second.estimate));
    expect(started.status).toBe(200);

    const lotView = lotDetailView.parse((await lab.designer.agent.get(url(lab, `/lots/${lot.id}`))).body);
    expect(lotView.builds.map((b: any) => b.plan.name)).toEqual(['Build one']);
    expect(lotView.builds[0].requests).toEqual([{ id: first.request.requestId, title: expect.any(String) }]);
    expect(lotView.builds[0].kg).toBeCloseTo(body.freshPowderKg, 9);

    const req = requestLotsView.parse((await lab.designer.agent.get(url(lab, `/requests/${second.request.requestId}`))).body);
    expect(req.builds).toHaveLength(1);
    expect(req.builds[0].freshLots.map((l: any) => l.code)).toEqual(['T-0']);
    expect(req.builds[0].reusedFromLots.map((l: any) => l.code)).toEqual(['T-1']);
    const notOurs = await (await signUp(running, 'pw-trace-x')).agent.get(`/api/labs/${lab.labId}/powder/lots/${lot.id}`);
    expect(notOurs.status).toBe(404);
  });
});

describe('the demo lab\'s invented powder history', () => {
  test('is a plausible ledger: lots drawn oldest first, never below zero, reused powder of a believable age, checks that passed', async () => {
    const lab = await labWithCrew(running, 'pw-demo');
    await seedPowderHistory(running.db, lab.labId, { lead: lab.userId, operator: lab.operator.userId });
    const s = await stock(lab);
    expect(s.tracked).toBe(true);
    expect(s.lots).toHaveLength(3);
    expect(s.lots.every((l) => l.makerLot !== '' && l.onHandKg >= 0 && l.onHandKg <= l.receivedKg)).toBe(true);
    // Oldest first: a lot is only drawn from once every older lot is empty, so at most one lot is part-used.
    const partUsed = s.lots.filter((l) => l.onHandKg > 0 && l.onHandKg < l.receivedKg);
    expect(partUsed.length).toBeLessThanOrEqual(1);
    const firstWithPowder = s.lots.findIndex((l) => l.onHandKg > 0);
    expect(s.lots.slice(firstWithPowder).every((l) => l.onHandKg > 0)).toBe(true);
    expect(new Set(s.movements.map((m) => m.kind))).toEqual(new Set(['received', 'loaded', 'recovered', 'discarded']));
    expect(s.history.every((p) => p.freshKg >= 0 && p.reusedKg >= 0)).toBe(true);
    // With about a third fresh in each fill the pool settles near 1 / r = 3 builds (from (1 - r) / r for the fill, plus the build
    // it has just been through); a dozen builds from an empty pool lie between 1 and that.
    expect(s.reusedMeanAgeBuilds).toBeGreaterThan(1);
    expect(s.reusedMeanAgeBuilds).toBeLessThan(1 / 0.3);
    expect(s.checks.length).toBeGreaterThan(0);
    expect(s.checks.every((c) => c.passed && c.mvrCm3Per10Min >= (c.thresholdCm3Per10Min ?? 0))).toBe(true);
    expect(s.reuseBlocked).toBe(false);
  });
});
