import type { Page } from 'playwright-core';
import { ARTIFACTS, newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';

jest.setTimeout(300_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

async function packNewPlan(page: Page): Promise<string> {
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
    const plot = page.getByTestId('area-chart-plot');
    await plot.scrollIntoViewIfNeeded();
    const box = (await plot.boundingBox())!;
    await plot.hover({ position: { x: box.width - 1, y: box.height / 2 } });
    await page.getByTestId('area-chart-readout').getByText(new RegExp(`^Layer ${layers} of ${layers} ·`)).waitFor();
    // Stepping the cut down one layer from the top names the layer under it.
    await page.getByTestId('plan-layer-slider').focus();
    await page.keyboard.press('ArrowDown');
    expect(await sliderLayers(page)).toEqual({ at: layers - 1, of: layers });
    await screenshot(page, 'plan-editor-layers-wide');
    await page.context().close();
  });

  test('phone (390 x 844): the 3D tab and the numbers tab show the same count', async () => {
    expect(planId).not.toBe('');
    const page = await newPage(served, PHONE);
    await signIn(page, 'planner@tinkerfin.example');
    await page.goto(`/plans/${planId}`);
    await page.getByTestId('plan-tabs').waitFor();
    // The packing not kept stays in this browser's draft only on the wide page: pack again here.
    await page.getByTestId('plan-tab-lines').click();
    await page.getByTestId('pack-time').fill('2');
    await page.getByTestId('pack-start').click();
    await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
    await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
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
    const page = await newPage(served, PHONE);
    await signIn(page, 'planner@tinkerfin.example');
    await page.goto(`/plans/${planId}`);
    await page.getByTestId('plan-tabs').waitFor();
    await page.getByTestId('plan-tab-lines').click();
    await page.getByTestId('pack-time').fill('2');
    await page.getByTestId('pack-start').click();
    await page.getByTestId('pack-start').waitFor({ timeout: 60_000 });
    await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
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
