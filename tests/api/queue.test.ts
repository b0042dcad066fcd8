import { startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { backdateApproval, labWithCrew, queuedPlan, runIdOf, startBody } from './runs-fixtures';

// Each test builds a lab, plans and layouts through the API: slower than the default 5 s on a busy machine.
jest.setTimeout(30_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const GEAR = { name: 'Gear', sizeMm: [30, 30, 8] as [number, number, number], quantity: 12 };
const ms = (iso: string) => Date.parse(iso);
const HOUR = 3_600_000;

describe('a machine\'s queue', () => {
  test('a one-chamber machine starts the next build only after the last cake is broken out', async () => {
    const lab = await labWithCrew(running, 'onechamber', { chamberCount: 1 });
    const first = await queuedPlan(running, lab, [GEAR], { name: 'First' });
    const second = await queuedPlan(running, lab, [GEAR], { name: 'Second' });
    const q = (await lab.operator.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    expect(q.machine).toMatchObject({ id: lab.machineId, chamberCount: 1 });
    expect(q.plans.map((p: any) => [p.planId, p.queuePosition, p.chamberIndex])).toEqual([
      [first.planId, 1, 0],
      [second.planId, 2, 0],
    ]);
    const [a, b] = q.plans;
    expect(ms(a.startAt)).toBe(ms(q.now));
    // Stage by stage from the layout's estimate; breakout takes the machine's hands-on hours.
    expect(ms(a.printEndAt) - ms(a.startAt)).toBeCloseTo(first.estimate.print.printSeconds * 1000, -1);
    expect(ms(a.leavesMachineAt) - ms(a.printEndAt)).toBeCloseTo(first.estimate.cooling.inMachineSeconds * 1000, -1);
    expect(ms(a.cooledAt) - ms(a.leavesMachineAt)).toBeCloseTo(first.estimate.cooling.outsideSeconds * 1000, -1);
    expect(ms(a.breakoutDoneAt) - ms(a.cooledAt)).toBe(lab.machine.labourHoursPerBuild * HOUR);
    expect(ms(b.startAt)).toBe(ms(a.breakoutDoneAt));
  });

  test('a two-chamber machine starts the next build as soon as the last chamber leaves the machine, while it cools outside', async () => {
    const lab = await labWithCrew(running, 'twochamber', { chamberCount: 2 });
    await queuedPlan(running, lab, [GEAR], { name: 'First' });
    await queuedPlan(running, lab, [GEAR], { name: 'Second' });
    const q = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    const [a, b] = q.plans;
    expect([a.chamberIndex, b.chamberIndex]).toEqual([0, 1]);
    expect(ms(b.startAt)).toBe(ms(a.leavesMachineAt));
    expect(ms(b.startAt)).toBeLessThan(ms(a.breakoutDoneAt));
  });

  test('each plan shows its requests\' due dates and is flagged when it will come out of the powder after the earliest', async () => {
    const lab = await labWithCrew(running, 'late');
    const overdue = await queuedPlan(running, lab, [GEAR], { name: 'Overdue', dueDate: '2026-01-05' });
    const relaxed = await queuedPlan(running, lab, [GEAR], { name: 'Relaxed', dueDate: '2099-12-31' });
    const q = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    const byId = new Map(q.plans.map((p: any) => [p.planId, p]));
    expect(byId.get(overdue.planId)).toMatchObject({ late: true, earliestDueDate: '2026-01-05', requests: [{ id: overdue.request.requestId, dueDate: '2026-01-05' }] });
    expect((byId.get(overdue.planId) as any).lateByHours).toBeGreaterThan(0);
    expect(byId.get(relaxed.planId)).toMatchObject({ late: false, lateByHours: 0, earliestDueDate: '2099-12-31' });
  });

  test('the lead reorders the queue and the times follow; a list that is not exactly the queued plans is refused', async () => {
    const lab = await labWithCrew(running, 'reorder', { chamberCount: 1 });
    const a = await queuedPlan(running, lab, [GEAR], { name: 'A' });
    const b = await queuedPlan(running, lab, [GEAR], { name: 'B' });
    const c = await queuedPlan(running, lab, [GEAR], { name: 'C' });
    const url = `/api/labs/${lab.labId}/machines/${lab.machineId}/queue`;
    const put = await lab.agent.put(url).send({ planIds: [c.planId, a.planId, b.planId] });
    expect(put.status).toBe(200);
    expect(put.body.plans.map((p: any) => [p.name, p.queuePosition])).toEqual([['C', 1], ['A', 2], ['B', 3]]);
    expect(ms(put.body.plans[0].startAt)).toBe(ms(put.body.now));
    expect(ms(put.body.plans[1].startAt)).toBe(ms(put.body.plans[0].breakoutDoneAt));
    expect((await lab.agent.get(url)).body.plans.map((p: any) => p.name)).toEqual(['C', 'A', 'B']);

    const missing = await lab.agent.put(url).send({ planIds: [c.planId, a.planId] });
    expect(missing.status).toBe(400);
    expect(missing.body.error).toMatchObject({ field: 'planIds', missing: [b.planId] });
    expect(missing.body.error.message).toContain('"B"');
    const twice = await lab.agent.put(url).send({ planIds: [c.planId, c.planId, a.planId, b.planId] });
    expect(twice.body.error.field).toBe('planIds[1]');
    const stranger = await lab.agent.put(url).send({ planIds: [lab.materialId, c.planId, a.planId, b.planId] });
    expect(stranger.body.error.field).toBe('planIds[0]');
    expect((await lab.operator.agent.put(url).send({ planIds: [a.planId, b.planId, c.planId] })).status).toBe(403);

    // A started plan is no longer in the queue's order: the lead orders only what waits.
    await lab.operator.agent.post(`${c.base}/run/advance`).send(startBody(c.estimate));
    const after = (await lab.agent.get(url)).body;
    expect(after.current).toMatchObject({ planId: c.planId, status: 'printing' });
    expect(after.active.map((p: any) => p.planId)).toEqual([c.planId]);
    expect(after.plans.map((p: any) => p.name)).toEqual(['A', 'B']);
    expect(ms(after.plans[0].startAt)).toBe(ms(after.current.breakoutDoneAt));
    expect((await lab.agent.put(url).send({ planIds: [c.planId, a.planId, b.planId] })).body.error.field).toBe('planIds[0]');
  });
});

describe('calibration from recorded runs', () => {
  test('three runs that each printed 1.2 times and cooled 1.25 times as long as estimated give factors 1.2 and 0.8, which new estimates and the queue use', async () => {
    const lab = await labWithCrew(running, 'calib', { chamberCount: 1 });
    const plans = [];
    for (let i = 0; i < 4; i++) plans.push(await queuedPlan(running, lab, [GEAR], { name: `Run ${i + 1}` }));
    const est = plans[0].estimate;
    const printMs = est.print.printSeconds * 1000;
    const coolMs = est.cooling.coolingSeconds * 1000;
    const span = 1.2 * printMs + 1.25 * coolMs + 2 * HOUR;
    const t0 = Date.now() - 3 * span - HOUR;
    for (const p of plans) await backdateApproval(running, p.planId, 3 * span + 2 * HOUR);
    const at = (t: number) => new Date(Math.round(t)).toISOString();
    const url = `/api/labs/${lab.labId}/machines/${lab.machineId}/calibration`;
    expect((await lab.agent.get(url)).body).toMatchObject({ runs: 0, calibrated: false, printTimeScale: 1, coolingScale: 1 });

    for (let i = 0; i < 3; i++) {
      const { base } = plans[i];
      const start = t0 + i * span;
      const printEnd = start + 1.2 * printMs;
      const breakout = printEnd + 1.25 * coolMs;
      const steps = [
        startBody(est, at(start)),
        { to: 'cooling', at: at(printEnd) },
        { to: 'breakout', at: at(breakout) },
        { to: 'finishing', at: at(breakout + 0.5 * HOUR), counts: [{ requestLineId: plans[i].request.lines[0].id, good: 12, failed: 0 }] },
        { to: 'done', at: at(breakout + HOUR), finishingChecklist: { powderRemoved: true, blasted: true, inspected: true } },
      ];
      for (const step of steps) {
        const named = step.to === 'printing' ? step : { ...step, runId: await runIdOf(lab.operator.agent, base) };
        const res = await lab.operator.agent.post(`${base}/run/advance`).send(named);
        if (res.status !== 200) throw new Error(`${step.to}: ${res.status} ${JSON.stringify(res.body)}`);
      }
    }
    const done = (await lab.agent.get(`${plans[0].base}/run`)).body;
    expect(done.actualPrintHours / done.estimatedPrintHours).toBeCloseTo(1.2, 6);
    expect(done.actualCoolingHours / done.estimatedCoolingHours).toBeCloseTo(1.25, 6);

    // Least squares through the origin, actual = s x estimate: s = sum(a e) / sum(e e) = 1.2 when every a = 1.2 e;
    // the cooling factor multiplies Newton's k, and time to a temperature goes as 1 / k (Edwards & Penney §1.1): 1 / 1.25.
    const calibration = (await lab.agent.get(url)).body;
    expect(calibration.runs).toBe(3);
    expect(calibration.calibrated).toBe(true);
    expect(calibration.printTimeScale).toBeCloseTo(1.2, 6);
    expect(calibration.coolingScale).toBeCloseTo(0.8, 6);

    const queue = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    expect(queue.calibration).toMatchObject({ runs: 3, calibrated: true });
    const waiting = queue.plans[0];
    expect(waiting.planId).toBe(plans[3].planId);
    expect(waiting.durations.layersSeconds).toBeCloseTo(est.print.layersSeconds * 1.2, 3);
    expect(waiting.durations.outsideCoolingSeconds).toBeCloseTo(est.cooling.outsideSeconds / 0.8, 3);

    const fresh = await queuedPlan(running, lab, [GEAR], { name: 'After calibration', approve: false });
    expect(fresh.estimate.calibration).toMatchObject({ runs: 3, calibrated: true });
    expect(fresh.estimate.print.printSeconds).toBeCloseTo(est.print.printSeconds * 1.2, 3);
    expect(fresh.estimate.cooling.coolingSeconds).toBeCloseTo(est.cooling.coolingSeconds / 0.8, 3);
  });

  test('another lab\'s machine has no calibration to show', async () => {
    const lab = await labWithCrew(running, 'calibother');
    const other = await labWithCrew(running, 'calibother2');
    expect((await other.agent.get(`/api/labs/${other.labId}/machines/${lab.machineId}/calibration`)).status).toBe(404);
    expect((await other.agent.get(`/api/labs/${other.labId}/machines/not-an-id/calibration`)).status).toBe(404);
  });
});
