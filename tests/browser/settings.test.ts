import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { addMember, PASSWORD, signUp, startTestApp, uniqueEmail } from '../helpers/app';
import type { Running } from '../../server/boot';
import { labWithProfiles, sentForReview } from '../helpers/plans';

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

test('on a phone every settings section, Account included, is on screen without scrolling sideways', async () => {
  const lead = await signUp(fixtures, 'settings-phone');
  const page = await newPage(served, PHONE);
  await signIn(page, lead.email, PASSWORD);
  await page.goto('/settings/members');
  await page.getByTestId('settings-members').waitFor();
  for (const key of ['members', 'invites', 'machines', 'materials', 'account']) {
    const box = await page.getByTestId(`settings-section-${key}`).boundingBox();
    expect(box).not.toBeNull();
    expect(box!.x).toBeGreaterThanOrEqual(0);
    expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width);
  }
  await screenshot(page, 'settings-sections-phone');
  await page.getByTestId('settings-section-account').click();
  await page.waitForURL(/\/settings\/account/);
  await page.context().close();
});

const SIZES = [
  ['wide', WIDE],
  ['phone', PHONE],
] as const;

test.each(SIZES)('on a %s screen an invite starts with no role ticked and is refused until one is chosen', async (name, viewport) => {
  const lead = await signUp(fixtures, `settings-invite-${name}`);
  const page = await newPage(served, viewport);
  await signIn(page, lead.email, PASSWORD);
  await page.goto('/settings/invites');
  await page.getByTestId('invite-form').waitFor();
  for (const r of ['designer', 'planner', 'lead', 'operator']) {
    expect(await page.getByTestId(`invite-role-${r}`).getAttribute('aria-checked')).not.toBe('true');
  }
  await page.getByTestId('invite-email').fill(uniqueEmail('no-role'));
  await page.getByTestId('invite-submit').click();
  await page.getByTestId('invite-roles-error').waitFor();
  await page.getByTestId('invite-roles-error').scrollIntoViewIfNeeded();
  const form = await page.getByTestId('invite-form').boundingBox();
  expect(form!.x + form!.width).toBeLessThanOrEqual(viewport.width);
  await screenshot(page, `settings-invite-no-role-${name}`);
  await page.getByTestId('invite-role-operator').click();
  await page.getByTestId('invite-submit').click();
  await page.getByTestId('invite-sent').waitFor();
  const invites = await lead.agent.get(`/api/labs/${lead.labId}/invites`);
  expect(invites.status).toBe(200);
  const list = (invites.body.invites ?? invites.body) as { roles: string[] }[];
  expect(list[0].roles).toEqual(['operator']);
  await page.context().close();
});

test.each(SIZES)('on a %s screen a role change is asked for first, can be kept as it was, and is reported once saved', async (name, viewport) => {
  const lead = await signUp(fixtures, `settings-roles-${name}`);
  const member = await addMember(fixtures, lead.agent, lead.labId, ['operator'], 'roles-member');
  const page = await newPage(served, viewport);
  await signIn(page, lead.email, PASSWORD);
  await page.goto('/settings/members');
  const chip = page.getByTestId(`member-role-${member.userId}-lead`);
  await chip.waitFor();

  // One click only asks; keeping it as it was changes nothing on the server.
  await chip.click();
  const confirm = page.getByTestId(`member-confirm-${member.userId}`);
  await confirm.getByText(/Give .* the lead role\?/).waitFor();
  await page.getByTestId(`member-confirm-${member.userId}-apply`).scrollIntoViewIfNeeded();
  const asked = await confirm.boundingBox();
  expect(asked!.x + asked!.width).toBeLessThanOrEqual(viewport.width);
  await screenshot(page, `settings-role-confirm-${name}`);
  await page.getByTestId(`member-confirm-${member.userId}-cancel`).click();
  const unchanged = await lead.agent.get(`/api/labs/${lead.labId}/members`);
  const before = (unchanged.body.members ?? unchanged.body) as { userId: string; roles: string[] }[];
  expect(before.find((m) => m.userId === member.userId)!.roles).toEqual(['operator']);

  await chip.click();
  await page.getByTestId(`member-confirm-${member.userId}-apply`).click();
  await page.getByTestId(`member-saved-${member.userId}`).getByText(/is now lead and operator/).waitFor();
  await screenshot(page, `settings-role-saved-${name}`);
  const changed = await lead.agent.get(`/api/labs/${lead.labId}/members`);
  const list = (changed.body.members ?? changed.body) as { userId: string; roles: string[] }[];
  expect(list.find((m) => m.userId === member.userId)!.roles.sort()).toEqual(['lead', 'operator']);
  await page.context().close();
});

describe.each([
  ['phone', PHONE, 'nav-tabs'],
  ['wide', WIDE, 'nav-rail'],
])('a lead on a %s', (name, viewport, nav) => {
  test('finds Review in the navigation with the number of plans waiting', async () => {
    const lab = await sentForReview(fixtures, `nav-review-${name}`, 2);
    const page = await newPage(served, viewport);
    await signIn(page, lab.email, PASSWORD);
    const item = page.getByTestId(nav).getByTestId('nav-review');
    await item.waitFor();
    await page.getByTestId(nav).getByTestId('nav-count-review').getByText('2').waitFor();
    await screenshot(page, `nav-review-count-${name}`);
    await item.click();
    await page.getByTestId('screen-review-list').waitFor();
    await page.context().close();
  });

  test('a member who is not a lead has no Review in the navigation', async () => {
    const lab = await sentForReview(fixtures, `nav-noreview-${name}`, 1);
    const page = await newPage(served, viewport);
    await signIn(page, lab.planner.email, PASSWORD);
    await page.getByTestId(nav).getByTestId('nav-home').waitFor();
    expect(await page.getByTestId(nav).getByTestId('nav-review').count()).toBe(0);
    await page.context().close();
  });
});

test.each(SIZES)("on a %s screen a lead sets the lab's currency, and the machines' rates are shown in it", async (name, viewport) => {
  const lab = await labWithProfiles(fixtures, `currency-browser-${name}`);
  const page = await newPage(served, viewport);
  await signIn(page, lab.email, PASSWORD);
  await page.goto('/settings/rules');
  await page.getByTestId('rules-currency').waitFor();
  expect(await page.getByTestId('rules-currency-state').innerText()).toContain('EUR 1,234.50');
  // A code that names no currency is refused under the field, before anything is sent.
  await page.getByTestId('rules-currency-code').fill('XQQ');
  await page.getByTestId('rules-currency-save').click();
  await page.getByText('The currency is not an ISO 4217 currency code.').waitFor();
  await page.getByTestId('rules-currency-code').fill('chf');
  await page.getByTestId('rules-currency-save').click();
  await page.getByTestId('rules-currency-state').getByText('CHF: an amount of 1234.5 reads CHF 1,234.50').waitFor();
  await screenshot(page, `settings-currency-${name}`);
  await page.goto('/settings/machines');
  await page.getByText('Rate CHF/h').first().waitFor();
  await page.context().close();
});

test.each(SIZES)('on a %s screen the preheat time is listed and typed in the same unit, minutes', async (name, viewport) => {
  const lab = await labWithProfiles(fixtures, `units-browser-${name}`);
  const minutes = lab.machine.preheatSeconds / 60;
  const page = await newPage(served, viewport);
  await signIn(page, lab.email, PASSWORD);
  await page.goto('/settings/machines');
  const row = page.getByTestId(`machine-row-${lab.machineId}`);
  await row.waitFor();
  await page.getByText('Preheat min').first().waitFor();
  expect(await row.innerText()).toMatch(new RegExp(`\\b${minutes}(\\.0)?\\b`));
  await row.click();
  const field = page.getByTestId('machine-field-preheatSeconds');
  await field.waitFor();
  expect(await field.inputValue()).toBe(String(minutes));
  await page.getByText('Preheat time').first().scrollIntoViewIfNeeded();
  await page.getByText(/^\s*min$/).first().waitFor();
  await screenshot(page, `settings-preheat-units-${name}`);
  await page.context().close();
});
