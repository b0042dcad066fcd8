import type { Page } from 'playwright-core';
import { ARTIFACTS, newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { gridLayout, planInstance } from '../helpers/plans';

jest.setTimeout(300_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});


/** The API as the signed-in page's session, with the Origin header state changes need. */
function apiOf(page: Page) {
  const headers = { Origin: served.baseUrl };
  return {
    get: async (path: string) => {
      const r = await page.request.get(`/api${path}`);
      return { status: r.status(), body: await r.json().catch(() => null) };
    },
    send: async (method: 'post' | 'put', path: string, data: unknown) => {
      const r = await page.request[method](`/api${path}`, { data, headers });
      return { status: r.status(), body: await r.json().catch(() => null) };
    },
  };
}

async function waitForPackingToEnd(page: Page) {
  await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
  await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
}

let planId = '';

describe('the demo planner on a wide screen (1440 x 900)', () => {
  test('creates a plan from the demo requests, packs it, keeps two layouts, chooses one and sends it for review', async () => {
    const page = await newPage(served, WIDE);
    await signIn(page, 'planner@tinkerfin.example');
    await page.goto('/plans');
    await page.getByTestId('screen-plans').waitFor();
    await page.getByTestId('plans-new').click();
    await page.getByTestId('new-plan-lines').waitFor();
    await screenshot(page, 'plans-new-wide');
    await page.getByTestId('new-plan-create').click();

    await page.getByTestId('screen-plan-editor').waitFor();
    await page.getByTestId('plan-panes-wide').waitFor();
    planId = /\/plans\/([0-9a-f-]{36})/.exec(page.url())![1];
    const lines = await page.locator('[data-testid^="plan-line-"]').filter({ has: page.locator('[data-testid^="plan-qty-"]') }).count();
    expect(lines).toBeGreaterThan(1);

    // Pack with a short time limit; progress shows while the worker runs.
    await page.getByTestId('pack-time').fill('2');
    await page.getByTestId('pack-start').click();
    await page.getByTestId('layout-col-working').waitFor();
    await waitForPackingToEnd(page);
    await expect(page.getByTestId('num-layers').textContent()).resolves.toMatch(/^[1-9]\d*$/);
    await expect(page.getByTestId('num-unplaced').textContent()).resolves.toBe('0');
    await expect(page.getByTestId('num-print').textContent()).resolves.toMatch(/h$/);
    await expect(page.getByTestId('num-density').textContent()).resolves.toMatch(/%$/);
    await expect(page.getByTestId('num-cost-part').textContent()).resolves.toMatch(/\d/);
    await page.getByTestId('area-chart').waitFor();
    // The chart reads out the layer under the pointer.
    // (Hovered where the plot is once it is in view: panels that load later move it down the pane.)
    const plot = page.getByTestId('area-chart-plot');
    await plot.scrollIntoViewIfNeeded();
    const box = (await plot.boundingBox())!;
    await plot.hover({ position: { x: box.width * 0.3, y: box.height / 2 } });
    await page.getByTestId('area-chart-readout').getByText(/^Layer \d+ of \d+ · [\d.]+ mm · [\d.]+ cm² · [\d.]+ % of the bed/).waitFor();
    await page.getByTestId('area-chart').screenshot({ path: `${ARTIFACTS}/plans-area-chart-readout.png` });
    expect(await page.locator('[data-testid="plan-build"] canvas').count()).toBe(1);
    expect(await page.evaluate('typeof window.__chamberReady')).toBe('number');
    await screenshot(page, 'plans-editor-packed-wide');

    await page.getByTestId('layout-keep').click();
    await page.getByText(/^Kept as/).waitFor();

    // The second layout through the keyboard: P packs (with the next seed), K keeps it.
    await page.getByTestId('plan-status').click();
    await page.keyboard.press('p');
    await page.getByTestId('layout-col-working').waitFor();
    await waitForPackingToEnd(page);
    await page.keyboard.press('k');
    await page.waitForFunction("document.querySelectorAll('[data-testid^=\"layout-choose-\"]').length === 2");

    await page.keyboard.press('?');
    await page.getByTestId('shortcut-help').waitFor();
    await screenshot(page, 'plans-shortcuts-wide');
    await page.keyboard.press('Escape');
    await page.getByTestId('shortcut-help').waitFor({ state: 'detached' });

    await page.locator('[data-testid^="layout-choose-"]').first().click();
    await page.locator('[data-testid^="layout-chosen-"]').waitFor();
    await screenshot(page, 'plans-two-layouts-wide');

    // Unsaved edits survive a reload.
    await page.getByTestId('plan-name').fill('Gripper and sensor build');
    await page.getByTestId('plan-dirty').waitFor();
    await page.reload();
    await page.getByTestId('screen-plan-editor').waitFor();
    await expect(page.getByTestId('plan-name').inputValue()).resolves.toBe('Gripper and sensor build');
    await page.getByTestId('plan-dirty').waitFor();

    // Someone saves in between: the save answers 409 and the editor asks; keeping mine saves over theirs.
    const api = apiOf(page);
    const me = await api.get('/me');
    const labId = me.body.labs[0].id as string;
    const before = await api.get(`/labs/${labId}/plans/${planId}`);
    const other = await api.send('put', `/labs/${labId}/plans/${planId}`, { version: before.body.version, name: 'Renamed elsewhere' });
    expect(other.status).toBe(200);
    await page.getByTestId('plan-save').click();
    await page.getByTestId('conflict-dialog').waitFor();
    await screenshot(page, 'plans-conflict-wide');
    await page.getByTestId('conflict-keep-mine').click();
    await page.getByText('Saved your changes over the newer copy.').waitFor();
    await page.getByTestId('plan-dirty').waitFor({ state: 'detached' });
    const after = await api.get(`/labs/${labId}/plans/${planId}`);
    expect(after.body.name).toBe('Gripper and sensor build');
    expect(after.body.version).toBeGreaterThan(other.body.version);

    await page.getByTestId('plan-submit').click();
    await page.getByTestId('plan-readonly').waitFor();
    await expect(page.getByTestId('plan-status').textContent()).resolves.toBe('In review');
    await page.getByText('Draft → In review').waitFor();
    expect(await page.getByTestId('pack-start').count()).toBe(0);
    await screenshot(page, 'plans-in-review-wide');
    const submitted = await api.get(`/labs/${labId}/plans/${planId}`);
    expect(submitted.body.status).toBe('in_review');
    expect(submitted.body.layouts).toHaveLength(2);

    await page.goto('/plans');
    await page.getByTestId(`plan-row-${planId}`).waitFor();
    await screenshot(page, 'plans-list-wide');
    await page.context().close();
  });
});

describe('the same plan on a phone (390 x 844)', () => {
  test('reads in tabs: lines, 3D, numbers and layouts', async () => {
    expect(planId).not.toBe('');
    const page = await newPage(served, PHONE);
    await signIn(page, 'planner@tinkerfin.example');
    await page.goto(`/plans/${planId}`);
    await page.getByTestId('plan-tabs').waitFor();
    expect(await page.getByTestId('plan-panes-wide').count()).toBe(0);
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
    await screenshot(page, 'plans-phone-3d');
    await page.getByTestId('plan-tab-numbers').click();
    await page.getByTestId('plan-numbers').waitFor();
    await expect(page.getByTestId('num-layers').textContent()).resolves.toMatch(/^[1-9]\d*$/);
    await screenshot(page, 'plans-phone-numbers');
    await page.getByTestId('plan-tab-layouts').click();
    await page.getByTestId('layouts-table').waitFor();
    await page.getByTestId('plan-history').waitFor();
    await screenshot(page, 'plans-phone-layouts');
    await page.getByTestId('plan-tab-lines').click();
    await page.getByTestId('plan-lines').waitFor();
    // The read-only notice is one line on a phone (as the plan's flags are); why, and the way back to draft, one tap away.
    await page.getByTestId('plan-readonly').getByText('In review: read-only').waitFor();
    expect(await page.getByText('A lead reviews the chosen layout', { exact: false }).count()).toBe(0);
    await page.getByTestId('plan-readonly-toggle').click();
    await page.getByText('A lead reviews the chosen layout', { exact: false }).waitFor();
    await screenshot(page, 'plans-phone-lines');
    await page.context().close();
  });
});

describe('a layout of 5,000 placements', () => {
  // The figures it prints (first frame, orbit answered, JS heap) are the editor's benchmark: `npm run bench:editor`
  // runs just this test; the targets (orbit answered within 5 s, under 1 GB) are read there, not asserted here.
  test('opens in the editor, turns with an orbit, and stays editable and packable', async () => {
    const page = await newPage(served, WIDE);
    await signIn(page, 'owner@tinkerfin.example');
    const api = apiOf(page);
    const me = await api.get('/me');
    const labId = me.body.labs[0].id as string;
    const machines = (await api.get(`/labs/${labId}/machines`)).body as Array<{ id: string; name: string; chamberMm: [number, number, number] }>;
    const materials = (await api.get(`/labs/${labId}/materials`)).body as Array<{ id: string; name: string }>;
    const machine = machines.reduce((a, m) => (m.chamberMm[0] * m.chamberMm[1] * m.chamberMm[2] > a.chamberMm[0] * a.chamberMm[1] * a.chamberMm[2] ? m : a));
    const material = materials[0];
    const parts = (await api.get(`/labs/${labId}/parts?pageSize=200`)).body.items as Array<{ id: string; sizeMm: [number, number, number] }>;
    const smallest = [...parts].sort((a, b) => a.sizeMm[0] * a.sizeMm[1] * a.sizeMm[2] - b.sizeMm[0] * b.sizeMm[1] * b.sizeMm[2]).slice(0, 2);
    const due = new Date(Date.now() + 30 * 86_400_000).toISOString().slice(0, 10);
    const request = await api.send('post', `/labs/${labId}/requests`, {
      title: 'Clip stock for the year',
      materialId: material.id,
      dueDate: due,
      lines: smallest.map((p) => ({ partId: p.id, quantity: 2500 })),
    });
    expect(request.status).toBe(201);
    const plan = await api.send('post', `/labs/${labId}/plans`, {
      name: 'Five thousand clips',
      machineId: machine.id,
      materialId: material.id,
      lines: request.body.lines.map((l: { id: string; quantity: number }) => ({ requestLineId: l.id, quantity: l.quantity })),
    });
    expect(plan.status).toBe(201);
    const view = (await api.get(`/labs/${labId}/plans/${plan.body.id}`)).body;
    const instance = planInstance(view, view.machine, view.material);
    const result = gridLayout(instance);
    expect(result.placements).toHaveLength(5000);
    const kept = await api.send('post', `/labs/${labId}/plans/${plan.body.id}/layouts`, { instance, result, label: 'Grid of 5,000' });
    expect(kept.status).toBe(201);

    // A fresh page load, so the figure counts from navigation.
    await page.goto('/');
    await page.getByTestId('screen-home').waitFor();
    await page.goto(`/plans/${plan.body.id}`);
    await page.waitForFunction('typeof window.__chamberReady === "number"', undefined, { timeout: 30_000 });
    const firstFrameMs = (await page.evaluate('window.__chamberReady')) as number;
    const stats = (await page.evaluate('window.__chamberStats')) as { placements: number; drawCalls: number };
    expect(stats.placements).toBe(5000);

    // Orbit: drag across the canvas; the figure is the second animation frame after the drag (the first one drawn after it).
    const canvas = page.locator('[data-testid="plan-build"] canvas');
    const box = (await canvas.boundingBox())!;
    const cx = box.x + box.width / 2;
    const cy = box.y + box.height / 2;
    const drag = async (dx: number, steps = 1) => {
      await page.mouse.move(cx, cy);
      await page.mouse.down();
      await page.mouse.move(cx + dx, cy + dx / 4, { steps });
      await page.mouse.up();
    };
    const beforeDragMs = (await page.evaluate('performance.now()')) as number;
    await drag(160);
    const afterDragMs = (await page.evaluate('performance.now()')) as number;
    const interactiveMs = (await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(() => r(performance.now()))))')) as number;
    // Untimed check that the drag turns the view: two more drags give two different pictures.
    const before = await canvas.screenshot();
    await drag(-200, 4);
    let moved = false;
    for (let i = 0; i < 40 && !moved; i++) {
      moved = !(await canvas.screenshot()).equals(before);
      if (!moved) await page.waitForTimeout(100);
    }
    expect(moved).toBe(true);

    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Performance.enable');
    const { metrics } = (await cdp.send('Performance.getMetrics')) as { metrics: Array<{ name: string; value: number }> };
    const heapBytes = metrics.find((m) => m.name === 'JSHeapUsedSize')!.value;
    await screenshot(page, 'plans-5000-wide');
    console.log(
      `5,000 placements: first frame ${Math.round(firstFrameMs)} ms after navigation, orbit answered by ${Math.round(interactiveMs)} ms ` +
        `(drag sent from ${Math.round(beforeDragMs)} to ${Math.round(afterDragMs)} ms); ` +
        `JS heap ${(heapBytes / 2 ** 20).toFixed(0)} MB; ${stats.drawCalls} draw calls`,
    );

    // Edits on the big layout: from the top, a click marks the part under it; removing it leaves one part unplaced.
    await page.getByTestId('plan-status').click();
    await page.keyboard.press('1');
    // Two animation frames: the top view has drawn before the click.
    await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
    // The parts are 3 mm apart: a click can fall in a gap between two, which marks nothing; a few points
    // around the middle, until one lands on a part.
    let marked = false;
    for (const [dx, dy] of [[0, 0], [7, 0], [0, 7], [-7, 0], [0, -7], [7, 7], [-7, -7], [13, 4], [-4, 13]]) {
      await page.mouse.click(cx + dx, cy + dy);
      marked = await page.getByTestId('plan-marked').waitFor({ timeout: 2_000 }).then(() => true, () => false);
      if (marked) break;
    }
    expect(marked).toBe(true);
    await page.getByTestId('plan-remove-marked').click();
    await page.getByTestId('layout-col-working').waitFor();
    await expect(page.getByTestId('num-unplaced').textContent()).resolves.toBe('1');
    await expect(page.getByTestId('num-placed').textContent()).resolves.toBe('4999');

    // Packing 5,000 parts: the progress bar and the best layout so far show while the worker runs; Esc stops it and keeps that layout.
    await page.getByTestId('pack-time').fill('60');
    await page.getByTestId('pack-start').click();
    await page.getByTestId('pack-progress').waitFor();
    await page.getByTestId('plan-build-live').waitFor({ timeout: 60_000 });
    await screenshot(page, 'plans-5000-packing-wide');
    await page.getByTestId('plan-status').click();
    await page.keyboard.press('Escape');
    await page.getByTestId('pack-cancelled').waitFor({ timeout: 30_000 });
    await expect(page.getByTestId('num-placed').textContent()).resolves.toMatch(/^[1-9]\d*$/);
    await page.context().close();
  });
});
