/**
 * Account security: the password policy (NIST SP 800-63B §5.1.1.2), limits
 * on guessing per address and per account that a forged X-Forwarded-For
 * cannot dodge, and changing a password, which ends the other sessions.
 */
import { addMember, agent, PASSWORD, signUp, startTestApp, uniqueEmail, waitForMail } from '../helpers/app';
import type { Running } from '../../server/boot';

jest.setTimeout(60_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

describe('the password policy', () => {
  test.each([['password12'], ['          '], ['aaaaaaaaaa']])('signing up with %j is refused naming the password', async (password) => {
    const res = await agent(running).post('/api/auth/sign-up').send({ email: uniqueEmail('weak'), password, name: 'Weak', labName: 'Weak lab' });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'weak_password', field: 'password' });
  });

  test('an invite that makes a new account refuses a common password too', async () => {
    const owner = await signUp(running, 'inv-weak');
    const email = uniqueEmail('invitee');
    const before = running.mailer.caught!.length;
    await owner.agent.post(`/api/labs/${owner.labId}/invites`).send({ email, roles: ['designer'] });
    const mail = await waitForMail(running, before, email);
    const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
    const res = await agent(running).post(`/api/invites/${token}/accept`).send({ name: 'New', password: 'password12' });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'weak_password', field: 'password' });
  });
});

describe('limits on guessing', () => {
  test('30 guesses from 30 forged X-Forwarded-For addresses are one address: 429 after the limit', async () => {
    const app = await startTestApp({ authRateLimit: 5, authAccountRateLimit: 1000 });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 30; i++) {
        const res = await agent(app).post('/api/auth/sign-in').set('X-Forwarded-For', `203.0.113.${i + 1}`).send({ email: uniqueEmail('nobody'), password: `guess-number-${i}` });
        statuses.push(res.status);
      }
      expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401]);
      expect(statuses.slice(5).every((s) => s === 429)).toBe(true);
    } finally {
      await app.close();
    }
  });

  test('behind a configured proxy each address has its own limit, but one account takes only so many failures from all of them', async () => {
    const app = await startTestApp({ authRateLimit: 1000, authAccountRateLimit: 5, trustProxy: 'loopback' });
    try {
      const victim = await signUp(app, 'victim');
      const statuses: number[] = [];
      for (let i = 0; i < 30; i++) {
        const res = await agent(app).post('/api/auth/sign-in').set('X-Forwarded-For', `198.51.100.${i + 1}`).send({ email: victim.email, password: `guess-number-${i}` });
        statuses.push(res.status);
      }
      expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401]);
      expect(statuses.slice(5).every((s) => s === 429)).toBe(true);
      // another account is not affected
      const other = await signUp(app, 'bystander');
      const ok = await agent(app).post('/api/auth/sign-in').send({ email: other.email, password: PASSWORD });
      expect(ok.status).toBe(200);
    } finally {
      await app.close();
    }
  });

  test("whoever holds an invite link for an existing account cannot guess that account's password without limit", async () => {
    const app = await startTestApp({ authRateLimit: 1000, authAccountRateLimit: 5 });
    try {
      const owner = await signUp(app, 'inv-owner');
      const existing = await signUp(app, 'inv-existing');
      const before = app.mailer.caught!.length;
      await owner.agent.post(`/api/labs/${owner.labId}/invites`).send({ email: existing.email, roles: ['planner'] });
        const mail = await waitForMail(app, before, existing.email);
      const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
      const statuses: number[] = [];
      for (let i = 0; i < 12; i++) {
        statuses.push((await agent(app).post(`/api/invites/${token}/accept`).send({ password: `guess-number-${i}` })).status);
      }
      expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401]);
      expect(statuses.slice(5).every((s) => s === 429)).toBe(true);
    } finally {
      await app.close();
    }
  });
});

describe('changing a password', () => {
  test('needs the current password, applies the policy, ends the other sessions and keeps this one', async () => {
    const me = await signUp(running, 'changer');
    const laptop = agent(running);
    expect((await laptop.post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD })).status).toBe(200);

    const wrong = await me.agent.post('/api/auth/password').send({ currentPassword: 'not-my-password', newPassword: 'a fresh long phrase' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error).toMatchObject({ code: 'wrong_password', field: 'currentPassword' });
    const weak = await me.agent.post('/api/auth/password').send({ currentPassword: PASSWORD, newPassword: 'password12' });
    expect(weak.status).toBe(400);
    expect(weak.body.error).toMatchObject({ code: 'weak_password', field: 'newPassword' });
    expect((await laptop.get('/api/me')).status).toBe(200);

    const changed = await me.agent.post('/api/auth/password').send({ currentPassword: PASSWORD, newPassword: 'a fresh long phrase' });
    expect(changed.status).toBe(204);
    expect((await me.agent.get('/api/me')).status).toBe(200);
    expect((await laptop.get('/api/me')).status).toBe(401);
    expect((await agent(running).post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD })).status).toBe(401);
    expect((await agent(running).post('/api/auth/sign-in').send({ email: me.email, password: 'a fresh long phrase' })).status).toBe(200);
  });

  test('is refused without a session', async () => {
    const res = await agent(running).post('/api/auth/password').send({ currentPassword: 'x', newPassword: 'a fresh long phrase' });
    expect(res.status).toBe(401);
  });
});

test('a member added through the helper still signs in (the test password passes the policy)', async () => {
  const owner = await signUp(running, 'helper');
  const m = await addMember(running, owner.agent, owner.labId, ['designer'], 'helper-m');
  expect((await agent(running).post('/api/auth/sign-in').send({ email: m.email, password: PASSWORD })).status).toBe(200);
});
