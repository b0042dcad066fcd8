import request from 'supertest';
import type { Page } from 'playwright-core';
import { newPage, PHONE, screenshot, serveAndLaunch, signIn, WIDE, type Served } from '../helpers/browser';
import { createPlan, gridLayout, makeRequest, planInstance } from '../helpers/plans';
import { backdateApproval, startBody } from '../api/runs-fixtures';
import { DEMO_PASSWORD } from '../../server/db/seeders/demo';
import { demoMachines } from '../../shared/demo/profiles';

jest.setTimeout(300_000);

const tag = Math.random().toString(36).slice(2, 7);
const HOUR = 3_600_000;
const iso = (ms: number) => new Date(Math.round(ms)).toISOString();

let served: Served;
let owner: ReturnType<typeof request.agent>;
/** The demo lab asks a second person to approve: the owner plans, the lead approves. */
let approver: ReturnType<typeof request.agent>;
let labId = '';
let machineId = '';
let earlier: Awaited<ReturnType<typeof approvedPlan>>;
let cooling: Awaited<ReturnType<typeof approvedPlan>>;
let next: Awaited<ReturnType<typeof approvedPlan>>;
let earlierRunId = '';
let coldReadingId = '';

async function apiAs(email: string) {
  const a = request.agent(served.running.app);
  a.set('Origin', served.baseUrl);
  const res = await a.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`);
  return a;
}

const ok = <R extends { status: number; body: any }>(res: R, what: string): R => {
  if (res.status !== 200 && res.status !== 201) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
  return res;
};

/** A plan of its own request in the given material on the test's machine, packed on a grid, chosen and approved. */
async function approvedPlan(name: string, materialIndex: number, parts: Array<{ name: string; sizeMm: [number, number, number]; quantity: number }>) {
  const me = await owner.get('/api/me');
  const material = (await owner.get(`/api/labs/${labId}/materials`)).body[materialIndex];
  const req = await makeRequest(served.running, labId, me.body.user.id, material.id, parts, { title: `${name} request`, dueDate: '2027-09-01' });
  const plan = await createPlan(owner as never, labId, machineId, material.id, req.lines, name);
  const base = `/api/labs/${labId}/plans/${plan.id}`;
  const machine = (await owner.get(`/api/labs/${labId}/machines/${machineId}`)).body;
  const instance = planInstance(plan.view, machine, material);
  const layout = ok(await owner.post(`${base}/layouts`).send({ instance, result: gridLayout(instance) }), 'layout');
  ok(await owner.post(`${base}/layouts/${layout.body.id}/choose`), 'choose');
  ok(await owner.post(`${base}/submit`), 'submit');
  ok(await approver.post(`${base}/review`).send({ decision: 'approve' }), 'approve');
  return { planId: plan.id as string, base, requestId: req.requestId as string, lines: req.lines, estimate: layout.body.estimate, materialName: material.name as string };
}

async function waitForText(page: Page, testId: string, pattern: RegExp) {
  await page.getByTestId(testId).first().waitFor();
  const until = Date.now() + 15_000;
  let text = '';
  while (Date.now() < until) {
    text = (await page.getByTestId(testId).first().textContent()) ?? '';
    if (pattern.test(text)) return text;
    await page.waitForTimeout(250);
  }
  throw new Error(`${testId} reads "${text}", not ${pattern}`);
}

async function scrollToTop(page: Page, testId: string) {
  await page.evaluate(`document.querySelector('[data-testid="${testId}"]').scrollIntoView({ block: 'start' })`);
  await page.waitForTimeout(200);
}

beforeAll(async () => {
  served = await serveAndLaunch();
  owner = await apiAs('owner@tinkerfin.example');
  approver = await apiAs('lead@tinkerfin.example');
  labId = (await owner.get('/api/me')).body.labs[0].id;
  const m = ok(await owner.post(`/api/labs/${labId}/machines`).send({ ...demoMachines[0], name: `Plover ${tag}` }), 'machine');
  machineId = m.body.id;

  // A build run through days ago, with two of its clips failed at breakout: the calibration lists it, its request counts them.
  earlier = await approvedPlan(`Earlier build ${tag}`, 0, [{ name: `Clip ${tag}`, sizeMm: [20, 12, 8], quantity: 10 }]);
  const est = earlier.estimate;
  const start = Date.now() - 10 * 24 * HOUR;
  await backdateApproval(served.running, earlier.planId, 11 * 24 * HOUR);
  ok(await owner.post(`${earlier.base}/run/advance`).send(startBody(est, iso(start))), 'start');
  earlierRunId = (await owner.get(`${earlier.base}/run`)).body.id;
  const printEnd = start + est.print.printSeconds * 1000;
  const breakout = printEnd + est.cooling.coolingSeconds * 1000;
  ok(await owner.post(`${earlier.base}/run/advance`).send({ runId: earlierRunId, to: 'cooling', at: iso(printEnd) }), 'cooling');
  ok(await owner.post(`${earlier.base}/run/advance`).send({ runId: earlierRunId, to: 'breakout', at: iso(breakout) }), 'breakout');
  const counts = earlier.lines.map((l: { id: string }) => ({ requestLineId: l.id, good: 8, failed: 2 }));
  ok(await owner.post(`${earlier.base}/run/advance`).send({ runId: earlierRunId, to: 'finishing', at: iso(breakout + HOUR / 4), counts }), 'finishing');
  ok(
    await owner.post(`${earlier.base}/run/advance`).send({ runId: earlierRunId, to: 'done', at: iso(breakout + HOUR / 2), finishingChecklist: { powderRemoved: true, blasted: true, inspected: true } }),
    'done',
  );

  // A build cooling now, with a reading no cake can show minutes after its print; and the next build in another material.
  cooling = await approvedPlan(`Cooling build ${tag}`, 0, [{ name: `Bracket ${tag}`, sizeMm: [40, 30, 12], quantity: 6 }]);
  next = await approvedPlan(`Next build ${tag}`, 1, [{ name: `Cover ${tag}`, sizeMm: [50, 40, 6], quantity: 4 }]);
  ok(await owner.post(`${cooling.base}/run/advance`).send(startBody(cooling.estimate)), 'start now');
  const runId = (await owner.get(`${cooling.base}/run`)).body.id;
  ok(await owner.post(`${cooling.base}/run/advance`).send({ runId, to: 'cooling' }), 'cooling now');
  const cold = ok(await owner.post(`${cooling.base}/run/readings`).send({ runId, tempC: 38, where: 'machine' }), 'reading');
  coldReadingId = cold.body.readings[0].id;
  expect(cold.body.readings[0].check.status).toBe('unexplained');
});

afterAll(async () => {
  await served?.close();
});

describe('the numbers and the floor, as a lead sees them', () => {
  test('on a phone: the floor card shows the material and the doubted reading, and the lead accepts it with a reason', async () => {
    const page = await newPage(served, PHONE);
    await signIn(page, 'owner@tinkerfin.example');
    await page.goto(`/floor/${machineId}`);
    const card = page.getByTestId(`run-card-${cooling.planId}`);
    await card.waitFor();
    expect(await card.getByTestId('run-machine-material').textContent()).toContain(cooling.materialName);
    // The cooling build started before the next queued one: its card is first, the next build's after it
    // (wait for both cards: the queued one may draw a moment after the running one).
    await page.getByTestId(`run-card-${next.planId}`).waitFor();
    const order = await page.evaluate(`[...document.querySelectorAll('[data-testid^="run-card-"]')].map((e) => e.getAttribute('data-testid'))`);
    expect(order).toEqual([`run-card-${cooling.planId}`, `run-card-${next.planId}`]);
    await waitForText(page, `reading-${coldReadingId}-doubt`, /Colder than the cake can be by then/);
    expect(await card.getByTestId('run-breakout').getAttribute('aria-disabled')).toBe('true');
    // Where the chamber is: one answer of two, shown as a radio group (not check boxes), in the machine at first.
    expect(await card.getByRole('radiogroup', { name: 'Where the chamber is' }).getByRole('radio').count()).toBe(2);
    expect(await card.getByTestId('reading-where-machine').getAttribute('aria-checked')).toBe('true');
    expect(await card.getByTestId('reading-where-outside').getAttribute('aria-checked')).toBe('false');
    await scrollToTop(page, 'reading-form');
    await screenshot(page, 'floor-reading-doubted-phone');

    await card.getByTestId(`reading-${coldReadingId}-accept`).click();
    expect(await card.getByTestId(`reading-${coldReadingId}-question`).textContent()).toContain(`"Cooling build ${tag}"`);
    await card.getByTestId(`reading-${coldReadingId}-reason`).fill('Cake was spread on the cooling table; probe checked against the reference');
    await screenshot(page, 'floor-reading-accept-phone');
    await card.getByTestId(`reading-${coldReadingId}-accept-confirm`).click();
    await waitForText(page, `reading-${coldReadingId}`, /accepted by .*: Cake was spread on the cooling table/);
    // Accepted, the reading counts: at 38 °C, below the handling temperature, breakout is open.
    await page.waitForSelector(`[data-testid="run-breakout"]:not([aria-disabled="true"])`);
    await scrollToTop(page, 'reading-form');
    await screenshot(page, 'floor-reading-accepted-phone');
    await page.context().close();
  });

  test('wide: the queue shows each build\'s material and warns of the change; the lead leaves a run out of the calibration with a reason', async () => {
    const page = await newPage(served, WIDE);
    await signIn(page, 'owner@tinkerfin.example');
    await page.goto(`/queue?machine=${machineId}`);
    await page.getByTestId(`queue-${machineId}`).waitFor();
    expect(await page.getByTestId('queue-item-0-name').textContent()).toBe(`Next build ${tag}`);
    expect(await page.getByTestId('queue-item-0-material').textContent()).toBe(next.materialName);
    expect(await page.getByTestId('queue-current-material').textContent()).toBe(cooling.materialName);
    expect(await page.getByTestId('queue-item-0-material-change').textContent()).toContain(`${next.materialName} after ${cooling.materialName}`);
    // The time axis: round ticks that suit the span, the first one dated with the month named, and where now is.
    const ticks = await page.getByTestId('queue-axis').innerText();
    expect(ticks).toMatch(/\b\d{1,2} (Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec) \d{2}:\d{2}\b/);
    expect(ticks.split('\n').filter((l) => /\d{2}:\d{2}|[A-Z][a-z]{2} \d/.test(l)).length).toBeGreaterThanOrEqual(3);
    expect(await page.getByTestId('queue-now').innerText()).toMatch(/^Now \d{1,2} [A-Z][a-z]{2} \d{2}:\d{2}/);
    expect(await page.getByTestId('queue-item-0-start').textContent()).toMatch(/^\d{1,2} [A-Z][a-z]{2} \d{2}:\d{2}$/);
    await screenshot(page, 'queue-material-change-wide');

    await page.getByTestId('queue-calibration-toggle').click();
    const row = page.getByTestId(`calibration-run-${earlierRunId}`);
    await row.waitFor();
    await page.getByTestId('calibration-chart').waitFor();
    expect(await page.getByTestId(`calibration-run-${earlierRunId}-state`).textContent()).toBe('Counts');
    await row.getByRole('button', { name: `Show Earlier build ${tag} on the chart` }).click();
    await waitForText(page, 'calibration-readout', new RegExp(`Earlier build ${tag}: printed .* against .* estimated \\(× 1\\.00\\)`));
    await page.getByTestId(`calibration-run-${earlierRunId}-exclude`).click();
    await page.getByTestId(`calibration-run-${earlierRunId}-reason`).fill('Door opened during the print for a jammed recoater');
    await page.getByTestId(`calibration-run-${earlierRunId}-confirm`).click();
    await waitForText(page, `calibration-run-${earlierRunId}-state`, /^Left out$/);
    expect(await page.getByTestId(`calibration-run-${earlierRunId}-why`).textContent()).toMatch(/Left out by .*: Door opened during the print/);
    await scrollToTop(page, 'calibration-panel');
    await screenshot(page, 'queue-calibration-excluded-wide');
    const calibration = (await owner.get(`/api/labs/${labId}/machines/${machineId}/calibration`)).body;
    expect(calibration.recordedRuns[0]).toMatchObject({ runId: earlierRunId, counted: false, choice: { choice: 'exclude' } });
    await page.context().close();
  });

  test('on a phone and wide: the request pages show planned, printed, failed and still to make, the builds and the expected ready date', async () => {
    for (const [viewport, name] of [
      [PHONE, 'phone'],
      [WIDE, 'wide'],
    ] as const) {
      const page = await newPage(served, viewport);
      await signIn(page, 'owner@tinkerfin.example');
      await page.goto(`/requests/${earlier.requestId}`);
      await page.getByTestId('request-summary').waitFor();
      // 10 clips: 8 printed good, 2 failed and open again, so 2 still to make and none in a build.
      expect(await page.getByTestId('request-total-printed').textContent()).toBe('8');
      expect(await page.getByTestId('request-total-failed').textContent()).toBe('2');
      expect(await page.getByTestId('request-total-still').textContent()).toBe('2');
      expect(await page.getByTestId('request-ready').textContent()).toBe('2 not in a build yet');
      await page.getByTestId(`request-build-${earlier.planId}`).getByText(/8 good, 2 failed/).waitFor();
      await screenshot(page, `request-failed-${name}`);

      await page.goto(`/requests/${cooling.requestId}`);
      await page.getByTestId('request-summary').waitFor();
      expect(await page.getByTestId('request-total-still').textContent()).toBe('6');
      // Cooling now: the queue's predicted end of its breakout is the ready date.
      expect(await page.getByTestId('request-ready').textContent()).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}$/);
      await page.getByTestId(`request-build-${cooling.planId}`).getByText(/parts out about/).waitFor();
      await screenshot(page, `request-ready-${name}`);
      await page.context().close();
    }
  });
});
