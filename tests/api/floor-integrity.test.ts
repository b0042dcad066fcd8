import { startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { backdateApproval, labWithCrew, queuedPlan, runIdOf, startBody } from './runs-fixtures';
import { CONFIRM_AFTER_MINUTES } from '../../shared/floor';

jest.setTimeout(60_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const GEAR = { name: 'Gear', sizeMm: [30, 30, 8] as [number, number, number], quantity: 12 };
const HOUR = 3_600_000;
const iso = (ms: number) => new Date(ms).toISOString();

describe('one build at a time on a machine', () => {
  test('a second start while another build prints answers 409 naming the build that holds the machine; after its print ends the next one starts', async () => {
    const lab = await labWithCrew(running, 'onebuild');
    const first = await queuedPlan(running, lab, [GEAR], { name: 'First build' });
    const second = await queuedPlan(running, lab, [GEAR], { name: 'Second build' });
    const op = lab.operator.agent;
    expect((await op.post(`${first.base}/run/advance`).send(startBody(first.estimate))).status).toBe(200);

    const busy = await op.post(`${second.base}/run/advance`).send(startBody(second.estimate));
    expect(busy.status).toBe(409);
    expect(busy.body.error).toMatchObject({ code: 'machine_busy', planId: first.planId, planName: 'First build' });
    expect(busy.body.error.message).toMatch(/is printing "First build"/);
    expect((await op.get(`${second.base}/run`)).body).toMatchObject({ status: 'queued', id: null });

    await op.post(`${first.base}/run/advance`).send({ runId: await runIdOf(op, first.base), to: 'cooling' });
    const next = await op.post(`${second.base}/run/advance`).send(startBody(second.estimate));
    expect(next.status).toBe(200);
    expect(next.body.status).toBe('printing');
  });

  test('two phones starting two different builds on one machine at the same moment: exactly one prints, the other is told which', async () => {
    const lab = await labWithCrew(running, 'onebuild-race');
    const a = await queuedPlan(running, lab, [GEAR], { name: 'Build A' });
    const b = await queuedPlan(running, lab, [GEAR], { name: 'Build B' });
    const [ra, rb] = await Promise.all([
      lab.operator.agent.post(`${a.base}/run/advance`).send(startBody(a.estimate)),
      lab.agent.post(`${b.base}/run/advance`).send(startBody(b.estimate)),
    ]);
    expect([ra.status, rb.status].sort()).toEqual([200, 409]);
    const [won, lost] = ra.status === 200 ? [ra, rb] : [rb, ra];
    expect(lost.body.error).toMatchObject({ code: 'machine_busy', planId: won.body.planId, planName: won.body.planName });
    const queue = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    expect(queue.active.filter((p: any) => p.status === 'printing')).toHaveLength(1);
  });

  test('a start recorded late cannot fall inside another build\'s print on the machine (409 naming at and that build)', async () => {
    const lab = await labWithCrew(running, 'overlap');
    const first = await queuedPlan(running, lab, [GEAR], { name: 'Earlier build' });
    const second = await queuedPlan(running, lab, [GEAR], { name: 'Later build' });
    await backdateApproval(running, first.planId, 10 * HOUR);
    await backdateApproval(running, second.planId, 10 * HOUR);
    const op = lab.operator.agent;
    const t0 = Date.now() - 8 * HOUR;
    await op.post(`${first.base}/run/advance`).send(startBody(first.estimate, iso(t0)));
    await op.post(`${first.base}/run/advance`).send({ runId: await runIdOf(op, first.base), to: 'cooling', at: iso(t0 + 4 * HOUR) });
    const inside = await op.post(`${second.base}/run/advance`).send(startBody(second.estimate, iso(t0 + 2 * HOUR)));
    expect(inside.status).toBe(409);
    expect(inside.body.error).toMatchObject({ code: 'machine_busy', field: 'at', planName: 'Earlier build' });
    const after = await op.post(`${second.base}/run/advance`).send(startBody(second.estimate, iso(t0 + 5 * HOUR)));
    expect(after.status).toBe(200);
  });
});

describe('every step names the run it acts on', () => {
  test('a step without runId is refused naming runId; one naming another build\'s run is refused and moves nothing', async () => {
    const lab = await labWithCrew(running, 'named');
    const a = await queuedPlan(running, lab, [GEAR], { name: 'Card A' });
    const b = await queuedPlan(running, lab, [GEAR], { name: 'Card B' });
    const op = lab.operator.agent;
    await op.post(`${a.base}/run/advance`).send(startBody(a.estimate));
    await op.post(`${a.base}/run/advance`).send({ runId: await runIdOf(op, a.base), to: 'cooling' });
    await op.post(`${b.base}/run/advance`).send(startBody(b.estimate));
    const runA = await runIdOf(op, a.base);

    const bare = await op.post(`${b.base}/run/advance`).send({ to: 'cooling' });
    expect(bare.status).toBe(400);
    expect(bare.body.error.field).toBe('runId');
    // The card of A, pressed while the list moved B under the thumb, sends A's run to B's plan.
    const wrong = await op.post(`${b.base}/run/advance`).send({ runId: runA, to: 'cooling' });
    expect(wrong.status).toBe(409);
    expect(wrong.body.error).toMatchObject({ code: 'wrong_run', field: 'runId', planName: 'Card B' });
    expect((await op.get(`${b.base}/run`)).body.status).toBe('printing');
    const reading = await op.post(`${b.base}/run/readings`).send({ runId: runA, tempC: 100, where: 'machine' });
    expect(reading.status).toBe(409);
  });
});

describe('readings checked against the cooling model', () => {
  test('an unexplained cold reading does not unlock breakout; a second one too soon does not confirm it; one agreeing minutes later does', async () => {
    const lab = await labWithCrew(running, 'confirm');
    const { base, estimate, planId } = await queuedPlan(running, lab, [GEAR]);
    await backdateApproval(running, planId, 4 * HOUR);
    const op = lab.operator.agent;
    const printEnd = Date.now() - HOUR;
    await op.post(`${base}/run/advance`).send(startBody(estimate, iso(printEnd - 2 * HOUR)));
    const runId = await runIdOf(op, base);
    const cooling = await op.post(`${base}/run/advance`).send({ runId, to: 'cooling', at: iso(printEnd) });
    const { startTempC, handlingTempC } = cooling.body.thresholds;
    expect(cooling.body.timers.cooling.handlingReached).toBe(false);

    const reading = (tempC: number, atMs: number) => op.post(`${base}/run/readings`).send({ runId, tempC, where: 'outside', at: iso(atMs) });
    const first = await reading(handlingTempC - 2, printEnd + 5 * 60_000);
    const check = first.body.readings[0].check;
    expect(check.status).toBe('unexplained');
    // The coolest the model allows five minutes after the print: still near the bed temperature, far above the reading.
    expect(check.coolestC).toBeGreaterThan(handlingTempC);
    expect(check.coolestC).toBeLessThanOrEqual(startTempC);
    expect(first.body.timers.cooling.handlingReached).toBe(false);
    const refused = await op.post(`${base}/run/advance`).send({ runId, to: 'breakout' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('still_hot');
    expect(refused.body.error.message).toMatch(/second reading at least 10 minutes after it, or ask a lead to accept it/);
    expect(refused.body.error.unexplainedReadings).toEqual([first.body.readings[0].id]);

    const soon = await reading(handlingTempC - 3, printEnd + 5 * 60_000 + (CONFIRM_AFTER_MINUTES - 5) * 60_000);
    expect(soon.body.readings.map((r: any) => r.check.status)).toEqual(['unexplained', 'unexplained']);
    const disagree = await reading(handlingTempC + 20, printEnd + 5 * 60_000 + (CONFIRM_AFTER_MINUTES + 1) * 60_000);
    expect(disagree.body.readings.map((r: any) => r.check.status)).toEqual(['unexplained', 'unexplained', 'unexplained']);
    const agree = await reading(handlingTempC - 1, printEnd + 5 * 60_000 + (CONFIRM_AFTER_MINUTES + 2) * 60_000);
    const statuses = agree.body.readings.map((r: any) => [r.tempC, r.check.status]);
    expect(statuses[3]).toEqual([handlingTempC - 1, 'confirmed']);
    // It confirms the first (12 minutes before it and 1 °C apart), not the second (only 7 minutes before it).
    expect(agree.body.readings[0].check).toMatchObject({ status: 'confirmed', confirmedBy: agree.body.readings[3].id });
    expect(agree.body.readings[1].check.status).toBe('unexplained');
    expect(agree.body.timers.cooling.handlingReached).toBe(true);
    expect((await op.post(`${base}/run/advance`).send({ runId, to: 'breakout' })).status).toBe(200);
  });

  test('a reading the model explains counts at once; a lead cannot accept a reading that needs no acceptance', async () => {
    const lab = await labWithCrew(running, 'explained');
    const { base, estimate } = await queuedPlan(running, lab, [GEAR]);
    const op = lab.operator.agent;
    await op.post(`${base}/run/advance`).send(startBody(estimate));
    const runId = await runIdOf(op, base);
    const cooling = await op.post(`${base}/run/advance`).send({ runId, to: 'cooling' });
    const hot = await op.post(`${base}/run/readings`).send({ runId, tempC: cooling.body.thresholds.startTempC - 1, where: 'machine' });
    expect(hot.body.readings[0].check.status).toBe('explained');
    const accept = await lab.agent.post(`${base}/run/readings/${hot.body.readings[0].id}/accept`).send({ runId, reason: 'Looks fine' });
    expect(accept.status).toBe(409);
    expect(accept.body.error.code).toBe('reading_not_doubted');
    expect((await lab.agent.post(`${base}/run/readings/${runId}/accept`).send({ runId, reason: 'No such reading' })).status).toBe(404);
  });
});
