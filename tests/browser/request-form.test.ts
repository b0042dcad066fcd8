import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { PASSWORD, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { labWithProfiles, makeRequest } from '../helpers/plans';

jest.setTimeout(180_000);

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

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('the new-request form on a %s', (name, viewport) => {
  test('brings the first problem into view, clears each message once its field is fixed, labels the quantity and shows the date as year-month-day', async () => {
    const lab = await labWithProfiles(fixtures, `request-form-${name}`);
    await makeRequest(fixtures, lab.labId, lab.userId, lab.materialId, [{ name: 'Strain relief clip', sizeMm: [20, 8, 6], quantity: 1 }]);
    const page = await newPage(served, viewport);
    await signIn(page, lab.email, PASSWORD);
    await page.goto('/requests/new');
    await page.getByTestId('request-form').waitFor();

    await page.getByTestId('request-part-search').fill('strain');
    const add = page.locator('[data-testid^="request-add-part-"]').first();
    await add.waitFor();
    await add.click();
    const line = page.getByTestId('request-line-0');
    await line.waitFor();
    await line.getByText('Quantity', { exact: true }).waitFor();
    await page.getByTestId('request-line-0-quantity').fill('0');

    // Submit from the bottom of the form: the empty title at the top must come into view.
    await page.getByTestId('request-submit').scrollIntoViewIfNeeded();
    await page.getByTestId('request-submit').click();
    const titleError = page.getByTestId('request-title-error');
    await titleError.waitFor();
    await page.waitForFunction(
      "(() => { const el = document.querySelector('[data-testid=\"request-title-error\"]'); if (!el) return false; const r = el.getBoundingClientRect(); return r.top >= 0 && r.bottom <= window.innerHeight; })()",
      undefined,
      { timeout: 5000 },
    );
    // The message says what to do, not only that something is missing.
    expect(await titleError.textContent()).toBe('Is required: give the request a short title');
    await screenshot(page, `request-form-first-error-${name}`);
    await page.getByTestId('request-line-0-error').waitFor();

    // Fixing a field takes its message away at once, before the next attempt.
    await page.getByTestId('request-title').fill('Clips for the gripper');
    expect(await titleError.count()).toBe(0);
    expect(await page.getByTestId('request-line-0-error').count()).toBe(1);
    await page.getByTestId('request-line-0-quantity').fill('12');
    expect(await page.getByTestId('request-line-0-error').count()).toBe(0);

    // The due date reads as year-month-day, with the month spelled out beneath.
    await page.getByTestId('request-due').fill('2027-03-01');
    expect(await page.getByTestId('request-due').inputValue()).toBe('2027-03-01');
    expect(await page.getByTestId('request-due-spelled').innerText()).toContain('Monday 1 March 2027');
    await screenshot(page, `request-form-fixed-${name}`);
    await page.getByTestId('request-submit').click();
    await page.getByTestId('screen-request').waitFor();
    expect(await page.getByTestId('request-due-date').innerText()).toContain('2027-03-01');
    await page.context().close();
  });
});

test.each([
  ['phone', PHONE],
  ['wide', WIDE],
])("on a %s screen a part's page files a request for it: the form starts with the part on a line and its default material", async (name, viewport) => {
  const lab = await labWithProfiles(fixtures, `request-this-part-${name}`);
  const made = await makeRequest(fixtures, lab.labId, lab.userId, lab.materialId, [{ name: 'Cable saddle', sizeMm: [18, 10, 7], quantity: 1 }]);
  const partId = made.lines[0].partId;
  const page = await newPage(served, viewport);
  await signIn(page, lab.email, PASSWORD);
  await page.goto(`/parts/${partId}`);
  await page.getByTestId('part-request').waitFor();
  await page.getByTestId('part-preview').locator('canvas').waitFor();
  await screenshot(page, `part-request-this-part-${name}`);
  await page.getByTestId('part-request').click();
  await page.getByTestId('request-form').waitFor();
  expect(new URL(page.url()).searchParams.get('partId')).toBe(partId);
  await page.getByTestId('request-line-0').getByText('Cable saddle').waitFor();
  expect(await page.getByTestId('request-line-0-quantity').inputValue()).toBe('1');
  await screenshot(page, `request-this-part-${name}`);
  await page.getByTestId('request-title').fill('Saddles for the test rig');
  await page.getByTestId('request-line-0-quantity').fill('6');
  await page.getByTestId('request-submit').click();
  await page.getByTestId('screen-request').waitFor();
  const requestId = /\/requests\/([0-9a-f-]{36})/.exec(page.url())![1];
  const [[line]] = (await fixtures.db.sequelize.query(
    'SELECT l.part_id, l.quantity, r.material_id FROM request_lines l JOIN requests r ON r.id = l.request_id WHERE r.id = $1',
    { bind: [requestId] },
  )) as [Array<{ part_id: string; quantity: number; material_id: string }>, unknown];
  expect(line).toEqual({ part_id: partId, quantity: 6, material_id: lab.materialId });
  await page.context().close();
});

