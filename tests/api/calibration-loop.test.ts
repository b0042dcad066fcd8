import { startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { cakeCoreTempC } from '../../shared/estimate';
import { backdateApproval, labWithCrew, queuedPlan, runIdOf, startBody } from './runs-fixtures';

jest.setTimeout(120_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const GEAR = { name: 'Gear', sizeMm: [30, 30, 8] as [number, number, number], quantity: 12 };
const CLIP = { name: 'Clip', sizeMm: [20, 10, 6] as [number, number, number], quantity: 6 };
const HOUR = 3_600_000;
const iso = (ms: number) => new Date(Math.round(ms)).toISOString();
const FINISHED = { powderRemoved: true, blasted: true, inspected: true };

type Lab = Awaited<ReturnType<typeof labWithCrew>>;
type Plan = Awaited<ReturnType<typeof queuedPlan>>;

/** Runs a queued plan through every stage at the given times (ms), with the given print and cooling multiples of its estimate. */
async function runThrough(lab: Lab, plan: Plan, startMs: number, printTimes: number, coolTimes: number) {
  const est = plan.estimate;
  const op = lab.operator.agent;
  const printEnd = startMs + printTimes * est.print.printSeconds * 1000;
  const breakout = printEnd + coolTimes * est.cooling.coolingSeconds * 1000;
  const ok = (res: { status: number; body: unknown }, what: string) => {
    if (res.status !== 200) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
  };
  ok(await op.post(`${plan.base}/run/advance`).send(startBody(est, iso(startMs))), 'start');
  const runId = await runIdOf(op, plan.base);
  ok(await op.post(`${plan.base}/run/advance`).send({ runId, to: 'cooling', at: iso(printEnd) }), 'cooling');
  ok(await op.post(`${plan.base}/run/advance`).send({ runId, to: 'breakout', at: iso(breakout) }), 'breakout');
  const counts = plan.request.lines.map((l: { id: string }) => ({ requestLineId: l.id, good: GEAR.quantity, failed: 0 }));
  ok(await op.post(`${plan.base}/run/advance`).send({ runId, to: 'finishing', at: iso(breakout + HOUR / 4), counts }), 'finishing');
  ok(await op.post(`${plan.base}/run/advance`).send({ runId, to: 'done', at: iso(breakout + HOUR / 2), finishingChecklist: FINISHED }), 'done');
  return { runId, endMs: breakout + HOUR / 2 };
}

describe('calibration from what the runs show', () => {
  test('an aborted 3-minute run and a run far outside the model are left out by default and shown; a lead leaves a run out or takes one back in, with a reason', async () => {
    const lab = await labWithCrew(running, 'calib-excl', { chamberCount: 1 });
    const plans: Plan[] = [];
    for (let i = 0; i < 5; i++) plans.push(await queuedPlan(running, lab, [GEAR], { name: `Build ${i + 1}` }));
    const est = plans[0].estimate;
    const span = 2 * est.print.printSeconds * 1000 + 2 * est.cooling.coolingSeconds * 1000 + 2 * HOUR;
    let t = Date.now() - 6 * span;
    for (const p of plans) await backdateApproval(running, p.planId, 7 * span);

    const runs: string[] = [];
    for (let i = 0; i < 3; i++) {
      const r = await runThrough(lab, plans[i], t, 1.2, 1.25);
      runs.push(r.runId);
      t = r.endMs + HOUR;
    }
    // The aborted run: three minutes after its start.
    const op = lab.operator.agent;
    await op.post(`${plans[3].base}/run/advance`).send(startBody(est, iso(t)));
    const abortedRun = await runIdOf(op, plans[3].base);
    await op.post(`${plans[3].base}/run/advance`).send({ runId: abortedRun, to: 'aborted', reason: 'Recoater blade caught a part', at: iso(t + 3 * 60_000) });
    t += HOUR;
    // A run whose print end was recorded at a quarter of the estimate: someone pressed the button early.
    const odd = await runThrough(lab, plans[4], t, 0.25, 1.25);

    const url = `/api/labs/${lab.labId}/machines/${lab.machineId}/calibration`;
    const view = (await lab.agent.get(url)).body;
    // Least squares through the origin, actual = s x estimate, s = sum(a e) / sum(e e) (Draper & Smith, Applied Regression
    // Analysis, 3rd ed., §1.2 / regression through the origin; from memory): every counted run printed 1.2 x its estimate, so s = 1.2.
    expect(view).toMatchObject({ runs: 3, calibrated: true });
    expect(view.printTimeScale).toBeCloseTo(1.2, 6);
    expect(view.coolingScale).toBeCloseTo(0.8, 6);
    const byId = new Map(view.recordedRuns.map((r: any) => [r.runId, r]));
    expect(byId.get(abortedRun)).toMatchObject({ outcome: 'aborted', counted: false, usedInFit: false, defaultExclusion: 'aborted', abortReason: 'Recoater blade caught a part' });
    expect((byId.get(abortedRun) as any).actualPrintHours).toBeCloseTo(0.05, 6);
    expect(byId.get(odd.runId)).toMatchObject({ outcome: 'done', counted: false, defaultExclusion: 'far_outside_model' });
    expect((byId.get(odd.runId) as any).printRatio).toBeCloseTo(0.25, 6);
    for (const id of runs) expect(byId.get(id)).toMatchObject({ counted: true, usedInFit: true, defaultExclusion: null, choice: null });
    expect((byId.get(runs[0]) as any).printRatio).toBeCloseTo(1.2, 6);

    // Who may choose, and what a choice needs.
    const choice = (runId: string) => `${url}/runs/${runId}`;
    expect((await op.put(choice(runs[0])).send({ choice: 'exclude', reason: 'Door opened mid-build' })).status).toBe(403);
    const bare = await lab.agent.put(choice(runs[0])).send({ choice: 'exclude' });
    expect(bare.status).toBe(400);
    expect(bare.body.error.field).toBe('reason');
    const aborted = await lab.agent.put(choice(abortedRun)).send({ choice: 'include', reason: 'Count it anyway' });
    expect(aborted.status).toBe(409);
    expect(aborted.body.error.code).toBe('cannot_include');

    // Leaving one out drops the fit below three runs: the factors go back to 1, "not calibrated".
    const excluded = await lab.agent.put(choice(runs[0])).send({ choice: 'exclude', reason: 'Door opened mid-build' });
    expect(excluded.status).toBe(200);
    expect(excluded.body).toMatchObject({ runs: 2, calibrated: false, printTimeScale: 1 });
    const shown = excluded.body.recordedRuns.find((r: any) => r.runId === runs[0]);
    expect(shown).toMatchObject({ counted: false, choice: { choice: 'exclude', reason: 'Door opened mid-build', by: { id: lab.userId } } });

    // Taking the odd run back in: s = (1.2 e^2 + 1.2 e^2 + 0.25 e^2) / 3 e^2 = 2.65 / 3 (every run has the same estimate e).
    const included = await lab.agent.put(choice(odd.runId)).send({ choice: 'include', reason: 'The print really was that short: half the parts were removed' });
    expect(included.body).toMatchObject({ runs: 3, calibrated: true });
    expect(included.body.printTimeScale).toBeCloseTo(2.65 / 3, 6);
    // The queue's estimates follow the same factors.
    const queue = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    expect(queue.calibration.printTimeScale).toBeCloseTo(2.65 / 3, 6);
  });
});

describe('the cooling factor from recorded core readings', () => {
  test("runs whose core readings show the cake cooling 1.3 times as fast as the model calibrate the machine's cooling to 1.3, whatever breakout's time", async () => {
    const lab = await labWithCrew(running, 'calib-readings', { chamberCount: 1 });
    const plans: Plan[] = [];
    for (let i = 0; i < 3; i++) plans.push(await queuedPlan(running, lab, [GEAR], { name: `Read ${i + 1}` }));
    const est = plans[0].estimate;
    // The cake of the layout with the lab's powder and machine: the conduction model the floor and the estimate use.
    const cake = {
      sizeMm: est.cakeMm,
      conductivityWPerMK: lab.material.powderConductivityWPerMK,
      densityGPerCm3: lab.material.bulkDensityGPerCm3,
      heatCapacityJPerKgK: lab.material.powderHeatCapacityJPerKgK,
      surfaceWPerM2K: lab.machine.coolingSurfaceWPerM2K,
      startTempC: lab.material.bedTempC,
      ambientTempC: lab.machine.ambientTempC,
      coolingScale: 1.3,
    };
    const coolS = est.cooling.coolingSeconds;
    const span = 2 * est.print.printSeconds * 1000 + 2 * coolS * 1000 + 2 * HOUR;
    let t = Date.now() - 4 * span;
    for (const p of plans) await backdateApproval(running, p.planId, 5 * span);
    const op = lab.operator.agent;
    for (const plan of plans) {
      await op.post(`${plan.base}/run/advance`).send(startBody(est, iso(t)));
      const runId = await runIdOf(op, plan.base);
      const printEnd = t + est.print.printSeconds * 1000;
      await op.post(`${plan.base}/run/advance`).send({ runId, to: 'cooling', at: iso(printEnd) });
      for (const share of [0.3, 0.5, 0.7]) {
        const seconds = (share * coolS) / 1.3;
        const r = await op.post(`${plan.base}/run/readings`).send({ runId, tempC: Math.round(cakeCoreTempC(cake, seconds) * 10) / 10, where: 'machine', at: iso(printEnd + seconds * 1000) });
        expect(r.status).toBe(201);
        expect(r.body.readings.at(-1).check.status).toBe('explained');
      }
      // Breakout pressed late, at the estimate's full time: the whole cooling time alone would say factor 1.
      const breakout = printEnd + coolS * 1000;
      await op.post(`${plan.base}/run/advance`).send({ runId, to: 'breakout', at: iso(breakout) });
      const counts = plan.request.lines.map((l: { id: string }) => ({ requestLineId: l.id, good: GEAR.quantity, failed: 0 }));
      await op.post(`${plan.base}/run/advance`).send({ runId, to: 'finishing', at: iso(breakout + HOUR / 4), counts });
      const done = await op.post(`${plan.base}/run/advance`).send({ runId, to: 'done', at: iso(breakout + HOUR / 2), finishingChecklist: FINISHED });
      expect(done.status).toBe(200);
      t = breakout + HOUR;
    }
    const view = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/calibration`)).body;
    expect(view).toMatchObject({ calibrated: true, coolingFrom: 'readings' });
    // Readings rounded to 0.1 °C: the factor within a percent.
    expect(view.coolingScale).toBeCloseTo(1.3, 1);
    expect(Math.abs(view.coolingScale - 1.3)).toBeLessThan(0.013);
    expect(view.recordedRuns[0].readingsCoolingScale).toBeCloseTo(1.3, 1);
  });
});

describe('closing the loop to the requests', () => {
  test('failed parts show on the request and go back to open; the request shows its build and ready date; the designer is e-mailed on failure and when done', async () => {
    const lab = await labWithCrew(running, 'loop');
    const plan = await queuedPlan(running, lab, [GEAR, CLIP], { name: 'Loop build' });
    const op = lab.operator.agent;
    const reqUrl = `/api/labs/${lab.labId}/requests/${plan.request.requestId}`;

    const waiting = (await lab.agent.get(reqUrl)).body;
    expect(waiting.builds).toHaveLength(1);
    expect(waiting.builds[0]).toMatchObject({ planId: plan.planId, planName: 'Loop build', status: 'queued', machine: { id: lab.machineId } });
    const queue = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body;
    // The queue's predicted breakout end (both are counted from the moment of asking: within a few seconds).
    const predicted = Date.parse(queue.plans.find((p: any) => p.planId === plan.planId).breakoutDoneAt);
    expect(Math.abs(Date.parse(waiting.builds[0].readyAt) - predicted)).toBeLessThan(10_000);
    expect(waiting.lines.map((l: any) => [l.plannedCount, l.printedCount, l.failedCount, l.stillToMakeCount])).toEqual([
      [12, 0, 0, 12],
      [6, 0, 0, 6],
    ]);

    await backdateApproval(running, plan.planId, 30 * HOUR);
    const start = Date.now() - 24 * HOUR;
    await op.post(`${plan.base}/run/advance`).send(startBody(plan.estimate, iso(start)));
    const runId = await runIdOf(op, plan.base);
    await op.post(`${plan.base}/run/advance`).send({ runId, to: 'cooling', at: iso(start + plan.estimate.print.printSeconds * 1000) });
    const br = await op.post(`${plan.base}/run/advance`).send({ runId, to: 'breakout' });
    expect(br.status).toBe(200);
    const mailBefore = running.mailer.caught!.length;
    const [gear, clip] = plan.request.lines;
    const fin = await op.post(`${plan.base}/run/advance`).send({
      runId,
      to: 'finishing',
      counts: [
        { requestLineId: gear.id, good: 9, failed: 3 },
        { requestLineId: clip.id, good: 6, failed: 0 },
      ],
    });
    expect(fin.status).toBe(200);
    const afterBreakout = (await lab.agent.get(reqUrl)).body;
    // planned / printed / failed / still to make: the three failed gears are off the build and open again.
    expect(afterBreakout.lines.map((l: any) => [l.partName, l.plannedCount, l.printedCount, l.failedCount, l.stillToMakeCount, l.openCount])).toEqual([
      ['Gear', 9, 0, 3, 12, 3],
      ['Clip', 6, 0, 0, 6, 0],
    ]);
    expect(afterBreakout.builds[0].lines.map((l: any) => [l.goodCount, l.failedCount])).toEqual([
      [9, 3],
      [6, 0],
    ]);
    await waitFor(() => running.mailer.caught!.slice(mailBefore).some((m) => m.subject === 'Parts failed in build Loop build, request Fixture request'));
    const mail = running.mailer.caught!.slice(mailBefore).find((m) => /Parts failed/.test(m.subject))!;
    // To the designer who filed the request (the fixture's request is filed by the lab's first user).
    expect(mail.to).toEqual([lab.email]);
    expect(mail.text).toMatch(/Gear: 3 failed of 12/);
    expect(mail.text).not.toMatch(/Clip/);
    const open = (await lab.agent.get(`/api/labs/${lab.labId}/plans/open-lines?materialId=${lab.materialId}`)).body;
    expect(open.find((l: any) => l.requestLineId === gear.id)).toMatchObject({ remaining: 3 });

    await op.post(`${plan.base}/run/advance`).send({ runId, to: 'done', finishingChecklist: FINISHED });
    const afterDone = (await lab.agent.get(reqUrl)).body;
    expect(afterDone.status).toBe('open');
    expect(afterDone.totals).toMatchObject({ quantity: 18, printed: 15, failed: 3, stillToMake: 3 });
    expect(afterDone.builds[0]).toMatchObject({ status: 'done' });
    expect(afterDone.builds[0].readyAt).not.toBeNull();

    // The three gears go into a second build; when it is done the request is done and the designer hears so.
    const again = await queuedPlan(running, lab, [], { name: 'Remake build', lines: [{ id: gear.id, quantity: 3 }] });
    {
      const mark = running.mailer.caught!.length;
      await op.post(`${again.base}/run/advance`).send(startBody(again.estimate));
      const id2 = await runIdOf(op, again.base);
      await op.post(`${again.base}/run/advance`).send({ runId: id2, to: 'cooling' });
      // A lead accepts a reading so the test need not wait for the cake.
      const r = await op.post(`${again.base}/run/readings`).send({ runId: id2, tempC: 30, where: 'outside' });
      await lab.agent.post(`${again.base}/run/readings/${r.body.readings[0].id}/accept`).send({ runId: id2, reason: 'Test' });
      await op.post(`${again.base}/run/advance`).send({ runId: id2, to: 'breakout' });
      await op.post(`${again.base}/run/advance`).send({ runId: id2, to: 'finishing', counts: [{ requestLineId: gear.id, good: 3, failed: 0 }] });
      await op.post(`${again.base}/run/advance`).send({ runId: id2, to: 'done', finishingChecklist: FINISHED });
      const finalReq = (await lab.agent.get(reqUrl)).body;
      expect(finalReq.status).toBe('done');
      expect(finalReq.totals).toMatchObject({ printed: 18, stillToMake: 0 });
      await waitFor(() => running.mailer.caught!.slice(mark).some((m) => m.subject === `Request done: ${afterDone.title}`));
    }
  });
});

/** Caught mail arrives through a local SMTP server: wait for it a little, then say what did arrive. */
async function waitFor(cond: () => boolean) {
  for (let i = 0; i < 200 && !cond(); i++) await new Promise((r) => setTimeout(r, 100));
  if (!cond()) throw new Error(`mail not caught; subjects: ${running.mailer.caught!.map((m) => m.subject).join(' | ')}`);
}
