/**
 * Resetting a forgotten password by a mailed link: the same answer whether or
 * not the address has an account (OWASP Forgot Password Cheat Sheet, "Return
 * a consistent message for both existent and non-existent accounts"), a
 * token that is random, stored only as a hash, single-use and expiring
 * (same sheet, "URL tokens"), the new password under the policy
 * (NIST SP 800-63B §5.1.1.2), and every session of the account ended.
 */
import { createHash } from 'node:crypto';
import { agent, PASSWORD, signUp, startTestApp, uniqueEmail, waitForMail } from '../helpers/app';
import type { Running } from '../../server/boot';

jest.setTimeout(60_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const tokenOf = (text: string) => /\/reset\/([A-Za-z0-9_-]+)/.exec(text)![1];
const NEW_PASSWORD = 'a new phrase for the lab';

test('asking answers the same for a known and an unknown address, and mails only the known one', async () => {
  const me = await signUp(running, 'forgetful');
  const before = running.mailer.caught!.length;
  const known = await agent(running).post('/api/auth/reset-request').send({ email: me.email });
  const unknownEmail = uniqueEmail('nobody');
  const unknown = await agent(running).post('/api/auth/reset-request').send({ email: unknownEmail });
  expect(known.status).toBe(202);
  expect({ status: unknown.status, body: unknown.body }).toEqual({ status: known.status, body: known.body });
  const mail = await waitForMail(running, before, me.email);
  expect(mail.subject).toMatch(/reset/i);
  await new Promise((r) => setTimeout(r, 300));
  expect(running.mailer.caught!.slice(before).some((m) => m.to.includes(unknownEmail))).toBe(false);
});

test('the link sets a new password once, under the policy, and ends every session', async () => {
  const me = await signUp(running, 'resetter');
  const laptop = agent(running);
  expect((await laptop.post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD })).status).toBe(200);
  const before = running.mailer.caught!.length;
  await agent(running).post('/api/auth/reset-request').send({ email: me.email.toUpperCase() });
  const token = tokenOf((await waitForMail(running, before, me.email)).text);

  // Only a digest of the token is stored, never the token itself.
  const [rows] = (await running.db.sequelize.query('SELECT token_hash FROM password_resets WHERE user_id = $1', { bind: [me.userId] })) as [Array<{ token_hash: string }>, unknown];
  expect(rows).toEqual([{ token_hash: createHash('sha256').update(token).digest('hex') }]);

  const weak = await agent(running).post('/api/auth/reset').send({ token, password: 'password12' });
  expect(weak.status).toBe(400);
  expect(weak.body.error).toMatchObject({ code: 'weak_password', field: 'password' });

  const done = await agent(running).post('/api/auth/reset').send({ token, password: NEW_PASSWORD });
  expect(done.status).toBe(204);
  expect((await me.agent.get('/api/me')).status).toBe(401);
  expect((await laptop.get('/api/me')).status).toBe(401);
  expect((await agent(running).post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD })).status).toBe(401);
  expect((await agent(running).post('/api/auth/sign-in').send({ email: me.email, password: NEW_PASSWORD })).status).toBe(200);

  const again = await agent(running).post('/api/auth/reset').send({ token, password: 'yet another long phrase' });
  expect(again.status).toBe(400);
  expect(again.body.error).toMatchObject({ code: 'invalid_token', field: 'token' });
});

test('a newer link replaces the older one, and a made-up token is refused', async () => {
  const me = await signUp(running, 'twice');
  let before = running.mailer.caught!.length;
  await agent(running).post('/api/auth/reset-request').send({ email: me.email });
  const first = tokenOf((await waitForMail(running, before, me.email)).text);
  before = running.mailer.caught!.length;
  await agent(running).post('/api/auth/reset-request').send({ email: me.email });
  const second = tokenOf((await waitForMail(running, before, me.email)).text);
  expect(second).not.toBe(first);
  expect((await agent(running).post('/api/auth/reset').send({ token: first, password: NEW_PASSWORD })).body.error.code).toBe('invalid_token');
  expect((await agent(running).post('/api/auth/reset').send({ token: 'made-up-token', password: NEW_PASSWORD })).body.error.code).toBe('invalid_token');
  expect((await agent(running).post('/api/auth/reset').send({ token: second, password: NEW_PASSWORD })).status).toBe(204);
});

test('an expired link is refused', async () => {
  const app = await startTestApp({ resetTokenMs: 1 });
  try {
    const me = await signUp(app, 'late');
    const before = app.mailer.caught!.length;
    await agent(app).post('/api/auth/reset-request').send({ email: me.email });
    const token = tokenOf((await waitForMail(app, before, me.email)).text);
    const res = await agent(app).post('/api/auth/reset').send({ token, password: NEW_PASSWORD });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_token', field: 'token' });
    expect((await agent(app).post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD })).status).toBe(200);
  } finally {
    await app.close();
  }
});

test('asking is limited per e-mail address, whatever address the requests come from', async () => {
  const app = await startTestApp({ authRateLimit: 1000, authAccountRateLimit: 3, trustProxy: 'loopback' });
  try {
    const victim = await signUp(app, 'flooded');
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) {
      statuses.push((await agent(app).post('/api/auth/reset-request').set('X-Forwarded-For', `192.0.2.${i + 1}`).send({ email: victim.email })).status);
    }
    expect(statuses).toEqual([202, 202, 202, 429, 429, 429]);
  } finally {
    await app.close();
  }
});

test('bad input names the field', async () => {
  const res = await agent(running).post('/api/auth/reset-request').send({ email: 'not an address' });
  expect(res.status).toBe(400);
  expect(res.body.error.field).toBe('email');
  const res2 = await agent(running).post('/api/auth/reset').send({ password: NEW_PASSWORD });
  expect(res2.status).toBe(400);
  expect(res2.body.error.field).toBe('token');
});
