/**
 * Account security and the lab's record on screen: a forgotten password is
 * reset from the sign-in screen through the mailed link; a member sees where
 * they are signed in and signs out everywhere; a lead reads the audit log on
 * a phone and wide, filters it, and sets the second-approval rule.
 */
import request from 'supertest';
import { PASSWORD, uniqueEmail } from '../helpers/app';
import { newPage, PHONE, screenshot, serveAndLaunch, signIn, WIDE, type Served } from '../helpers/browser';

jest.setTimeout(240_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

/** Signs up a new user with a new lab through the served app's API (its own Origin). */
async function signUpServed(tag: string) {
  const a = request.agent(served.running.app);
  a.set('Origin', served.baseUrl);
  const email = uniqueEmail(tag);
  const res = await a.post('/api/auth/sign-up').send({ email, password: PASSWORD, name: `Test ${tag}`, labName: `Lab of ${tag}` });
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent: a, email, userId: res.body.user.id as string, labId: res.body.labs[0].id as string };
}

test('a forgotten password: the link on sign-in, the mail, the reset screen, then signing in with the new one', async () => {
  const me = await signUpServed('forgot-ui');
  const page = await newPage(served, PHONE);
  await page.goto('/sign-in');
  await page.getByTestId('go-forgot-password').click();
  await page.getByTestId('forgot-screen').waitFor();
  const before = served.running.mailer.caught!.length;
  await page.getByTestId('forgot-email').fill(me.email);
  await page.getByTestId('forgot-submit').click();
  await page.getByTestId('forgot-sent').waitFor();
  await screenshot(page, 'forgot-sent-phone');

  let link: string | undefined;
  for (let i = 0; i < 100 && !link; i++) {
    link = served.running.mailer.caught!.slice(before).find((m) => m.to.includes(me.email))?.text.match(/https?:\/\/\S+\/reset\/[A-Za-z0-9_-]+/)?.[0];
    if (!link) await new Promise((r) => setTimeout(r, 100));
  }
  expect(link).toBeDefined();
  await page.goto(new URL(link!).pathname);
  await page.getByTestId('reset-screen').waitFor();
  await page.getByTestId('reset-password').fill('password12');
  await page.getByTestId('reset-repeat').fill('password12');
  await page.getByTestId('reset-submit').click();
  await page.getByText(/common passwords/).waitFor();
  await page.getByTestId('reset-password').fill('tall windows over the yard');
  await page.getByTestId('reset-repeat').fill('tall windows over the yard');
  await page.getByTestId('reset-submit').click();
  await page.getByTestId('reset-done').waitFor();
  await screenshot(page, 'reset-done-phone');
  await page.getByTestId('reset-sign-in').click();
  await signIn(page, me.email, 'tall windows over the yard');
  await page.context().close();
});

test('a member sees where they are signed in and signs out everywhere', async () => {
  const me = await signUpServed('sessions-ui');
  const page = await newPage(served, WIDE);
  await signIn(page, me.email, PASSWORD);
  await page.goto('/settings/account');
  const list = page.getByTestId('sessions-list');
  await list.waitFor();
  // The API session of the sign-up, and this browser's.
  await page.getByText('This browser').waitFor();
  expect(await page.locator('[data-testid^="session-row-"]').count()).toBe(2);
  await screenshot(page, 'account-sessions-wide');
  await page.getByTestId('sessions-sign-out-everywhere').click();
  await page.getByTestId('sessions-sign-out-everywhere-confirm').click();
  await page.getByTestId('sign-in-screen').waitFor();
  expect((await me.agent.get('/api/me')).status).toBe(401);
  await page.context().close();
});

test('a lead reads the audit log on a phone and wide, filters it, and turns on the second-approval rule', async () => {
  const owner = await signUpServed('audit-ui');
  await owner.agent.post(`/api/labs/${owner.labId}/invites`).send({ email: 'someone.new@test.example', roles: ['designer'] });

  const phone = await newPage(served, PHONE);
  await signIn(phone, owner.email, PASSWORD);
  await phone.goto('/settings/audit');
  await phone.getByTestId('audit-list').waitFor();
  await phone.getByText(/added invite “someone.new@test.example”/).waitFor();
  await phone.getByText(/signed in/).first().waitFor();
  await screenshot(phone, 'audit-phone');
  await phone.getByTestId('audit-kind-invite').click();
  await phone.getByText(/added invite/).waitFor();
  await phone.getByText(/signed in/).waitFor({ state: 'detached' });
  await phone.context().close();

  const wide = await newPage(served, WIDE);
  await signIn(wide, owner.email, PASSWORD);
  await wide.goto('/settings/rules');
  await wide.getByTestId('rules-second-approval-state').waitFor();
  expect(await wide.getByTestId('rules-second-approval-state').textContent()).toMatch(/^Off/);
  await wide.getByTestId('rules-second-approval-on').click();
  await wide.getByTestId('rules-one-lead').waitFor();
  expect(await wide.getByTestId('rules-second-approval-state').textContent()).toMatch(/^On/);
  expect((await owner.agent.get(`/api/labs/${owner.labId}/settings`)).body).toMatchObject({ secondApproval: true, secondApprovalSet: true });
  await wide.goto('/settings/audit');
  await wide.getByText(/changed lab/).first().waitFor();
  await wide.getByText(/second approval: — → true/).waitFor();
  await screenshot(wide, 'audit-wide');
  await wide.context().close();
});
