// Packing a plan by the parts' shapes in the editor: the choice, the packing worker downloading the parts' files,
// keeping the layout (the server checks the meshes), and what a layout by shape no longer offers (hand moves, fill).
import type { Page } from 'playwright-core';
import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn, urgentDemoRequest } from '../helpers/browser';
import { prism, prismWithHoles } from '../../shared/geometry';

jest.setTimeout(300_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

// A 60 x 60 x 20 mm frame with a 30 x 30 mm hole through it, and a 16 x 16 x 10 mm peg that fits in the hole.
const frame = prismWithHoles([[0, 0], [60, 0], [60, 60], [0, 60]], [[[15, 15], [15, 45], [45, 45], [45, 15]]], 0, 20);
const peg = prism([[0, 0], [16, 0], [16, 16], [0, 16]], 0, 10);

/** An urgent request of frames and pegs in the demo lab, so the new plan form starts with them. */
let requests = 0;
async function framesAndPegs() {
  const n = ++requests;
  await urgentDemoRequest(
    served,
    [
      { name: `Shape frame ${n}`, sizeMm: [60, 60, 20], quantity: 6, orientation: 'keep_up', mesh: frame },
      { name: `Shape peg ${n}`, sizeMm: [16, 16, 10], quantity: 6, orientation: 'keep_up', mesh: peg },
    ],
    `Shape check ${n}`,
  );
}

async function newPlan(page: Page) {
  await framesAndPegs();
  await signIn(page, 'planner@tinkerfin.example');
  await page.goto('/plans');
  await page.getByTestId('plans-new').click();
  await page.getByTestId('new-plan-lines').waitFor();
  await page.getByTestId('new-plan-create').click();
  await page.getByTestId('screen-plan-editor').waitFor();
}

async function packByShape(page: Page) {
  await page.getByTestId('pack-fit-shape').click();
  await page.getByTestId('pack-fit-note').waitFor();
  await page.getByTestId('pack-time').fill('3');
  await page.getByTestId('pack-start').click();
  // Three seconds of packing after the parts' files are read: the progress shows meanwhile.
  await page.getByTestId('pack-progress').waitFor();
  await page.getByTestId('pack-start').waitFor({ timeout: 90_000 });
  await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
}

test('wide (1440 x 900): packed by shape, kept after the server checks the meshes, labelled by shape; fill is not offered on it', async () => {
  const page = await newPage(served, WIDE);
  await newPlan(page);
  await packByShape(page);
  // The numbers of the layout not kept come from the meshes, as for a packing by boxes.
  await page.getByTestId('num-profile-source').getByText(/^From the parts' shapes/).waitFor({ timeout: 30_000 });
  await screenshot(page, 'plan-editor-packed-by-shape-wide');

  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as "Seed \d+ by shape · \d+ layers"/).waitFor({ timeout: 60_000 });
  await page.getByText(/^by shape · /).first().waitFor();
  // Filling adds boxes above a layout of boxes: on a layout by shape the planner is told to pack again instead.
  expect(await page.getByTestId('pack-fill').getAttribute('aria-disabled')).toBe('true');
  await page.getByText(/^Filling adds parts by their boxes/).waitFor();
  await page.context().close();
});

test('phone (390 x 844): the choice and the packing on the lines tab, the parts drawn in the 3D tab', async () => {
  const page = await newPage(served, PHONE);
  await newPlan(page);
  await page.getByTestId('plan-tabs').waitFor();
  await page.getByTestId('plan-tab-lines').click();
  await packByShape(page);
  await page.getByTestId('pack-fit-note').scrollIntoViewIfNeeded();
  await screenshot(page, 'plan-editor-fit-by-shape-phone');
  await page.getByTestId('plan-tab-layouts').click();
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as "Seed \d+ by shape/).waitFor({ timeout: 60_000 });
  await page.getByTestId('plan-tab-build').click();
  await page.locator('[data-testid="plan-build"] canvas').waitFor();
  await page.getByText(/Packed by shape: pack again to change/).waitFor();
  await page.waitForFunction('!!window.__chamberProbe', undefined, { timeout: 10_000 });
  await page.waitForTimeout(500);
  await screenshot(page, 'plan-editor-kept-by-shape-phone');
  await page.context().close();
});
