import { newPage, PHONE, probe, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { PASSWORD, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { sentForReview } from '../helpers/plans';

jest.setTimeout(240_000);

let served: Served;
// Fixtures go through an app of their own on the same database: the served
// one only takes writes from the browser's origin.
let fixtures: Running;
beforeAll(async () => {
  served = await serveAndLaunch();
  fixtures = await startTestApp();
});
afterAll(async () => {
  await fixtures?.close();
  await served?.close();
});

/** A plan in review that packs ten gears in a whole chamber, for a request already overdue, with a part whose mesh is open. */
async function flaggedPlan(tag: string) {
  const lab = await sentForReview(fixtures, tag);
  const q = (sql: string) => fixtures.db.sequelize.query(sql, { bind: [lab.ids[0]] });
  await q(`UPDATE requests SET due_date = '2026-01-05' WHERE id IN (SELECT rl.request_id FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id WHERE pl.plan_id = $1)`);
  await q(`UPDATE parts SET watertight = false, metrics = metrics || '{"openEdges": 4}'::jsonb
            WHERE id IN (SELECT rl.part_id FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id WHERE pl.plan_id = $1)`);
  return lab;
}

test('on a phone the lead sees each flag of a plan with its reason before the decision', async () => {
  const lab = await flaggedPlan('review-flags-phone');
  const page = await newPage(served, PHONE);
  await signIn(page, lab.email, PASSWORD);
  await page.goto(`/review/${lab.ids[0]}`);
  const flags = page.getByTestId('review-flags');
  await flags.getByTestId('flag-low_density').waitFor();
  await expect(flags.getByTestId('flag-low_density').innerText()).resolves.toMatch(/below this lab's minimum of 8\.0 %/);
  await expect(flags.getByTestId('flag-late_due_date').innerText()).resolves.toMatch(/is due 2026-01-05/);
  await expect(flags.getByTestId('flag-not_watertight').innerText()).resolves.toMatch(/not closed \(4 open edges\)/);
  expect(await flags.getByTestId('flag-material_change').count()).toBe(0);
  await expect(flags.getByTestId('review-flags-count').innerText()).resolves.toBe('3 flags');
  // Nothing runs off the side of a phone.
  const box = await flags.boundingBox();
  expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width);
  await flags.scrollIntoViewIfNeeded();
  await screenshot(page, 'review-flags-phone');

  // The plan's own page on a phone folds each flag to its title, so the tabs and the layout stay near the top;
  // the reason is a tap away.
  await page.goto(`/plans/${lab.ids[0]}`);
  const strip = page.getByTestId('plan-flags');
  const density = strip.getByTestId('flag-low_density');
  await density.waitFor();
  await expect(density.innerText()).resolves.toMatch(/^Low packing density/);
  await expect(density.innerText()).resolves.not.toMatch(/below this lab's minimum/);
  expect(await strip.getByTestId('flag-late_due_date').count()).toBe(1);
  await density.getByTestId('flag-low_density-toggle').click();
  await expect(density.innerText()).resolves.toMatch(/below this lab's minimum of 8\.0 %/);
  await expect(strip.getByTestId('flag-late_due_date').innerText()).resolves.not.toMatch(/is due 2026-01-05/);
  const tabs = await page.getByTestId('plan-tabs').boundingBox();
  expect(tabs!.y).toBeLessThan(PHONE.height);
  await screenshot(page, 'plan-flags-folded-phone');
  await page.context().close();
});

test("on a wide screen a lead lowers the lab's minimum density under Rules and the review no longer flags it; the plan's own page shows the rest", async () => {
  const lab = await flaggedPlan('review-flags-wide');
  const page = await newPage(served, WIDE);
  await signIn(page, lab.email, PASSWORD);
  await page.goto(`/review/${lab.ids[0]}`);
  await page.getByTestId('review-flags').getByTestId('flag-low_density').waitFor();
  await screenshot(page, 'review-flags-wide');

  await page.goto('/settings/rules');
  const field = page.getByTestId('rules-density-value');
  await field.fill('80');
  await page.getByTestId('rules-density-save').click();
  await page.getByText('The minimum must be at most 50 %.').waitFor();
  await field.fill('1');
  await page.getByTestId('rules-density-save').click();
  await page.getByTestId('rules-density-state').getByText('Plans below 1 % are flagged.', { exact: true }).waitFor();
  await screenshot(page, 'review-rules-density-wide');
  expect((await lab.agent.get(`/api/labs/${lab.labId}/settings`)).body.minPackingDensityPercent).toBe(1);

  await page.goto(`/review/${lab.ids[0]}`);
  const flags = page.getByTestId('review-flags');
  await flags.getByTestId('flag-late_due_date').waitFor();
  expect(await flags.getByTestId('flag-low_density').count()).toBe(0);

  await page.goto(`/plans/${lab.ids[0]}`);
  const strip = page.getByTestId('plan-flags');
  await strip.getByTestId('flag-not_watertight').waitFor();
  expect(await strip.getByTestId('flag-late_due_date').count()).toBe(1);
  await screenshot(page, 'review-flags-plan-wide');
  await page.context().close();
});

test('on a wide screen the review draws the chosen layout with the parts\' own meshes and counts its layers as printed, as its numbers do', async () => {
  const lab = await sentForReview(fixtures, 'review-meshes');
  const page = await newPage(served, WIDE);
  await signIn(page, lab.email, PASSWORD);
  await page.goto(`/review/${lab.ids[0]}`);
  await page.locator('[data-testid="review-build"] canvas').waitFor();
  // Every placement drawn by its part's mesh once the part's file is read (before: all as boxes).
  await page.waitForFunction('(() => { const p = window.__chamberProbe; return !!p && p.count > 0 && p.meshed === p.count; })()', undefined, { timeout: 30_000 });
  expect(await probe<number>(page, 'count')).toBe(10);
  // The slider's layer count is the build's as printed (floor margin, parts, top margin), the one the numbers give.
  const slider = /^(\d+) \/ (\d+)$/.exec(((await page.getByTestId('review-layer-slider-layer').textContent()) ?? '').trim());
  expect(slider).not.toBeNull();
  const layers = Number(((await page.getByTestId('num-layers').textContent()) ?? '').trim());
  expect(Number(slider![2])).toBe(layers);
  expect(Number(slider![1])).toBe(layers);
  await expect(page.getByTestId('num-layers-note').innerText()).resolves.toMatch(new RegExp(`^${layers} layers of [\\d.]+ mm as printed: `));
  // Under it, as in the editor, the height no layout of these parts can stand under: the chosen one stands on or over it.
  const floor = /^No layout of these parts (?:by their boxes )?can be lower than ([\d.]+) mm: .+ This layout (stands ([\d.]+) mm over it|is as low as any (?:by boxes )?can be)\.$/.exec(await page.getByTestId('num-floor').innerText());
  expect(floor).not.toBeNull();
  const used = Number(/^([\d.]+) mm$/.exec((await page.getByTestId('num-height').innerText()).trim())![1]);
  expect(Number(floor![1])).toBeLessThanOrEqual(used + 0.05);
  await screenshot(page, 'review-meshes-wide');
  // On a 1,024 px window the rail leaves the page 680 px: the view takes the page's width, with the flags and the
  // decision under it, rather than 300 px beside them.
  await page.setViewportSize({ width: 1024, height: 768 });
  await page.getByTestId('nav-rail').waitFor();
  await page.waitForFunction(() => (document.querySelector('[data-testid="review-build"]')?.getBoundingClientRect().width ?? 0) > 600);
  const [build, decision] = await Promise.all([page.getByTestId('review-build').boundingBox(), page.getByTestId('review-decision').boundingBox()]);
  expect(decision!.y).toBeGreaterThan(build!.y + build!.height);
  await screenshot(page, 'review-meshes-1024');
  await page.context().close();
});

test('a lead undoes an approval within its countdown, then returns the re-approved plan to draft with a reason', async () => {
  const lab = await sentForReview(fixtures, 'review-undo', 2);
  await lab.agent.post(`/api/labs/${lab.labId}/plans/${lab.ids[1]}/review`).send({ decision: 'approve' });
  const page = await newPage(served, WIDE);
  await signIn(page, lab.email, PASSWORD);
  await page.goto(`/review/${lab.ids[0]}`);
  // The flags card says what its points are for, by where the plan is.
  const flagsTitle = (title: string) => page.getByTestId('review-flags').getByRole('heading').getByText(title, { exact: true }).waitFor();
  await flagsTitle('Before you approve');
  await page.getByTestId('review-approve').click();
  const undo = page.getByTestId('review-result-undo');
  await undo.waitFor();
  expect(await undo.innerText()).toMatch(/Undo approval \(\d:\d\d\)/);
  await flagsTitle('Before it prints');
  expect(await page.getByTestId('review-flags').getByText('Before you approve').count()).toBe(0);
  await screenshot(page, 'review-undo-approval-wide');
  await undo.click();
  await page.getByTestId('review-undone').getByText('The planner was e-mailed.', { exact: false }).waitFor();
  await page.getByTestId('review-status').getByText('In review').waitFor();
  await flagsTitle('Before you approve');

  // Approved again, then taken back to draft: the reason is asked for first and lands in the history.
  await page.getByTestId('review-approve').click();
  await page.getByTestId('return-to-draft').click();
  await page.getByTestId('return-to-draft-confirm').click();
  await page.getByText('The reason is required: say why the plan goes back to draft.').waitFor();
  await page.getByTestId('return-to-draft-reason').fill('The gears need a finer pitch');
  await screenshot(page, 'review-return-to-draft-wide');
  await page.getByTestId('return-to-draft-confirm').click();
  await page.getByTestId('review-status').getByText('Draft').waitFor();
  await page.getByTestId('review-history').getByText('The gears need a finer pitch').waitFor();
  await flagsTitle('Before it goes to review');

  expect((await lab.agent.get(`/api/labs/${lab.labId}/plans/${lab.ids[0]}`)).body.queuePosition).toBeNull();
  await page.context().close();
});

test('on a phone the undo countdown and the return to draft fit the screen', async () => {
  const lab = await sentForReview(fixtures, 'review-undo-phone', 2);
  const base = `/api/labs/${lab.labId}/plans`;
  await lab.agent.post(`${base}/${lab.ids[1]}/review`).send({ decision: 'approve' });
  const page = await newPage(served, PHONE);
  await signIn(page, lab.email, PASSWORD);
  await page.goto(`/review/${lab.ids[0]}`);
  await page.getByTestId('review-approve').click();
  const undo = page.getByTestId('review-result-undo');
  await undo.waitFor();
  await undo.scrollIntoViewIfNeeded();
  const box = await page.getByTestId('review-result').boundingBox();
  expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width);
  await screenshot(page, 'review-undo-approval-phone');
  await page.getByTestId('review-flags').getByText('Before it prints', { exact: true }).waitFor();

  // Returning it to draft asks for the reason in a form that fits the phone; kept as it was here.
  await page.getByTestId('return-to-draft').click();
  await page.getByTestId('return-to-draft-confirm').click();
  await page.getByText('The reason is required: say why the plan goes back to draft.').waitFor();
  await page.getByTestId('return-to-draft-reason').fill('The gears need a finer pitch');
  await page.getByTestId('return-to-draft-form').scrollIntoViewIfNeeded();
  const form = await page.getByTestId('return-to-draft-form').boundingBox();
  expect(form!.x + form!.width).toBeLessThanOrEqual(PHONE.width);
  await screenshot(page, 'review-return-to-draft-phone');
  await page.getByTestId('return-to-draft-keep').click();

  // The queue on a phone: move the new plan up, undo it.
  await page.goto(`/queue?machine=${lab.machineId}`);
  await page.getByTestId('queue-item-1').waitFor();
  expect(await page.getByTestId('queue-item-1-name').textContent()).toBe('Plan 1');
  await page.getByTestId('queue-up-1').click();
  await page.getByTestId('queue-moved-undo').waitFor();
  await page.getByTestId('queue-item-0-name').getByText('Plan 1').waitFor();
  await page.getByTestId('queue-moved').scrollIntoViewIfNeeded();
  await screenshot(page, 'queue-undo-move-phone');
  await page.getByTestId('queue-moved-undo').click();
  await page.getByTestId('queue-move-undone').waitFor();
  await page.getByTestId('queue-item-0-name').getByText('Plan 2').waitFor();

  // The same move and its undo on a wide screen.
  await page.setViewportSize(WIDE);
  await page.getByTestId('nav-rail').waitFor();
  await page.getByTestId('queue-up-1').click();
  await page.getByTestId('queue-moved-undo').waitFor();
  await page.getByTestId('queue-item-0-name').getByText('Plan 1').waitFor();
  await screenshot(page, 'queue-undo-move-wide');
  await page.getByTestId('queue-moved-undo').click();
  await page.getByTestId('queue-move-undone').waitFor();
  await page.getByTestId('queue-item-0-name').getByText('Plan 2').waitFor();
  const order = (await lab.agent.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/queue`)).body.plans.map((p: { name: string }) => p.name);
  expect(order).toEqual(['Plan 2', 'Plan 1']);
  await page.context().close();
});
