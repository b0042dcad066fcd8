import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { ARTIFACTS, newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { DEMO_PASSWORD } from '../../server/db/seeders/demo';
import { PASSWORD, startTestApp } from '../helpers/app';
import { createPlan, labWithProfiles, makeRequest } from '../helpers/plans';
import { queuedPlan, startBody } from '../api/runs-fixtures';

jest.setTimeout(240_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

type ApiRequest = {
  id: string;
  title: string;
  dueDate: string;
  priority: string;
  createdBy: { id: string } | null;
  lines: { id: string; quantity: number; plannedCount: number; printedCount: number }[];
  totals: { quantity: number; planned: number; printed: number };
};


/** Reads the API as the signed-in page does (a string, so the test's transpiler leaves the page's code alone). */
async function apiGet<T>(page: Page, path: string): Promise<T> {
  return (await page.evaluate(`fetch(${JSON.stringify(`/api${path}`)}).then((r) => r.json())`)) as T;
}

async function openRequests(page: Page) {
  const me = await apiGet<{ user: { id: string }; labs: { id: string }[] }>(page, '/me');
  const list = await apiGet<{ items: ApiRequest[] }>(page, `/labs/${me.labs[0].id}/requests?status=open&sort=dueDate&pageSize=200`);
  return { me, items: list.items };
}

/** The test ids of the rows a section shows, in screen order. */
async function rowIds(page: Page, section: string, prefix: string): Promise<string[]> {
  const selector = `[data-testid="home-section-${section}"] [data-testid^="${prefix}"]`;
  const ids = (await page.evaluate(`Array.from(document.querySelectorAll(${JSON.stringify(selector)})).map((e) => e.getAttribute('data-testid') || '')`)) as string[];
  return ids.filter((id) => /^[^-]+-[^-]+-[0-9a-f-]{36}$/.test(id)).map((id) => id.slice(prefix.length));
}

const unplanned = (r: ApiRequest) => r.lines.reduce((n, l) => n + Math.max(l.quantity - l.plannedCount, 0), 0);

/**
 * Other browser tests plan the demo requests at the same time, so the screen
 * is compared with the API a few times until both agree.
 */
async function settle(page: Page, check: () => Promise<void>) {
  let last: unknown;
  for (let i = 0; i < 4; i++) {
    try {
      await check();
      return;
    } catch (e) {
      last = e;
      await page.reload();
      await page.getByTestId('screen-home').waitFor();
    }
  }
  throw last;
}

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('home on a %s', (name, viewport) => {
  test('the demo planner sees the open requests still to plan, soonest due first, with what is unplanned', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'planner@tinkerfin.example', DEMO_PASSWORD);
    const section = page.getByTestId('home-section-planner');
    await section.getByTestId('home-planner-count').waitFor();
    await settle(page, async () => {
      await page.getByTestId('home-planner-count').waitFor();
      const { items } = await openRequests(page);
      const expected = items.filter((r) => unplanned(r) > 0);
      expect(expected.length).toBeGreaterThan(0);
      expect(await rowIds(page, 'planner', 'home-toplan-')).toEqual(expected.map((r) => r.id));
      for (const r of expected) {
        expect(await page.getByTestId(`home-toplan-${r.id}-open`).textContent()).toBe(unplanned(r).toLocaleString('en-US'));
      }
    });
    // The demo designer's three requests were filed for the planner.
    for (const title of ['Gripper v3 prototypes', 'Sensor rig housings', 'Field repair kit']) {
      const { items } = await openRequests(page);
      const r = items.find((x) => x.title === title);
      if (r && unplanned(r) > 0) await section.getByText(title).first().waitFor();
    }
    // A planner holds no lead or designer work on home.
    expect(await page.getByTestId('home-section-lead').count()).toBe(0);
    expect(await page.getByTestId('home-section-designer').count()).toBe(0);
    await screenshot(page, `home-planner-${name}`);

    const first = (await rowIds(page, 'planner', 'home-toplan-'))[0];
    await page.getByTestId(`home-toplan-${first}`).click();
    await page.waitForURL(new RegExp(`/requests/${first}$`));
    await page.context().close();
  });

  test('the demo designer sees their open requests with due date, priority and each line planned and printed', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'designer@tinkerfin.example', DEMO_PASSWORD);
    await page.getByTestId('home-designer-count').waitFor();
    await settle(page, async () => {
      await page.getByTestId('home-designer-count').waitFor();
      const { me, items } = await openRequests(page);
      const mine = items.filter((r) => r.createdBy?.id === me.user.id);
      expect(mine.map((r) => r.title)).toEqual(expect.arrayContaining(['Gripper v3 prototypes', 'Sensor rig housings', 'Field repair kit']));
      expect(await rowIds(page, 'designer', 'home-request-')).toEqual(mine.map((r) => r.id));
      for (const r of mine) {
        const row = page.getByTestId(`home-request-${r.id}`);
        expect(await row.textContent()).toContain(r.title);
        expect(await page.getByTestId(`home-request-${r.id}-due`).textContent()).toContain(r.dueDate);
        expect(await row.textContent()).toContain(r.priority[0].toUpperCase() + r.priority.slice(1));
        for (const l of r.lines.slice(0, 5)) {
          expect(await page.getByTestId(`home-request-line-${l.id}`).textContent()).toContain(`${l.printedCount}/${l.plannedCount}/${l.quantity}`);
        }
      }
    });
    expect(await page.getByTestId('home-section-planner').count()).toBe(0);
    await page.getByTestId('home-section-late').waitFor();
    await screenshot(page, `home-designer-${name}`);
    await page.context().close();
  });
});

test('a member with every role sees plans to review, plans sent back, drafts, the next run and late requests, each opening its work', async () => {
  // The fixtures go through an app of their own on the same database: the
  // served one only takes writes from the browser's origin.
  const running = await startTestApp();
  const lab = await labWithProfiles(running, 'home');
  const day = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);
  const toPlan = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [
    { name: 'Home hinge', sizeMm: [30, 20, 8], quantity: 14 },
    { name: 'Home clip', sizeMm: [12, 10, 6], quantity: 9 },
  ], { title: 'Hinges for the demo rover', dueDate: day(9), priority: 'high' });
  const late = await queuedPlan(running, lab, [{ name: 'Late bracket', sizeMm: [40, 30, 20], quantity: 4 }], { name: 'Bracket build', dueDate: day(-1) });
  // The late build goes on the machine; the next one waits in the queue.
  const started = await lab.agent.post(`${late.base}/run/advance`).send(startBody(late.estimate));
  expect(started.status).toBe(200);
  const next = await queuedPlan(running, lab, [{ name: 'Next clip', sizeMm: [12, 10, 6], quantity: 10 }], { name: 'Clip build', dueDate: day(20) });
  const review = await queuedPlan(running, lab, [{ name: 'Review gear', sizeMm: [24, 24, 10], quantity: 6 }], { name: 'Gear build', dueDate: day(6), approve: false });
  const back = await queuedPlan(running, lab, [{ name: 'Back housing', sizeMm: [60, 40, 30], quantity: 2 }], { name: 'Housing build', dueDate: day(8), approve: false });
  const sendBack = await lab.agent.post(`${back.base}/review`).send({ decision: 'changes_requested', comment: 'Turn the housings open side up.' });
  expect(sendBack.status).toBe(200);
  const draftReq = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [{ name: 'Draft guide', sizeMm: [50, 8, 8], quantity: 5 }], { title: 'Cable guides', dueDate: day(15) });
  const draft = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, draftReq.lines, 'Guide build');
  await running.close();

  for (const [name, viewport] of [['phone', PHONE], ['wide', WIDE]] as const) {
    const page = await newPage(served, viewport);
    await signIn(page, lab.email, PASSWORD);

    // Planner: only the request with parts left to place, with how many.
    await page.getByTestId(`home-toplan-${toPlan.requestId}`).waitFor();
    expect(await rowIds(page, 'planner', 'home-toplan-')).toEqual([toPlan.requestId]);
    expect(await page.getByTestId(`home-toplan-${toPlan.requestId}-open`).textContent()).toBe('23');
    // The lead's comment reaches the planner on home.
    await page.getByTestId(`home-sentback-${back.planId}-comment`).getByText('Turn the housings open side up.', { exact: false }).waitFor();
    await page.getByTestId(`home-draft-${draft.id}`).waitFor();
    expect(await rowIds(page, 'planner', 'home-sentback-')).toEqual([back.planId]);

    // Lead: the plan in review, with its planner, machine and due date.
    const reviewRow = page.getByTestId(`home-review-${review.planId}`);
    await reviewRow.waitFor();
    const reviewText = await reviewRow.textContent();
    expect(reviewText).toContain('Gear build');
    expect(reviewText).toContain('Test home');
    expect(reviewText).toContain(lab.machine.name);
    expect(reviewText).toContain(day(6));
    expect(await rowIds(page, 'lead', 'home-review-')).toEqual([review.planId]);
    await page.getByTestId('home-team-members').waitFor();

    // Operator: the build under way with its stage, and the machine's next with its predicted start.
    const machineRow = page.getByTestId(`home-machine-${lab.machineId}`);
    await machineRow.getByTestId(`home-run-${late.planId}`).waitFor();
    expect(await machineRow.getByTestId(`home-run-${late.planId}`).textContent()).toMatch(/Printing.*Bracket build.*print ends \d{4}-\d\d-\d\d \d\d:\d\d/);
    expect(await machineRow.getByTestId(`home-next-${next.planId}`).textContent()).toMatch(/Clip build.*starts \d{4}-\d\d-\d\d \d\d:\d\d \(in /);

    // Everyone: the request due yesterday is late twice over: its build finishes after the date, and it is unprinted.
    const lateRow = page.getByTestId(`home-late-${late.request.requestId}`);
    await lateRow.waitFor();
    const lateText = (await lateRow.textContent()) ?? '';
    expect(lateText).toContain(`Due ${day(-1)}`);
    expect(lateText).toMatch(/Bracket build on .* is predicted out of the cake .*late/);
    expect(lateText).toContain('Past its due date with 0 of 4 printed');
    expect(await rowIds(page, 'late', 'home-late-')).toEqual([late.request.requestId]);

    await screenshot(page, `home-all-roles-${name}`);
    for (const s of ['late', 'designer', 'planner', 'lead', 'operator']) {
      const el = page.getByTestId(`home-section-${s}`);
      await el.scrollIntoViewIfNeeded();
      await el.screenshot({ path: join(ARTIFACTS, `home-all-roles-${name}-${s}.png`) });
    }

    // Each row opens the place where its work is done.
    await reviewRow.click();
    await page.waitForURL(new RegExp(`/review/${review.planId}$`));
    await page.goBack();
    await page.getByTestId(`home-sentback-${back.planId}`).click();
    await page.waitForURL(new RegExp(`/plans/${back.planId}$`));
    await page.goBack();
    await page.getByTestId(`home-machine-${lab.machineId}`).click();
    await page.waitForURL(new RegExp(`/floor/${lab.machineId}$`));
    await page.goBack();
    await page.getByTestId(`home-late-${late.request.requestId}`).click();
    await page.waitForURL(new RegExp(`/requests/${late.request.requestId}$`));
    await page.context().close();
  }
});

test('when the requests cannot be read, home says so in each section that needs them and recovers on retry', async () => {
  const page = await newPage(served, PHONE);
  await page.route('**/api/labs/*/requests?**', (route) =>
    route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'db_unavailable', message: 'The database is not reachable right now.' } }) }),
  );
  await signIn(page, 'owner@tinkerfin.example', DEMO_PASSWORD);
  const designer = page.getByTestId('home-section-designer');
  await designer.getByText('This could not be loaded').waitFor();
  await designer.getByText('The database is not reachable right now.').waitFor();
  await page.getByTestId('home-section-planner').getByText('This could not be loaded').waitFor();
  await page.getByTestId('home-section-late').getByText('This could not be loaded').waitFor();
  // Sections that do not need requests still show their work.
  expect(await page.getByTestId('home-section-lead').getByText('This could not be loaded').count()).toBe(0);
  await page.getByTestId('home-team-members').waitFor();
  await designer.scrollIntoViewIfNeeded();
  await screenshot(page, 'home-requests-error-phone');

  await page.unroute('**/api/labs/*/requests?**');
  await designer.getByText('Try again').click();
  await page.getByTestId('home-designer-count').waitFor();
  expect(await designer.getByText('This could not be loaded').count()).toBe(0);
  await page.context().close();
});
