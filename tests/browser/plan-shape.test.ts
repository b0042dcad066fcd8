// Packing a plan by the parts' shapes in the editor: the choice, the packing worker downloading the parts' files,
// keeping the layout (the server checks the meshes), filling the rest by shape above it, and moving a part by hand.
import type { Page } from 'playwright-core';
import { boxOf, markAPart, moveIntoClash, newPage, PHONE, probe, screenshot, serveAndLaunch, WIDE, type Box, type Served, signIn, urgentDemoRequest } from '../helpers/browser';
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
async function framesAndPegs(o: { quantity: number; pegName: string; pegMesh: typeof peg } = { quantity: 6, pegName: 'Shape peg', pegMesh: peg }) {
  const n = ++requests;
  await urgentDemoRequest(
    served,
    [
      { name: `Shape frame ${n}`, sizeMm: [60, 60, 20], quantity: o.quantity, orientation: 'keep_up', mesh: frame },
      { name: `${o.pegName} ${n}`, sizeMm: [16, 16, 10], quantity: o.quantity, orientation: 'keep_up', mesh: o.pegMesh },
    ],
    `Shape check ${n}`,
  );
  return n;
}

async function newPlan(page: Page, request: () => Promise<unknown> = framesAndPegs) {
  await request();
  await signIn(page, 'planner@tinkerfin.example');
  await page.goto('/plans');
  await page.getByTestId('plans-new').click();
  await page.getByTestId('new-plan-lines').waitFor();
  await page.getByTestId('new-plan-create').click();
  await page.getByTestId('screen-plan-editor').waitFor();
}

type ShownPlacement = { id: string; position: [number, number, number]; size: [number, number, number] };

/** The newest kept layout of the plan on screen, as the API returns it. */
async function layoutShown(page: Page): Promise<{ placements: ShownPlacement[] }> {
  const get = async (path: string) => (await page.request.get(`/api${path}`)).json();
  const labId = (await get('/me')).labs[0].id as string;
  const planId = /\/plans\/([0-9a-f-]{36})/.exec(page.url())![1];
  const plan = await get(`/labs/${labId}/plans/${planId}`);
  const newest = [...plan.layouts].sort((x: { createdAt: string }, y: { createdAt: string }) => (x.createdAt < y.createdAt ? 1 : -1))[0];
  return (await get(`/labs/${labId}/plans/${planId}/layouts/${newest.id}`)).result;
}

async function packByShape(page: Page) {
  await page.getByTestId('pack-fit-shape').click();
  await page.getByTestId('pack-fit-note').waitFor();
  await page.getByTestId('pack-time').fill('3');
  // A dozen parts need no more time than this (the note on the time limit comes from 200 parts on).
  expect(await page.getByTestId('pack-time-note').count()).toBe(0);
  await page.getByTestId('pack-start').click();
  // Three seconds of packing after the parts' files are read: the progress shows meanwhile.
  await page.getByTestId('pack-progress').waitFor();
  await page.getByTestId('pack-start').waitFor({ timeout: 90_000 });
  await page.waitForFunction("!document.querySelector('[data-testid=\"pack-progress\"]')");
}

test('wide (1440 x 900): packed by shape, kept after the server checks the meshes, labelled by shape, then filled by shape above it', async () => {
  const page = await newPage(served, WIDE);
  await newPlan(page);
  await packByShape(page);
  // The numbers of the layout not kept come from the meshes, as for a packing by boxes.
  await page.getByTestId('num-profile-source').getByText(/^From the parts' shapes/).waitFor({ timeout: 30_000 });
  // Beside them, what the same layout counted as boxes would read.
  await page.getByTestId('num-by-boxes').getByText(/^Counted as boxes, the same layout would (also )?read [\d.]+ h to print/).waitFor();
  // Under them, the height no layout of these parts can stand under, what sets it, and how far this one stands over it.
  const floorText = (await page.getByTestId('num-floor').textContent())!;
  const floor = /^No layout of these parts can be lower than ([\d.]+) mm: .+ over the [\d.]+ mm floor margin\. This layout (stands ([\d.]+) mm over it|is as low as any can be)\.$/.exec(floorText);
  expect(floor).not.toBeNull();
  const used = Number(/^([\d.]+) mm$/.exec((await page.getByTestId('num-height').textContent())!)![1]);
  expect(Number(floor![1])).toBeLessThanOrEqual(used + 0.05);
  if (floor![3]) expect(Number(floor![1]) + Number(floor![3])).toBeCloseTo(used, 0);
  await screenshot(page, 'plan-editor-packed-by-shape-wide');

  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as "Seed \d+ by shape · \d+ layers"/).waitFor({ timeout: 60_000 });
  await page.getByText(/^by shape · /).first().waitFor();
  // The layouts compared: the kept one's print time from the shapes, with the boxes' under it.
  await page.locator('[data-testid^="layout-hours-boxes-"]').getByText(/^boxes [\d.]+ h$/).first().waitFor();
  // Filling the rest packs the material's other open lines by shape in the space above the kept parts, which
  // stay where they are; the whole layout is checked against the meshes again when it is kept.
  const keptLayout = await layoutShown(page);
  // Another request of pegs in the material comes in: the plan does not hold its line yet.
  await urgentDemoRequest(served, [{ name: `Shape peg later ${requests}`, sizeMm: [16, 16, 10], quantity: 4, orientation: 'keep_up', mesh: peg }], `Shape fill ${requests}`);
  await page.reload();
  await page.getByTestId('screen-plan-editor').waitFor();
  await page.getByTestId('pack-fit-shape').click();
  await page.getByText('Fill the rest (4 open parts)').waitFor({ timeout: 30_000 });
  await page.getByTestId('pack-fill').click();
  await page.getByTestId('pack-progress').waitFor();
  await page.getByTestId('pack-start').waitFor({ timeout: 120_000 });
  await page.getByText('Added').first().waitFor();
  await screenshot(page, 'plan-editor-filled-by-shape-wide');
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as "Filled by shape · \d+ layers"/).waitFor({ timeout: 90_000 });
  const filled = await layoutShown(page);
  expect(filled.placements.length).toBeGreaterThan(keptLayout.placements.length);
  const at = (p: ShownPlacement) => `${p.id}@${p.position.map((v) => v.toFixed(6)).join(',')}`;
  const filledKeys = new Set(filled.placements.map(at));
  for (const p of keptLayout.placements) expect(filledKeys.has(at(p))).toBe(true);
  await page.context().close();
});

for (const [size, viewport] of [['wide (1440 x 900)', WIDE], ['phone (390 x 844)', PHONE]] as const) {
  test(`${size}: a part whose mesh is not closed is packed by its box, the editor says which and why, and the layout is kept`, async () => {
    // The peg's mesh with one triangle taken out: it has an open edge, so it has no inside to nest by.
    const open = { positions: peg.positions, indices: peg.indices.slice(0, peg.indices.length - 3) };
    let n = 0;
    const page = await newPage(served, viewport);
    await newPlan(page, async () => (n = await framesAndPegs({ quantity: 2, pegName: 'Open peg', pegMesh: open })));
    if (viewport === PHONE) await page.getByTestId('plan-tab-lines').click();
    // Before the run, the choice of shapes names it.
    await page.getByTestId('pack-fit-shape').click();
    await page.getByTestId('pack-open-note').getByText(`"Open peg ${n}" has a mesh that is not closed: packing by shape packs it by its box.`, { exact: false }).waitFor();
    await packByShape(page);
    const notes = page.getByTestId('pack-notes');
    await notes.getByText(`"Open peg ${n}" was packed by its bounding box: its mesh "Open peg ${n}.stl" is not closed`, { exact: false }).waitFor({ timeout: 30_000 });
    // The closed frame is not named: it was packed by its shape.
    expect(await notes.textContent()).not.toContain('Shape frame');
    await page.getByTestId('pack-open-note').scrollIntoViewIfNeeded();
    await screenshot(page, `plan-editor-open-mesh-by-box-${viewport === PHONE ? 'phone' : 'wide'}`);
    // The server checks the layout against the meshes it has (the open peg by its box) and keeps it.
    if (viewport === PHONE) await page.getByTestId('plan-tab-layouts').click();
    await page.getByTestId('layout-keep').click();
    await page.getByText(/^Kept as "Seed \d+ by shape/).waitFor({ timeout: 60_000 });
    await page.context().close();
  });
}

async function boxesShown(page: Page): Promise<Box[]> {
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  const n = await probe<number>(page, 'count');
  const out: Box[] = [];
  for (let k = 0; k < n; k++) out.push((await boxOf(page, k))!);
  return out;
}
const isPeg = (b: Box) => Math.abs(b.size[2] - 10) < 0.01;
const isFrame = (b: Box) => Math.abs(b.size[2] - 20) < 0.01;
/** The 30 mm hole of a frame (15 to 45 mm from its corner) holds the peg's box in plan. */
const inHole = (peg: { position: readonly number[] }, frame: { position: readonly number[] }) =>
  [0, 1].every((a) => peg.position[a] >= frame.position[a] + 15 - 1e-6 && peg.position[a] + 16 <= frame.position[a] + 45 + 1e-6);

test('wide (1440 x 900): a peg dragged, then moved with the keys, into a frame\'s hole is clear by the shapes though its box is inside the frame\'s (while the drag is held too), and is kept so', async () => {
  const page = await newPage(served, WIDE);
  await newPlan(page);
  await packByShape(page);
  await page.getByTestId('view-top').click();
  const boxes = await boxesShown(page);
  // A frame whose hole is empty, and a peg whose top is in sight (clicking there marks it).
  const frame = boxes.find((f) => isFrame(f) && !boxes.some((p) => isPeg(p) && inHole(p, f)))!;
  expect(frame).toBeDefined();
  let peg = -1;
  let grip = { x: 0, y: 0 };
  for (let i = 0; i < boxes.length && peg < 0; i++) {
    if (!isPeg(boxes[i]) || boxes.some((f) => isFrame(f) && inHole(boxes[i], f))) continue;
    const b = boxes[i];
    const at = await probe<{ x: number; y: number }>(page, 'screenOf', [b.position[0] + 8, b.position[1] + 8, b.position[2] + 10]);
    if ((await probe<number | null>(page, 'placementAt', at.x, at.y)) !== i) continue;
    await page.mouse.click(at.x, at.y);
    peg = i;
    grip = at;
  }
  expect(peg).toBeGreaterThanOrEqual(0);
  await page.getByTestId('plan-marked').waitFor();
  const start = boxes[peg];
  const holeAt = (b: Box) => Math.abs(b.position[0] - (frame.position[0] + 22)) < 2 && Math.abs(b.position[1] - (frame.position[1] + 22)) < 2;

  // First with the mouse: while the button is still down, the dragged part's pairs are checked against the meshes in
  // the worker. Held over the frame's solid wall, the peg is at fault; over the hole, the fault goes away (the boxes'
  // check would keep it: the peg's box is inside the frame's) before the release.
  const z = start.position[2];
  const p0 = await probe<{ x: number; y: number }>(page, 'screenOf', [start.position[0], start.position[1], z]);
  const screenAt = async (dx: number, dy: number) => {
    const p = await probe<{ x: number; y: number }>(page, 'screenOf', [frame.position[0] + dx, frame.position[1] + dy, z]);
    return { x: grip.x + p.x - p0.x, y: grip.y + p.y - p0.y };
  };
  const dragTo = async (from: { x: number; y: number }, to: { x: number; y: number }) => {
    for (let k = 1; k <= 12; k++) await page.mouse.move(from.x + ((to.x - from.x) * k) / 12, from.y + ((to.y - from.y) * k) / 12);
  };
  const wallAt = (b: Box) => Math.abs(b.position[0] - (frame.position[0] + 2)) < 2 && Math.abs(b.position[1] - (frame.position[1] + 22)) < 2;
  const [onWall, overHole] = [await screenAt(2, 22), await screenAt(22, 22)];
  await page.mouse.move(grip.x, grip.y);
  await page.mouse.down();
  await dragTo(grip, onWall);
  for (const until = Date.now() + 10_000; !wallAt((await boxOf(page, peg))!) && Date.now() < until; ) await page.waitForTimeout(50);
  expect(wallAt((await boxOf(page, peg))!)).toBe(true);
  await page.getByTestId('plan-edit-faults').waitFor({ timeout: 20_000 });
  // The notice names the check that marked them: the meshes', not the boxes'.
  expect(await page.getByTestId('plan-edit-faults').textContent()).toMatch(/By the parts' shapes, 2 parts are closer than the 3 mm spacing/);
  await screenshot(page, 'plan-editor-peg-held-on-wall-wide');
  await dragTo(onWall, overHole);
  for (const until = Date.now() + 10_000; !holeAt((await boxOf(page, peg))!) && Date.now() < until; ) await page.waitForTimeout(50);
  expect(holeAt((await boxOf(page, peg))!)).toBe(true);
  await page.waitForFunction(() => !document.querySelector('[data-testid="plan-edit-faults"]'), undefined, { timeout: 20_000 });
  await screenshot(page, 'plan-editor-peg-dragged-over-hole-wide');
  await page.mouse.up();
  await page.waitForFunction(() => !document.querySelector('[data-testid="plan-shape-check"]'), undefined, { timeout: 30_000 });
  expect(await page.getByTestId('plan-edit-faults').count()).toBe(0);
  expect((await boxesShown(page)).some((p) => isPeg(p) && inHole(p, frame))).toBe(true);
  // Taken back, to go there again with the keys.
  await page.getByTestId('plan-status').click();
  await page.keyboard.press('Control+z');
  for (const until = Date.now() + 10_000; holeAt((await boxOf(page, peg))!) && Date.now() < until; ) await page.waitForTimeout(50);
  expect((await boxesShown(page)).some((p) => isPeg(p) && inHole(p, frame))).toBe(false);
  // With the arrow keys (5 mm, Shift 1 mm) to the middle of the hole: 7 mm from its walls, more than the 3 mm spacing.
  const move = async (d: number, plus: string, minus: string) => {
    const key = d >= 0 ? plus : minus;
    const steps = Math.round(Math.abs(d));
    for (let k = 0; k < Math.floor(steps / 5); k++) await page.keyboard.press(key);
    for (let k = 0; k < steps % 5; k++) await page.keyboard.press(`Shift+${key}`);
  };
  await move(frame.position[0] + 22 - boxes[peg].position[0], 'ArrowRight', 'ArrowLeft');
  await move(frame.position[1] + 22 - boxes[peg].position[1], 'ArrowUp', 'ArrowDown');
  // The boxes' quick check finds the peg inside the frame's box; the check against the meshes then clears it.
  await page.waitForFunction(
    () => !document.querySelector('[data-testid="plan-shape-check"]') && !document.querySelector('[data-testid="plan-edit-faults"]'),
    undefined,
    { timeout: 30_000 },
  );
  const after = await boxesShown(page);
  expect(after.some((p) => isPeg(p) && inHole(p, frame))).toBe(true);
  await screenshot(page, 'plan-editor-peg-moved-into-hole-wide');
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as "Edited by shape · \d+ layers"/).waitFor({ timeout: 60_000 });
  // The server's own check against the meshes let it through: the kept layout has the peg in the hole.
  const kept = await layoutShown(page);
  expect(kept.placements.some((p) => isPeg(p) && kept.placements.some((f) => isFrame(f) && inHole(p, f)))).toBe(true);
  await page.context().close();
});

test('phone (390 x 844): the choice and the packing on the lines tab, the parts drawn in the 3D tab, a part moved and dropped by hand', async () => {
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
  await page.getByText(/a drop lowers parts into hollows/).waitFor();
  await page.waitForFunction('!!window.__chamberProbe', undefined, { timeout: 10_000 });
  await page.waitForTimeout(500);
  await screenshot(page, 'plan-editor-kept-by-shape-phone');

  // A part moved by hand is checked by its box at once, then against the meshes in the packing worker: moved
  // into another part it is at fault and the layout cannot be kept; dropped, it is lifted clear and comes down as
  // far as its shape allows, is listed again where it can be lifted out in turn, and the layout is kept once the
  // server has checked the meshes.
  await markAPart(page, false);
  await page.getByTestId('plan-move-left').scrollIntoViewIfNeeded();
  await moveIntoClash(page);
  // The check against the meshes answers: the notice then speaks of the shapes (or is gone, if only the boxes met).
  await page.waitForFunction(
    () => {
      const notice = document.querySelector('[data-testid="plan-edit-faults"]');
      return !document.querySelector('[data-testid="plan-shape-check"]') && (!notice || /By the parts' shapes/.test(notice.textContent ?? ''));
    },
    undefined,
    { timeout: 30_000 },
  );
  await page.getByTestId('plan-drop').click();
  await page.getByTestId('plan-edit-faults').waitFor({ state: 'detached' });
  await page.getByTestId('plan-shape-check').waitFor({ state: 'detached' });
  await screenshot(page, 'plan-editor-dropped-by-shape-phone');
  await page.getByTestId('plan-tab-layouts').click();
  await page.getByTestId('layout-keep').click();
  await page.getByText(/^Kept as "Edited by shape · \d+ layers"/).waitFor({ timeout: 60_000 });
  await page.context().close();
});
