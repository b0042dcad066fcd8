// Over 450 lines: the plan editor on both screen sizes, step by step (layers, framing, keys, drags) sharing one packed plan.
import type { CDPSession, Page } from 'playwright-core';
import { ARTIFACTS, boxOf, markAPart, moveIntoClash, moveUntilFault, newPage, PHONE, probe, screenshot, serveAndLaunch, WIDE, type Box, type Served, signIn, urgentDemoRequest, type Xy } from '../helpers/browser';

jest.setTimeout(300_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

let requests = 0;
async function openLinesOfOurOwn() {
  const n = ++requests;
  await urgentDemoRequest(
    served,
    [
      { name: `Editor bracket ${n}`, sizeMm: [40, 30, 12], quantity: 12 },
      { name: `Editor clip ${n}`, sizeMm: [20, 12, 8], quantity: 24 },
    ],
    `Editor check ${n}`,
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
async function openPacked(viewport: typeof PHONE, opts: { touch?: boolean } = {}): Promise<Page> {
  const page = await newPage(served, viewport, opts);
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

    // R turns it a quarter turn in place (or says why it may not). Turned, it may now reach a neighbour, which
    // is shown and blocks keeping; D again puts it at the lowest free height, clear of all. Keeping stores it.
    await page.keyboard.press('r');
    await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
    await page.keyboard.press('d');
    await page.getByTestId('plan-edit-faults').waitFor({ state: 'detached' });
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
    await moveIntoClash(page);
    await page.getByTestId('plan-edit-faults').scrollIntoViewIfNeeded();
    await screenshot(page, 'plan-editor-clash-phone');
    await page.getByTestId('plan-drop').click();
    await page.getByTestId('plan-edit-faults').waitFor({ state: 'detached' });
    await screenshot(page, 'plan-editor-dropped-phone');
    await page.context().close();
  });
});

// ---- dragging marked parts across the plate ------------------------------------------------------------------

const centreAt = (b: Box, z: number) => [b.position[0] + b.size[0] / 2, b.position[1] + b.size[1] / 2, z];
const overlapZ = (a: Box, b: Box) => a.position[2] < b.position[2] + b.size[2] && b.position[2] < a.position[2] + a.size[2];

/**
 * Looking down on the plate: a part whose top is in sight (not under the camera buttons, inside the page), and the
 * nearest other part at an overlapping height. Clicks the first to mark it; returns both and the point pressed.
 */
async function markPartBesideAnother(page: Page, input: Input): Promise<{ i: number; j: number; at: Xy }> {
  await page.getByTestId('view-top').click();
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  const canvas = (await page.locator('[data-testid="plan-build"] canvas').boundingBox())!;
  const bar = (await page.getByRole('toolbar', { name: 'Camera views' }).boundingBox())!;
  const viewport = page.viewportSize()!;
  const inView = (p: Xy) =>
    p.x > canvas.x + 8 && p.x < canvas.x + canvas.width - 8 && p.y > canvas.y + 8 && p.y < Math.min(canvas.y + canvas.height, viewport.height) - 8 &&
    !(p.x > bar.x - 4 && p.x < bar.x + bar.width + 4 && p.y > bar.y - 4 && p.y < bar.y + bar.height + 4);
  const n = await probe<number>(page, 'count');
  const boxes: Box[] = [];
  for (let k = 0; k < n; k++) boxes.push((await boxOf(page, k))!);
  let best: { i: number; j: number; at: Xy; d: number } | null = null;
  for (let i = 0; i < n; i++) {
    const a = boxes[i];
    const at = await probe<Xy>(page, 'screenOf', centreAt(a, a.position[2] + a.size[2]));
    if (!inView(at) || (await probe<number | null>(page, 'placementAt', at.x, at.y)) !== i) continue;
    for (let j = 0; j < n; j++) {
      if (j === i || !overlapZ(a, boxes[j])) continue;
      const target = await probe<Xy>(page, 'screenOf', centreAt(boxes[j], a.position[2] + a.size[2]));
      const d = Math.hypot(target.x - at.x, target.y - at.y);
      if (inView(target) && d > 30 && (!best || d < best.d)) best = { i, j, at, d };
    }
  }
  if (!best) throw new Error('no part in sight with a neighbour at its height');
  if (input === 'touch') await page.touchscreen.tap(best.at.x, best.at.y);
  else await page.mouse.click(best.at.x, best.at.y);
  await page.getByTestId('plan-marked-at').waitFor();
  return { i: best.i, j: best.j, at: await topOf(page, best.i) };
}

/** Where the top of a placement's box is on the page now, checked to be that placement's (nothing over it). */
async function topOf(page: Page, i: number): Promise<Xy> {
  // The bar naming the marked parts takes room from the view as it appears: read the view once it has drawn since.
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  const b = (await boxOf(page, i))!;
  const at = await probe<Xy>(page, 'screenOf', centreAt(b, b.position[2] + b.size[2]));
  expect(await probe<number | null>(page, 'placementAt', at.x, at.y)).toBe(i);
  return at;
}

/** Whether the layout shown may be kept (on a phone, read on the layouts tab, then back to the 3D view from the top). */
async function keepDisabled(page: Page, phone: boolean): Promise<boolean> {
  if (phone) await page.getByTestId('plan-tab-layouts').click();
  const disabled = (await page.getByTestId('layout-keep').getAttribute('aria-disabled')) === 'true';
  if (phone) {
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
  }
  return disabled;
}

type Input = 'mouse' | 'touch';

/** A finger on the screen, through the browser's own input (the page's touch events, then its pointer events). */
const fingers = new WeakMap<Page, CDPSession>();
async function touch(page: Page, type: 'touchStart' | 'touchMove' | 'touchEnd', at?: Xy) {
  // One session holds the touch from start to end.
  if (!fingers.has(page)) fingers.set(page, await page.context().newCDPSession(page));
  const cdp = fingers.get(page)!;
  await cdp.send('Input.dispatchTouchEvent', { type, touchPoints: at ? [{ x: at.x, y: at.y }] : [] });
}

/** Presses at `from` (mouse button or finger), moves to `to` in steps as a hand would, and (unless told not to) lets go there. */
async function drag(page: Page, input: Input, from: Xy, to: Xy, release = true) {
  const at = (k: number) => ({ x: from.x + ((to.x - from.x) * k) / 12, y: from.y + ((to.y - from.y) * k) / 12 });
  if (input === 'touch') {
    await touch(page, 'touchStart', from);
    for (let k = 1; k <= 12; k++) await touch(page, 'touchMove', at(k));
  } else {
    await page.mouse.move(from.x, from.y);
    await page.mouse.down();
    for (let k = 1; k <= 12; k++) await page.mouse.move(at(k).x, at(k).y);
  }
  if (release) await letGo(page, input);
}
const letGo = (page: Page, input: Input) => (input === 'touch' ? touch(page, 'touchEnd') : page.mouse.up());

/** Waits until the placement's box is drawn at a position other than `not` (or equal to `is`), and returns it. */
async function boxWhen(page: Page, i: number, what: string, test: (b: Box) => boolean): Promise<Box> {
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  let b = (await boxOf(page, i))!;
  for (const until = Date.now() + 10_000; !test(b) && Date.now() < until; ) {
    await page.waitForTimeout(50);
    b = (await boxOf(page, i))!;
  }
  expect(test(b) ? what : `${what}: not so, the box is at ${b.position.join(', ')}`).toBe(what);
  return b;
}
const samePlace = (a: Box) => (b: Box) => b.position.every((v, k) => Math.abs(v - a.position[k]) < 1e-6);

async function dragMarkedPart(page: Page, size: 'wide' | 'phone', input: Input = 'mouse') {
  const phone = size === 'phone';
  expect(await keepDisabled(page, phone)).toBe(false);
  // The camera buttons sit over the picture, not on it: they hide none of the parts framed.
  const bar = (await page.getByRole('toolbar', { name: 'Camera views' }).boundingBox())!;
  const canvas = (await page.locator('[data-testid="plan-build"] canvas').boundingBox())!;
  expect(bar.y + bar.height).toBeLessThanOrEqual(canvas.y + 0.5);
  const { i, j, at } = await markPartBesideAnother(page, input);
  await screenshot(page, `plan-editor-drag-marked-${size}-${input}`);
  const before = (await boxOf(page, i))!;
  const other = (await boxOf(page, j))!;
  const z = before.position[2];

  // 1. 20 mm towards the neighbour: the pointer's travel is what 20 mm on the plate at the part's base looks like.
  const c = centreAt(before, z);
  const towards = [other.position[0] + other.size[0] / 2 - c[0], other.position[1] + other.size[1] / 2 - c[1]];
  const len = Math.hypot(towards[0], towards[1]);
  const u = [towards[0] / len, towards[1] / len];
  const D = 20;
  const p0 = await probe<Xy>(page, 'screenOf', c);
  const p1 = await probe<Xy>(page, 'screenOf', [c[0] + D * u[0], c[1] + D * u[1], z]);
  await drag(page, input, at, { x: at.x + p1.x - p0.x, y: at.y + p1.y - p0.y });
  const moved = await boxWhen(page, i, 'moved by the drag', (b) => !samePlace(before)(b));
  const dx = moved.position[0] - before.position[0];
  const dy = moved.position[1] - before.position[1];
  // Along the drag by about its length (a pixel of the pointer is a fraction of a millimetre here), not across it.
  expect(dx * u[0] + dy * u[1]).toBeGreaterThan(D * 0.85);
  expect(dx * u[0] + dy * u[1]).toBeLessThan(D * 1.15);
  expect(Math.abs(-dx * u[1] + dy * u[0])).toBeLessThan(D * 0.15);
  expect(moved.position[2]).toBe(z);
  await expect(page.getByTestId('plan-marked-at').textContent()).resolves.toBe(
    `at x ${moved.position[0].toFixed(1)}, y ${moved.position[1].toFixed(1)}, z ${z.toFixed(1)} mm`,
  );
  await screenshot(page, `plan-editor-dragged-${size}-${input}`);

  // Undo puts it back where it was.
  await page.getByTestId('plan-undo').click();
  await boxWhen(page, i, 'back after undo', samePlace(before));

  // 2. Onto the neighbour: while the pointer is still down the clash is shown, and after release it blocks keeping.
  await page.getByTestId('view-top').click();
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  const q0 = await probe<Xy>(page, 'screenOf', c);
  const q1 = await probe<Xy>(page, 'screenOf', centreAt(other, z));
  const from = await topOf(page, i);
  await drag(page, input, from, { x: from.x + q1.x - q0.x, y: from.y + q1.y - q0.y }, false);
  await page.getByTestId('plan-edit-faults').waitFor();
  await screenshot(page, `plan-editor-dragging-clash-${size}-${input}`);
  await letGo(page, input);
  await boxWhen(page, i, 'moved onto the neighbour', (b) => !samePlace(before)(b));
  await page.getByTestId('plan-edit-faults').getByText(/closer than the \d+(\.\d+)? mm spacing/).waitFor();
  expect(await keepDisabled(page, phone)).toBe(true);

  // Undo (Ctrl Z on a wide screen) takes the drag back as one change: the part where it was, nothing at fault, the
  // layout may be kept again.
  if (phone) {
    await page.getByTestId('plan-undo').click();
  } else {
    await page.getByTestId('plan-status').click();
    await page.keyboard.press('Control+z');
  }
  await boxWhen(page, i, 'back after undo', samePlace(before));
  await page.getByTestId('plan-edit-faults').waitFor({ state: 'detached' });
  expect(await keepDisabled(page, phone)).toBe(false);
}

describe('dragging marked parts across the plate', () => {
  test('wide (1440 x 900): a drag moves the marked part under the mouse, a drag onto another shows the clash and blocks keeping, undo takes it back', async () => {
    const page = await newPage(served, WIDE);
    planId = await packNewPlan(page);
    await dragMarkedPart(page, 'wide');
    await page.context().close();
  });

  test('phone (390 x 844): the same on the 3D tab', async () => {
    expect(planId).not.toBe('');
    const page = await openPacked(PHONE);
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
    await dragMarkedPart(page, 'phone');
    await page.context().close();
  });

  test('phone (390 x 844), by touch: a finger drags the marked part the same way', async () => {
    expect(planId).not.toBe('');
    const page = await openPacked(PHONE, { touch: true });
    await page.getByTestId('plan-tab-build').click();
    await page.locator('[data-testid="plan-build"] canvas').waitFor();
    await dragMarkedPart(page, 'phone', 'touch');
    await page.context().close();
  });
});

describe("a layout not kept yet is estimated from the parts' shapes", () => {
  test('wide (1440 x 900): once the packing stops the numbers say they come from the shapes, and keeping the layout keeps them', async () => {
    const page = await newPage(served, WIDE);
    planId = await packNewPlan(page);
    // The mesh worker downloads the parts' files and slices the layout; until then the box estimate says so.
    const source = page.getByTestId('num-profile-source');
    await source.getByText(/^From the parts' shapes/).waitFor({ timeout: 30_000 });
    const before = { print: await page.getByTestId('num-print').textContent(), cake: await page.getByTestId('num-cake').textContent() };
    await source.scrollIntoViewIfNeeded();
    await screenshot(page, 'plan-editor-working-from-shapes-wide');

    // The server slices the kept layout the same way: the same print time and powder, from the shapes.
    await page.getByTestId('layout-keep').click();
    await page.getByText(/^Kept as/).waitFor();
    await source.getByText(/^From the parts' shapes/).waitFor({ timeout: 30_000 });
    expect({ print: await page.getByTestId('num-print').textContent(), cake: await page.getByTestId('num-cake').textContent() }).toEqual(before);
    await page.context().close();
  });
});
