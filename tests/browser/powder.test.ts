import request from 'supertest';
import type { Page } from 'playwright-core';
import { ARTIFACTS, newPage, openSection, PHONE, screenshot, serveAndLaunch, signIn, WIDE, type Served } from '../helpers/browser';
import { PASSWORD, startTestApp } from '../helpers/app';
import { labWithCrew, queuedPlan, startBody } from '../api/runs-fixtures';
import { materialDetailView, planPowderView } from '../../shared/schemas/powder';
import { demoMaterials } from '../../shared/demo/profiles';

jest.setTimeout(300_000);

let served: Served;
type Lab = Awaited<ReturnType<typeof labWithCrew>>;
let lab: Lab;
/** A lab that queued a build before it recorded any powder: its material is needed but not tracked. */
let fresh: Lab;
let freshNeedKg = 0;
let twinId = '';
let planA = '';
let planB = '';
let planC = '';
let loadA = { freshPowderKg: 0, reusedPowderKg: 0 };
let loadB = { freshPowderKg: 0, reusedPowderKg: 0 };
let oldKg = 0;

const day = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);
const PARTS = [
  { name: 'Powder bracket', sizeMm: [60, 40, 25] as [number, number, number], quantity: 8 },
  { name: 'Powder clip', sizeMm: [20, 12, 8] as [number, number, number], quantity: 12 },
];

/** Reads the API the way the screens do, through the served app (reads need no Origin). */
async function read(path: string) {
  const a = request.agent(served.running.app);
  const res = await a.post('/api/auth/sign-in').send({ email: lab.email, password: PASSWORD }).set('Origin', served.baseUrl);
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status}`);
  return (await a.get(`/api/labs/${lab.labId}${path}`)).body;
}

async function scrollTo(page: Page, testId: string) {
  await page.evaluate(`document.querySelector('[data-testid="${testId}"]').scrollIntoView({ block: 'start' })`);
  await page.waitForTimeout(200);
}

beforeAll(async () => {
  served = await serveAndLaunch();
  // The fixtures go through an app of their own on the same database: the
  // served one only takes writes from the browser's origin.
  const running = await startTestApp();
  try {
    await fixtures(running);
  } finally {
    await running.close();
  }
});

async function fixtures(running: Awaited<ReturnType<typeof startTestApp>>) {
  lab = await labWithCrew(running, 'powder-b');
  fresh = await labWithCrew(running, 'powder-u');
  freshNeedKg = (await queuedPlan(running, fresh, PARTS, { name: 'First build' })).estimate.powder.freshPowderKg;
  const twin = await lab.agent.post(`/api/labs/${lab.labId}/machines`).send({ ...lab.machine, name: 'Second chamber' });
  if (twin.status !== 201) throw new Error(`machine failed: ${JSON.stringify(twin.body)}`);
  twinId = twin.body.id;
  const b = await queuedPlan(running, { ...lab, machineId: twinId }, PARTS, { name: 'Bracket batch' });
  const a = await queuedPlan(running, lab, PARTS, { name: 'Clip batch' });
  const c = await queuedPlan(running, lab, PARTS, { name: 'Next week batch' });
  planA = a.planId;
  planB = b.planId;
  planC = c.planId;
  loadA = startBody(a.estimate);
  loadB = startBody(b.estimate);
  const post = async (path: string, body: object, who = lab.agent) => {
    const res = await who.post(`/api/labs/${lab.labId}${path}`).send(body);
    if (res.status >= 300) throw new Error(`${path}: ${res.status} ${JSON.stringify(res.body)}`);
    return res.body;
  };
  // The oldest lot covers build B and half of build A; the newer one the rest.
  oldKg = Math.round((loadB.freshPowderKg + loadA.freshPowderKg / 2) * 10) / 10;
  await post('/powder/lots', { materialId: lab.materialId, code: 'OLD-01', kg: oldKg, receivedOn: day(-60), makerLot: 'B 2231-7' });
  await post('/powder/lots', { materialId: lab.materialId, code: 'NEW-02', kg: 40, receivedOn: day(-5), makerLot: 'B 2290-1', expiresOn: day(300) });
  await post('/powder/movements', { kind: 'adjusted', materialId: lab.materialId, countedKg: Math.ceil((loadA.reusedPowderKg + loadB.reusedPowderKg) * 15) / 10, reason: 'first count of the reused bin' });
  const policy = await lab.agent.put(`/api/labs/${lab.labId}/powder/materials/${lab.materialId}/policy`).send({ maxMeanAgeBuilds: 3, minRefreshRatio: 0.3, minMvrCm3Per10Min: 18, reorderLevelKg: 45, leadTimeDays: 14 });
  if (policy.status !== 200) throw new Error(`policy: ${policy.status} ${JSON.stringify(policy.body)}`);
  await post('/powder/checks', { materialId: lab.materialId, mvrCm3Per10Min: 23.5, testTempC: 235, testLoadKg: 5 });
  // Build B on the second machine runs to breakout through the API.
  const op = lab.operator.agent;
  const base = `/api/labs/${lab.labId}/plans/${planB}`;
  const s = await op.post(`${base}/run/advance`).send(loadB);
  if (s.status !== 200) throw new Error(`start B: ${s.status} ${JSON.stringify(s.body)}`);
  await op.post(`${base}/run/advance`).send({ runId: s.body.id, to: 'cooling' });
  const r = await op.post(`${base}/run/readings`).send({ runId: s.body.id, tempC: 30, where: 'outside' });
  await lab.agent.post(`${base}/run/readings/${r.body.readings[0].id}/accept`).send({ runId: s.body.id, reason: 'Test cake, cooled by hand' });
  const br = await op.post(`${base}/run/advance`).send({ runId: s.body.id, to: 'breakout' });
  if (br.status !== 200) throw new Error(`breakout B: ${br.status} ${JSON.stringify(br.body)}`);
}

afterAll(async () => {
  await served?.close();
});

describe('an operator on a phone (390 x 844)', () => {
  test('loads a build with the proposed lots, sees a correction that does not add up, starts it, and records the powder back from another build', async () => {
    const page = await newPage(served, PHONE);
    await signIn(page, lab.operator.email, PASSWORD);
    await openSection(page, 'floor');
    await page.getByTestId(`floor-machine-${lab.machineId}`).click();
    const card = page.getByTestId(`run-card-${planA}`);
    await card.getByTestId('floor-powder').waitFor();
    // Oldest lot first: what is left of OLD-01 after build B, then NEW-02.
    const oldLeft = Math.round((oldKg - loadB.freshPowderKg) * 10) / 10;
    expect(await card.getByTestId('floor-powder-draw-OLD-01').textContent()).toBe(`Lot OLD-01: ${oldLeft.toFixed(2)} kg`);
    await card.getByTestId('floor-powder-draw-NEW-02').waitFor();
    // The stock's line says the same amounts as the card's figures above it (both rounded up to the tenth).
    const plan = (await card.getByTestId('floor-powder-plan').textContent()) ?? '';
    expect(plan).toContain(`loads ${await card.getByTestId('need-fresh').textContent()} fresh and ${await card.getByTestId('need-reused').textContent()} reused`);
    // One tap loads the plan's amounts into the fields.
    await card.getByTestId('floor-powder-use').click();
    expect(await card.getByTestId('load-fresh').inputValue()).toBe(String(loadA.freshPowderKg));
    expect(await card.getByTestId('load-reused').inputValue()).toBe(String(loadA.reusedPowderKg));
    await card.getByTestId('check-chamberInPlace').click();
    await card.getByTestId('check-opticalWindowClean').click();
    await scrollTo(page, 'floor-powder');
    await screenshot(page, 'powder-floor-proposed-lots-phone');

    // The operator took it all from the new lot, but typed too little: the card says so and Start waits.
    await card.getByTestId('floor-powder-change').click();
    await card.getByTestId('floor-powder-lot-OLD-01').fill('');
    await card.getByTestId('floor-powder-lot-NEW-02').fill(String(Math.max(0.1, loadA.freshPowderKg - 0.1).toFixed(1)));
    await card.getByTestId('floor-powder-short').getByText('The lots add up to', { exact: false }).waitFor();
    await page.waitForSelector('[data-testid="run-start"][aria-disabled="true"]');
    await scrollTo(page, 'floor-powder-lots');
    await screenshot(page, 'powder-floor-lots-corrected-phone');
    await card.getByTestId('floor-powder-lot-NEW-02').fill(String(loadA.freshPowderKg));
    await page.waitForSelector('[data-testid="floor-powder-short"]', { state: 'detached' });
    await card.getByTestId('run-start').click();
    await card.getByTestId('run-start-confirm').click();
    await card.getByTestId('stage-printing').waitFor();
    // What was really loaded is on the record: the whole fresh amount from NEW-02.
    const a = planPowderView.parse(await read(`/powder/plans/${planA}`));
    expect(a.run!.draws).toEqual([{ lotId: expect.any(String), code: 'NEW-02', kg: loadA.freshPowderKg }]);
    expect(a.run!.reusedKg).toBeCloseTo(loadA.reusedPowderKg, 9);

    // After breakout of build B: the sieved powder back, the caked rest thrown away.
    await openSection(page, 'floor');
    await page.getByTestId(`floor-machine-${twinId}`).click();
    const cardB = page.getByTestId(`run-card-${planB}`);
    await cardB.getByTestId('floor-recovery').waitFor();
    const back = Math.round(loadB.reusedPowderKg * 0.8 * 10) / 10;
    await cardB.getByTestId('recovered-kg').fill(String(back));
    await cardB.getByTestId('discarded-kg').fill('0.3');
    await cardB.getByTestId('recovery-submit').click();
    await cardB.getByTestId('floor-recovery-done').waitFor();
    expect(await cardB.getByTestId('floor-recovery-done').textContent()).toContain(`${back.toFixed(1)} kg sieved back`);
    await scrollTo(page, 'floor-recovery');
    await screenshot(page, 'powder-floor-recovery-phone');
    const b = planPowderView.parse(await read(`/powder/plans/${planB}`));
    expect(b.run!.recovery).toMatchObject({ recoveredKg: back, discardedKg: 0.3 });
    await page.context().close();
  });
});

describe('a lead on a wide screen (1440 x 900)', () => {
  test('reads the stock chart with the forecast, lots, movements, mean age and melt-flow, receives a lot and records a count', async () => {
    const page = await newPage(served, WIDE);
    await signIn(page, lab.email, PASSWORD);
    // About 40 kg fresh against a reorder level of 45 kg: home asks the lead to reorder, and leads there.
    const reorder = page.getByTestId(`home-powder-${lab.materialId}`);
    await reorder.waitFor();
    expect(await reorder.textContent()).toMatch(/Reorder.*fresh on hand; the queue takes it below 45 kg/);
    await reorder.screenshot({ path: `${ARTIFACTS}/powder-home-reorder-wide.png` });
    await reorder.click();
    await page.getByTestId('screen-powder-material').waitFor();
    const before = materialDetailView.parse(await read(`/powder/materials/${lab.materialId}`));
    expect(before.forecast.points.length).toBe(2); // now, and after the queued "Next week batch"
    expect(await page.getByTestId('powder-fresh').textContent()).toContain(`${before.freshKg.toFixed(1)} kg`);
    expect(await page.getByTestId('powder-age').textContent()).toContain(before.reusedMeanAgeBuilds.toFixed(1));
    await page.getByTestId('lot-row-OLD-01').waitFor();
    await page.getByTestId('lot-row-NEW-02').waitFor();
    await page.getByTestId('movement-list').getByText('Recovered after breakout').waitFor();
    await page.getByTestId('melt-flow').getByText('23.5', { exact: false }).first().waitFor();
    // The chart reads out the stock now; pointing at its right end reads the forecast.
    const chart = page.getByTestId('stock-chart');
    await chart.getByText('Fresh ', { exact: false }).first().waitFor();
    const box = (await chart.boundingBox())!;
    await page.mouse.move(box.x + box.width - 12, box.y + 60);
    await page.getByTestId('stock-chart-readout').getByText('Fresh, forecast', { exact: false }).waitFor();
    await screenshot(page, 'powder-material-wide');

    // A delivery arrives.
    await page.getByTestId('movement-mode-receive').click();
    await page.getByTestId('lot-code').fill('DLV-03');
    await page.getByTestId('lot-maker').fill('B 2301-4');
    await page.getByTestId('lot-kg').fill('25');
    await page.getByTestId('lot-received-on').fill(day(0));
    await page.getByTestId('movement-submit').click();
    await page.getByTestId('movement-done').waitFor();
    await page.getByTestId('lot-row-DLV-03').waitFor();
    // The reused bin is weighed.
    await page.getByTestId('movement-mode-count').click();
    await page.getByTestId('target-reused').click();
    await page.getByTestId('movement-kg').fill('12.5');
    await page.getByTestId('movement-reason').fill('weekly count');
    await page.getByTestId('movement-submit').click();
    await page.getByTestId('movement-done').waitFor();
    await page.getByTestId('movement-list').getByText('weekly count', { exact: false }).waitFor();
    const after = materialDetailView.parse(await read(`/powder/materials/${lab.materialId}`));
    expect(after.freshKg).toBeCloseTo(before.freshKg + 25, 9);
    expect(after.reusedKg).toBe(12.5);
    await page.waitForFunction(`document.querySelector('[data-testid="powder-reused"]')?.textContent.includes('12.5 kg')`);
    // 64.6 kg is above the reorder level again: the notice is gone.
    expect(after.forecast.shortage).toBe(false);
    await page.waitForSelector('[data-testid="powder-reorder"]', { state: 'detached' });
    await screenshot(page, 'powder-material-after-count-wide');
    await scrollTo(page, 'movement-form');
    await screenshot(page, 'powder-movement-form-wide');

    // A planner's view of the next build: what it takes and what it leaves.
    await page.goto(`/plans/${planC}`);
    await page.getByTestId('plan-powder').waitFor();
    await page.getByTestId('plan-powder-fresh-left').waitFor();
    await scrollTo(page, 'plan-powder');
    await screenshot(page, 'powder-plan-editor-wide');
    await page.context().close();
  });
});

describe('a lead on a phone (390 x 844)', () => {
  test('a powder with no stock recorded yet reads as not kept (dashes and why), not as 0.0 kg on hand', async () => {
    const added = request.agent(served.running.app);
    const signedIn = await added.post('/api/auth/sign-in').send({ email: lab.email, password: PASSWORD }).set('Origin', served.baseUrl);
    expect(signedIn.status).toBe(200);
    const made = await added
      .post(`/api/labs/${lab.labId}/materials`)
      .set('Origin', served.baseUrl)
      .send({ ...demoMaterials[0], name: 'Untracked powder' });
    expect(made.status).toBe(201);
    const page = await newPage(served, PHONE);
    await signIn(page, lab.email, PASSWORD);
    await page.goto('/powder');
    const card = page.getByTestId(`powder-material-${made.body.id}`);
    await card.waitFor();
    const text = (await card.innerText()).replace(/\s+/g, ' ');
    expect(text).toContain('Not tracked yet');
    expect(text).toContain('The lab keeps no stock of Untracked powder in Sinterstack yet');
    expect(text).not.toContain('0.0 kg');
    // The tracked powder beside it keeps its figures.
    await expect(page.getByTestId(`powder-material-${lab.materialId}`).innerText()).resolves.toMatch(/\d+\.\d kg/);
    await card.click();
    await page.getByTestId('powder-untracked').waitFor();
    await expect(page.getByTestId('powder-fresh').innerText()).resolves.toMatch(/–/);
    await expect(page.getByTestId('powder-reused').innerText()).resolves.toMatch(/–/);
    // No ledger, no chart of it.
    expect(await page.getByTestId('stock-chart').count()).toBe(0);
    await screenshot(page, 'powder-untracked-phone');
    await page.context().close();
  });

  test('home lists a powder the queue needs that the lab keeps no stock of, and leads to it', async () => {
    const page = await newPage(served, PHONE);
    await signIn(page, fresh.email, PASSWORD);
    const row = page.getByTestId(`home-powder-${fresh.materialId}`);
    await row.waitFor();
    const text = (await row.innerText()).replace(/\s+/g, ' ');
    expect(text).toContain('Not tracked');
    expect(text).toContain(`The queue needs ${freshNeedKg.toFixed(1)} kg fresh, and no stock of it is kept yet`);
    // Neither a reorder date nor 0.0 kg on hand: the stock is unknown, not empty.
    expect(text).not.toMatch(/Reorder|0\.0 kg fresh on hand/);
    await row.screenshot({ path: `${ARTIFACTS}/powder-home-untracked-phone.png` });
    await row.click();
    await page.getByTestId('powder-untracked').waitFor();
    await page.context().close();
  });
});
