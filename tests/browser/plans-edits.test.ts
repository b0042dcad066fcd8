import type { Page } from 'playwright-core';
import { newPage, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';

jest.setTimeout(300_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});


async function apiGet(page: Page, path: string) {
  const r = await page.request.get(`/api${path}`);
  return r.json();
}

async function packed(page: Page) {
  await page.getByTestId('layout-col-working').waitFor();
  await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
}

type Placement = { id: string; position: [number, number, number]; size: [number, number, number] };
const key = (p: Placement) => `${p.id}@${p.position.map((v) => v.toFixed(6)).join(',')}`;

test('a planner locks a layout, re-packs only the added parts, then fills the rest from other open lines without moving what is placed', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'planner@tinkerfin.example');
  const me = await apiGet(page, '/me');
  const labId = me.labs[0].id as string;
  const open = (await apiGet(page, `/labs/${labId}/plans/open-lines`)) as Array<{ requestLineId: string; remaining: number; request: { materialId: string } }>;
  // The material with the most open lines: the plan takes part of one line, the others stay for filling.
  const counts = new Map<string, number>();
  for (const l of open) counts.set(l.request.materialId, (counts.get(l.request.materialId) ?? 0) + 1);
  const materialId = [...counts].sort((a, b) => b[1] - a[1])[0][0];
  const mine = open.filter((l) => l.request.materialId === materialId);
  expect(mine.length).toBeGreaterThan(2);
  const first = mine[0];

  await page.goto('/plans/new');
  await page.getByTestId(`new-plan-material-${materialId}`).click();
  await page.getByTestId(`new-plan-line-${first.requestLineId}`).waitFor();
  for (const l of mine.slice(1)) await page.getByTestId(`new-plan-pick-${l.requestLineId}`).click();
  const half = Math.max(1, Math.floor(first.remaining / 2));
  await page.getByTestId(`new-plan-qty-${first.requestLineId}`).fill(String(half));
  await page.getByTestId('new-plan-create').click();
  await page.getByTestId('screen-plan-editor').waitFor();
  const planId = /\/plans\/([0-9a-f-]{36})/.exec(page.url())![1];

  await page.getByTestId('pack-time').fill('1');
  await page.getByTestId('pack-start').click();
  await packed(page);
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as/).waitFor();
  let plan = await apiGet(page, `/labs/${labId}/plans/${planId}`);
  const lockedId = plan.layouts[0].id as string;
  await page.getByTestId(`layout-lock-${lockedId}`).click();
  await page.waitForFunction(`document.querySelector('[data-testid="layout-lock-${lockedId}"]').textContent === 'Unlock'`);
  const locked = await apiGet(page, `/labs/${labId}/plans/${planId}/layouts/${lockedId}`);

  // More of the line: only the added copies are packed, above the locked ones.
  await page.getByTestId(`plan-qty-${first.requestLineId}`).fill(String(first.remaining));
  await page.getByTestId('plan-dirty').waitFor();
  await page.getByTestId('pack-repack-new').click();
  await packed(page);
  await screenshot(page, 'plans-repacked-wide');
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as/).waitFor();
  plan = await apiGet(page, `/labs/${labId}/plans/${planId}`);
  expect(plan.lines[0].quantity).toBe(first.remaining);
  const repackedId = plan.layouts.find((l: { id: string }) => l.id !== lockedId).id as string;
  const repacked = await apiGet(page, `/labs/${labId}/plans/${planId}/layouts/${repackedId}`);
  const repackedKeys = new Set((repacked.result.placements as Placement[]).map(key));
  for (const p of locked.result.placements as Placement[]) expect(repackedKeys.has(key(p))).toBe(true);
  expect(repacked.result.placements).toHaveLength(first.remaining);

  // Fill the rest: other open lines of the material go into the space left, the placed parts stay.
  await page.getByTestId('pack-fill').click();
  await packed(page);
  await page.getByText('Added').first().waitFor();
  await screenshot(page, 'plans-filled-wide');
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as/).waitFor();
  plan = await apiGet(page, `/labs/${labId}/plans/${planId}`);
  expect(plan.lines.length).toBeGreaterThan(1);
  const filledId = plan.layouts.find((l: { id: string }) => l.id !== lockedId && l.id !== repackedId).id as string;
  const filled = await apiGet(page, `/labs/${labId}/plans/${planId}/layouts/${filledId}`);
  const filledKeys = new Set((filled.result.placements as Placement[]).map(key));
  for (const p of repacked.result.placements as Placement[]) expect(filledKeys.has(key(p))).toBe(true);
  expect(filled.result.placements.length).toBeGreaterThan(repacked.result.placements.length);
  expect(filled.matchesPlan).toBe(true);
  await page.context().close();
});

test('parts too many for one chamber are offered as several plans, which are made with every part shared out', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'owner@tinkerfin.example');
  const me = await apiGet(page, '/me');
  const labId = me.labs[0].id as string;
  const machines = (await apiGet(page, `/labs/${labId}/machines`)) as Array<{ id: string; chamberMm: [number, number, number] }>;
  const small = machines.reduce((a, m) => (m.chamberMm[2] < a.chamberMm[2] ? m : a));
  const materials = (await apiGet(page, `/labs/${labId}/materials`)) as Array<{ id: string; name: string }>;
  const material = materials.find((m) => /glass/i.test(m.name)) ?? materials[0];
  const parts = (await apiGet(page, `/labs/${labId}/parts?pageSize=200`)).items as Array<{ id: string; name: string; sizeMm: [number, number, number] }>;
  const housing = [...parts].sort((a, b) => b.sizeMm[0] * b.sizeMm[1] * b.sizeMm[2] - a.sizeMm[0] * a.sizeMm[1] * a.sizeMm[2])[0];
  const due = new Date(Date.now() + 40 * 86_400_000).toISOString().slice(0, 10);
  const made = await page.request.post('/api/labs/' + labId + '/requests', {
    data: { title: 'Housings for the fleet', materialId: material.id, dueDate: due, lines: [{ partId: housing.id, quantity: 400 }] },
    headers: { Origin: served.baseUrl },
  });
  expect(made.status()).toBe(201);
  // Other tests may leave open lines in the same powder; the new plan offers them all.
  const open = (await apiGet(page, `/labs/${labId}/plans/open-lines?materialId=${material.id}`)) as Array<{ remaining: number }>;
  const offered = open.reduce((sum, l) => sum + l.remaining, 0);
  expect(offered).toBeGreaterThanOrEqual(400);

  await page.goto('/plans/new');
  await page.getByTestId(`new-plan-material-${material.id}`).click();
  await page.getByTestId(`new-plan-machine-${small.id}`).click();
  await page.getByTestId('new-plan-too-big').waitFor();
  await page.getByTestId('new-plan-split').click();
  await page.getByTestId('new-plan-split-preview').waitFor({ timeout: 60_000 });
  await screenshot(page, 'plans-split-wide');
  await page.getByTestId('new-plan-create-split').click();
  await page.getByTestId('screen-plan-editor').waitFor({ timeout: 60_000 });

  const plans = (await apiGet(page, `/labs/${labId}/plans`)) as Array<{ id: string; name: string; partCount: number }>;
  const split = plans.filter((p) => / of \d+\)$/.test(p.name));
  expect(split.length).toBeGreaterThan(1);
  expect(split.reduce((s, p) => s + p.partCount, 0)).toBe(offered);
  await page.context().close();
});

test('when the packing worker dies, the editor says so and offers a retry, and the plan is untouched', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'planner@tinkerfin.example');
  const me = await apiGet(page, '/me');
  const labId = me.labs[0].id as string;
  await page.goto('/plans');
  const plans = (await apiGet(page, `/labs/${labId}/plans?status=draft`)) as Array<{ id: string; version: number; layoutCount: number }>;
  const plan = plans[0];
  expect(plan).toBeDefined();

  // A worker script that fails as it starts, as one that ran out of memory would.
  await page.route(/\/packer-[0-9a-f]+\.js$/, (route) => route.fulfill({ contentType: 'text/javascript', body: "throw new Error('out of memory');" }));
  await page.goto(`/plans/${plan.id}`);
  await page.getByTestId('screen-plan-editor').waitFor();
  await page.getByTestId('pack-time').fill('1');
  await page.getByTestId('pack-start').click();
  await page.getByTestId('pack-error').waitFor({ timeout: 60_000 });
  await screenshot(page, 'plans-worker-lost-wide');
  const after = await apiGet(page, `/labs/${labId}/plans/${plan.id}`);
  expect(after.version).toBe(plan.version);
  expect(after.layouts).toHaveLength(plan.layoutCount);

  await page.unroute(/\/packer-[0-9a-f]+\.js$/);
  await page.getByTestId('pack-retry').click();
  await page.getByTestId('layout-col-working').waitFor({ timeout: 60_000 });
  await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
  expect(await page.getByTestId('pack-error').count()).toBe(0);
  await page.context().close();
});
