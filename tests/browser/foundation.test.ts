import { newPage, openSection, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { DEMO_PASSWORD } from '../../server/db/seeders/demo';
import { PASSWORD, uniqueEmail } from '../helpers/app';

jest.setTimeout(180_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});


describe.each([
  ['phone', PHONE, 'nav-tabs'],
  ['wide', WIDE, 'nav-rail'],
])('the demo lead on a %s', (name, viewport, nav) => {
  test('signs in, reaches home and the lab settings', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'lead@tinkerfin.example', DEMO_PASSWORD);
    await page.getByTestId(nav).waitFor();
    await screenshot(page, `foundation-home-${name}`);
    if (name === 'phone') {
      // Nine sections do not fit a phone's bar: the lead's daily four have tabs, the rest sit under "More".
      const tabs = page.getByTestId(nav);
      expect(await tabs.getByRole('tab').count()).toBe(5);
      for (const key of ['home', 'review', 'queue', 'floor', 'more']) expect(await tabs.getByTestId(`nav-${key}`).isVisible()).toBe(true);
      expect(await tabs.getByTestId('nav-settings').count()).toBe(0);
      await page.getByTestId('nav-more').click();
      await page.getByTestId('nav-more-sheet').getByText('Settings').waitFor();
      await screenshot(page, 'foundation-more-phone');
    }
    await openSection(page, 'settings');
    await page.getByTestId('settings-members').waitFor();
    await page.getByText('Demo Operator').first().waitFor();
    await screenshot(page, `foundation-settings-${name}`);
    await page.getByTestId('settings-section-machines').click();
    await page.getByText('Heron').first().waitFor();
    await screenshot(page, `foundation-machines-${name}`);
    await page.context().close();
  });
});

test('a lead invites a member, who accepts from the e-mailed link and lands in the lab', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'lead@tinkerfin.example', DEMO_PASSWORD);
  await page.goto('/settings/invites');
  const email = uniqueEmail('browser-invite');
  await page.getByTestId('invite-email').fill(email);
  await page.getByTestId('invite-role-planner').click();
  const before = served.running.mailer.caught!.length;
  await page.getByTestId('invite-submit').click();
  await page.getByTestId('invite-sent').waitFor();
  await screenshot(page, 'foundation-invite-sent-wide');

  let link: string | undefined;
  for (let i = 0; i < 100 && !link; i++) {
    const mail = served.running.mailer.caught!.slice(before).find((m) => m.to.includes(email));
    link = mail && /(http\S+\/invite\/[A-Za-z0-9_-]+)/.exec(mail.text)?.[1];
    if (!link) await new Promise((r) => setTimeout(r, 100));
  }
  expect(link).toMatch(new RegExp(`^${served.baseUrl}/invite/`));

  const invited = await newPage(served, PHONE);
  await invited.goto(link!);
  await invited.getByTestId('invite-accept-form').waitFor();
  await invited.getByTestId('invite-accept-name').fill('Browser Invitee');
  await invited.getByTestId('invite-accept-password').fill(PASSWORD);
  await screenshot(invited, 'foundation-invite-accept-phone');
  await invited.getByTestId('invite-accept-submit').click();
  await invited.getByTestId('screen-home').waitFor();
  // A string, so the test's own transpiler does not rewrite the page's code.
  const me = await invited.evaluate("fetch('/api/me').then((r) => r.json())") as { user: { email: string }; labs: { roles: string[] }[] };
  expect(me.user.email).toBe(email);
  expect(me.labs[0].roles).toContain('planner');
  await screenshot(invited, 'foundation-invitee-home-phone');
  await page.context().close();
  await invited.context().close();
});
