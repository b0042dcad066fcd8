import request from 'supertest';
import type { Page } from 'playwright-core';
import { ARTIFACTS, newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { makeRequest } from '../helpers/plans';
import { DEMO_PASSWORD } from '../../server/db/seeders/demo';

jest.setTimeout(300_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

/**
 * An urgent open request of this test's own in the demo lab, so a new plan has parts to take whatever the other
 * browser tests sharing the database have planned already (the new plan form starts with the most urgent lines).
 */
let requests = 0;
async function openLinesOfOurOwn() {
  const owner = request.agent(served.running.app);
  owner.set('Origin', served.baseUrl);
  const signedIn = await owner.post('/api/auth/sign-in').send({ email: 'owner@tinkerfin.example', password: DEMO_PASSWORD });
  if (signedIn.status !== 200) throw new Error(`sign-in failed: ${signedIn.status}`);
  const me = (await owner.get('/api/me')).body;
  const labId = me.labs[0].id as string;
  const material = (await owner.get(`/api/labs/${labId}/materials`)).body[0];
  const n = ++requests;
  await makeRequest(
    served.running,
    labId,
    me.user.id,
    material.id,
    [
      { name: `Editor bracket ${n}`, sizeMm: [40, 30, 12], quantity: 12 },
      { name: `Editor clip ${n}`, sizeMm: [20, 12, 8], quantity: 24 },
    ],
    { title: `Editor check ${n}`, dueDate: '2026-12-03', priority: 'urgent' },
  );
}

async function packNewPlan(page: Page): Promise<string> {
  await openLinesOfOurOwn();
  await signIn(page, 'planner@tinkerfin.example');
  await page.goto('/plans');
  await page.getByTestId('plans-new').click();
  await page.getByTestId('new-plan-lines').waitFor();
  await page.getByTestId('new-plan-create').click();
  await page.getByTestId('screen-plan-editor').waitFor();
  const planId = /\/plans\/([0-9a-f-]{36})/.exec(page.url())![1];
  await page.getByTestId('pack-time').fill('2');
  await page.getByTestId('pack-start').click();
  await page.getByTestId('layout-col-working').waitFor();
  await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
  await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
  return planId;
}

/** The slider reads "cut layer / layers"; with no cut both are the build's layer count. */
async function sliderLayers(page: Page): Promise<{ at: number; of: number }> {
  const text = (await page.getByTestId('plan-layer-slider-layer').textContent()) ?? '';
  const m = /^(\d+) \/ (\d+)$/.exec(text.trim());
  expect(m).not.toBeNull();
  return { at: Number(m![1]), of: Number(m![2]) };
}

let planId = '';

/** The plan packed for 2 s, as the planner, on a page of the given size (on a phone from the lines tab). */
async function openPacked(viewport: typeof PHONE): Promise<Page> {
  const page = await newPage(served, viewport);
  await signIn(page, 'planner@tinkerfin.example');
  await page.goto(`/plans/${planId}`);
  if (viewport === PHONE) {
    await page.getByTestId('plan-tabs').waitFor();
    await page.getByTestId('plan-tab-lines').click();
  }
  await page.getByTestId('pack-time').fill('2');
  await page.getByTestId('pack-start').click();
  await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
  await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
  return page;
}

describe('one layer count in the plan editor', () => {
  test('wide (1440 x 900): the slider, the numbers and the chart count the same layers, the margins explained', async () => {
    const page = await newPage(served, WIDE);
    planId = await packNewPlan(page);
    const layers = Number(await page.getByTestId('num-layers').textContent());
    expect(layers).toBeGreaterThan(0);
    expect(await sliderLayers(page)).toEqual({ at: layers, of: layers });
    await expect(page.getByTestId('num-layers-note').textContent()).resolves.toMatch(new RegExp(`^${layers} layers of [\\d.]+ mm as printed: [\\d.]+ mm of powder under the parts \\(floor margin\\)`));
    await page.getByTestId('plan-build-layers-note').getByText(/floor margin/).waitFor();
    // The chart's readout names layers on the same base: hovering its right end reads the last one.
    // (Hovered again until it reads so: panels that load later move or resize the plot under a pointer that stays put.)
    const plot = page.getByTestId('area-chart-plot');
    const lastLayer = new RegExp(`^Layer ${layers} of ${layers} ·`);
    let readout = '';
    for (const until = Date.now() + 30_000; !lastLayer.test(readout) && Date.now() < until; ) {
      await plot.scrollIntoViewIfNeeded();
      const box = (await plot.boundingBox())!;
      await plot.hover({ position: { x: box.width - 1, y: box.height / 2 } });
      await page.waitForTimeout(200);
      readout = (await page.getByTestId('area-chart-readout').textContent()) ?? '';
    }
    expect(readout).toMatch(lastLayer);
    // Stepping the cut down one layer from the top names the layer under it.
    await page.getByTestId('plan-layer-slider').focus();
    await page.keyboard.press('ArrowDown');
    expect(await sliderLayers(page)).toEqual({ at: layers - 1, of: layers });
    await screenshot(page, 'plan-editor-layers-wide');
    await page.context().close();
  });

  test('phone (390 x 844): the 3D tab and the numbers tab show the same count', async () => {
    expect(planId).not.toBe('');
    // The packing not kept stays in this browser's draft only on the page that made it: pack again here.
    const page = await openPacked(PHONE);
    await page.getByTestId('plan-tab-numbers').click();
    const layers = Number(await page.getByTestId('num-layers').textContent());
    expect(layers).toBeGreaterThan(0);
    await page.getByTestId('num-layers-note').getByText(/floor margin/).waitFor();
    await screenshot(page, 'plan-editor-layers-phone-numbers');
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
    expect(await sliderLayers(page)).toEqual({ at: layers, of: layers });
    await screenshot(page, 'plan-editor-layers-phone-3d');
    await page.context().close();
  });
});

describe('the 3D view gets the room and frames the parts', () => {
  test('wide (1440 x 900): the chamber takes the width beside the lines, the numbers under it or beside on demand; parts framed, the chamber on request', async () => {
    const page = await newPage(served, WIDE);
    await packNewPlan(page);
    const canvas = page.locator('[data-testid="plan-build"] canvas');
    await page.getByTestId('plan-numbers-under').waitFor();
    const wideBox = (await canvas.boundingBox())!;
    // Beside the 330 px lines pane, the 3D view takes most of the rest of the 1,200 px the page leaves the editor.
    expect(wideBox.width).toBeGreaterThan(650);
    expect(wideBox.height).toBeGreaterThan(500);
    // The numbers are under it, one scroll away.
    await page.getByTestId('num-layers').waitFor();
    await expect(page.getByTestId('view-parts').getAttribute('aria-checked')).resolves.toBe('true');
    await expect(page.getByTestId('view-chamber').getAttribute('aria-checked')).resolves.toBe('false');
    await screenshot(page, 'plan-editor-parts-wide');
    const parts = await canvas.screenshot();

    // C frames the whole chamber, and again the parts; the buttons do the same.
    await page.getByTestId('plan-status').click();
    await page.keyboard.press('c');
    await expect(page.getByTestId('view-chamber').getAttribute('aria-checked')).resolves.toBe('true');
    // The picture changes once the canvas draws the new frame (polled, not a fixed pause).
    let changed = false;
    for (let i = 0; i < 40 && !changed; i++) {
      changed = !(await canvas.screenshot()).equals(parts);
      if (!changed) await page.waitForTimeout(100);
    }
    expect(changed).toBe(true);
    await page.getByTestId('plan-build').screenshot({ path: `${ARTIFACTS}/plan-editor-chamber-wide.png` });
    await page.getByTestId('view-parts').click();
    await expect(page.getByTestId('view-parts').getAttribute('aria-checked')).resolves.toBe('true');

    // The numbers beside the view on demand: a column of their own, the 3D view narrower.
    await page.getByTestId('plan-numbers-place').click();
    await page.getByTestId('plan-numbers-beside').waitFor();
    await page.getByTestId('num-layers').waitFor();
    expect((await canvas.boundingBox())!.width).toBeLessThan(wideBox.width - 300);
    await screenshot(page, 'plan-editor-numbers-beside-wide');
    await page.getByTestId('plan-numbers-place').click();
    await page.getByTestId('plan-numbers-under').waitFor();
    await page.context().close();
  });

  test('phone (390 x 844): the 3D tab frames the parts, the chamber on request', async () => {
    expect(planId).not.toBe('');
    const page = await openPacked(PHONE);
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
    await expect(page.getByTestId('view-parts').getAttribute('aria-checked')).resolves.toBe('true');
    await screenshot(page, 'plan-editor-parts-phone');
    await page.getByTestId('view-chamber').click();
    await expect(page.getByTestId('view-chamber').getAttribute('aria-checked')).resolves.toBe('true');
    await screenshot(page, 'plan-editor-chamber-phone');
    await page.context().close();
  });
});

/** Looks down on the parts and clicks (or taps) points of the view until one marks a part. */
async function markAPart(page: Page, tap: boolean) {
  // (tap: a touch; the phone runs here with a mouse, which the view treats alike)
  await page.getByTestId('view-top').click();
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  const canvas = page.locator('[data-testid="plan-build"] canvas');
  const box = (await canvas.boundingBox())!;
  // A packed plate may leave its middle empty: points over the view under its button bar, a grid of 9 x 8.
  const points: [number, number][] = [];
  for (let i = 0; i < 8; i++) for (let j = 1; j <= 9; j++) points.push([j / 10, 0.25 + i / 10]);
  for (const [fx, fy] of points) {
    const x = box.x + box.width * fx;
    const y = box.y + box.height * fy;
    if (tap) await page.touchscreen.tap(x, y);
    else await page.mouse.click(x, y);
    // A part under the point marks it: the bar naming the marked parts appears.
    const marked = await page
      .getByTestId('plan-marked')
      .waitFor({ timeout: 500 })
      .then(() => true)
      .catch(() => false);
    if (marked) return;
  }
  throw new Error('no part under any of the points tried');
}

/** Moves the marked part step by step one way until it comes within the spacing of another (or the steps run out). */
async function moveUntilFault(page: Page, step: () => Promise<void>, steps = 40) {
  for (let i = 0; i < steps && (await page.getByTestId('plan-edit-faults').count()) === 0; i++) {
    await step();
    // The screen has drawn the moved layout (and its check) before it is read again.
    await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  }
}

describe('moving, turning and dropping parts by hand', () => {
  test('wide (1440 x 900): arrows move a marked part, the clash is shown and blocks keeping, D drops it clear', async () => {
    expect(planId).not.toBe('');
    const page = await openPacked(WIDE);
    await markAPart(page, false);
    await expect(page.getByTestId('layout-keep').getAttribute('aria-disabled')).resolves.not.toBe('true');
    await page.getByTestId('plan-status').click();
    const heightBefore = await page.getByTestId('num-height').textContent();
    // Left with the arrow key, then right if the wall stopped it before it met another part.
    // Back, then forward past where it started, then left and right: one of them meets a neighbour.
    await moveUntilFault(page, () => page.keyboard.press('ArrowUp'));
    await moveUntilFault(page, () => page.keyboard.press('ArrowDown'), 80);
    await moveUntilFault(page, () => page.keyboard.press('ArrowLeft'));
    await moveUntilFault(page, () => page.keyboard.press('ArrowRight'), 80);
    await page.getByTestId('plan-edit-faults').getByText(/closer than the \d+(\.\d+)? mm spacing/).waitFor();
    await expect(page.getByTestId('layout-keep').getAttribute('aria-disabled')).resolves.toBe('true');
    await screenshot(page, 'plan-editor-clash-wide');

    // D: to the lowest free height, which lifts it over the part it met; nothing at fault, the layout can be kept.
    await page.keyboard.press('d');
    await page.getByTestId('plan-edit-faults').waitFor({ state: 'detached' });
    await expect(page.getByTestId('layout-keep').getAttribute('aria-disabled')).resolves.not.toBe('true');
    expect(await page.getByTestId('num-height').textContent()).not.toBe(heightBefore);
    await screenshot(page, 'plan-editor-dropped-wide');

    // R turns it a quarter turn (or says why it may not); keeping the edited layout stores it.
    await page.keyboard.press('r');
    await page.getByTestId('layout-keep').click();
    await page.getByText(/^Kept as/).waitFor();
    await page.context().close();
  });

  test('phone (390 x 844): the buttons under the view move and drop a tapped part', async () => {
    expect(planId).not.toBe('');
    const page = await openPacked(PHONE);
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
    await markAPart(page, false);
    await page.getByTestId('plan-move-left').scrollIntoViewIfNeeded();
    await screenshot(page, 'plan-editor-marked-phone');
    await moveUntilFault(page, () => page.getByTestId('plan-move-left').click());
    await moveUntilFault(page, () => page.getByTestId('plan-move-right').click(), 80);
    await moveUntilFault(page, () => page.getByTestId('plan-move-back').click());
    await moveUntilFault(page, () => page.getByTestId('plan-move-front').click(), 80);
    await page.getByTestId('plan-edit-faults').waitFor();
    await page.getByTestId('plan-edit-faults').scrollIntoViewIfNeeded();
    await screenshot(page, 'plan-editor-clash-phone');
    await page.getByTestId('plan-drop').click();
    await page.getByTestId('plan-edit-faults').waitFor({ state: 'detached' });
    await screenshot(page, 'plan-editor-dropped-phone');
    await page.context().close();
  });
});
