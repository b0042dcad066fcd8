import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { PASSWORD, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { createPlan } from '../helpers/plans';
import { labWithCrew } from '../api/runs-fixtures';
import { prism, writeBinaryStl } from '../../shared/geometry';

jest.setTimeout(240_000);

let served: Served;
let fixtures: Running;
beforeAll(async () => {
  served = await serveAndLaunch();
  fixtures = await startTestApp();
});
afterAll(async () => {
  await fixtures?.close();
  await served?.close();
});

const block = (x: number, y: number, z: number) => Buffer.from(writeBinaryStl(prism([[0, 0], [x, 0], [x, y], [0, y]], 0, z), 'block'));

/** A designer's part already in a plan. */
async function plannedPart(tag: string) {
  const lab = await labWithCrew(fixtures, tag);
  const up = await lab.designer.agent.post(`/api/labs/${lab.labId}/parts`).attach('file', block(20, 10, 5), 'bracket.stl');
  const partId = up.body.parts[0].id as string;
  const req = await lab.designer.agent
    .post(`/api/labs/${lab.labId}/requests`)
    .send({ title: 'Brackets', materialId: lab.materialId, dueDate: '2027-06-01', lines: [{ partId, quantity: 4 }] });
  await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, [{ id: req.body.lines[0].id, quantity: 4 }], 'Bracket build');
  return { ...lab, partId };
}

for (const [size, viewport] of [['wide', WIDE], ['phone', PHONE]] as const) {
  test(`on a ${size} screen a designer adds a new file to a part; the old revision stays with the planned build`, async () => {
    const lab = await plannedPart(`revisions-${size}`);
    const page = await newPage(served, viewport);
    await signIn(page, lab.designer.email, PASSWORD);
    await page.goto(`/parts/${lab.partId}`);
    const card = page.getByTestId('part-revisions');
    await card.getByTestId('part-revision-1').waitFor();
    await page.getByTestId('part-revision-drop-input').setInputFiles({ name: 'bracket-wider.stl', mimeType: 'model/stl', buffer: block(30, 10, 5) });

    // The page moves to the new revision; the old one is listed with the build that keeps it.
    await page.waitForURL((u) => !u.pathname.endsWith(lab.partId));
    await page.getByTestId('part-revision-2').waitFor();
    await expect(page.getByTestId('part-revision-1-plans').innerText()).resolves.toMatch(/Used by Bracket build \(draft\)/);
    await expect(page.getByTestId('part-revision-2-plans').innerText()).resolves.toBe('No plan uses this file.');
    await expect(page.getByTestId('part-metric-size').innerText()).resolves.toMatch(/30/);
    await page.getByTestId('part-revisions').scrollIntoViewIfNeeded();
    const box = await page.getByTestId('part-revisions').boundingBox();
    expect(box!.x + box!.width).toBeLessThanOrEqual(viewport.width);
    await screenshot(page, `part-revisions-${size}`);

    // The old revision says so and leads to the newest.
    await page.getByTestId('part-revision-1-open').click();
    await page.getByTestId('part-revision-older').waitFor();
    expect(await page.getByTestId('part-revision-drop-input').count()).toBe(0);
    await page.context().close();
  });
}
