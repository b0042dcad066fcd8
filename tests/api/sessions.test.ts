/**
 * A member's own sessions: listed with when they began and were last used
 * and from which browser, ended one by one or all at once, ended after an
 * idle and an absolute lifetime (NIST SP 800-63B §7.1 "Session Bindings" and
 * §4.1.3: reauthentication at least every 30 days at AAL1), and given a new
 * id when the member's roles change (OWASP Session Management Cheat Sheet,
 * "Renew the Session ID After Any Privilege Level Change").
 */
import { addMember, agent, PASSWORD, signUp, startTestApp } from '../helpers/app';
import { SESSION_COOKIE } from '../../server/auth/sessions';
import type { Running } from '../../server/boot';

jest.setTimeout(60_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const cookieOf = (res: { headers: Record<string, unknown> }): string | undefined => {
  const set = ([] as string[]).concat((res.headers['set-cookie'] as string[] | undefined) ?? []);
  const found = set.find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  return found ? found.split(';')[0].slice(SESSION_COOKIE.length + 1) : undefined;
};

test('the owner sees their sessions (never their secret ids), ends another one, then signs out everywhere', async () => {
  const me = await signUp(running, 'sessions');
  const laptop = agent(running).set('User-Agent', 'Test laptop browser');
  const signIn = await laptop.post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD });
  const laptopCookie = cookieOf(signIn)!;

  const list = await me.agent.get('/api/auth/sessions');
  expect(list.status).toBe(200);
  expect(list.body).toHaveLength(2);
  expect(list.body.filter((s: { current: boolean }) => s.current)).toHaveLength(1);
  const other = list.body.find((s: { current: boolean }) => !s.current);
  expect(other).toMatchObject({ userAgent: 'Test laptop browser' });
  expect(Date.parse(other.createdAt)).not.toBeNaN();
  expect(Date.parse(other.lastSeenAt)).not.toBeNaN();
  expect(JSON.stringify(list.body)).not.toContain(laptopCookie);

  // Someone else cannot end it, nor learn it exists.
  const stranger = await signUp(running, 'stranger');
  expect((await stranger.agent.delete(`/api/auth/sessions/${other.id}`)).status).toBe(404);
  expect((await laptop.get('/api/me')).status).toBe(200);

  expect((await me.agent.delete(`/api/auth/sessions/${other.id}`)).status).toBe(204);
  expect((await laptop.get('/api/me')).status).toBe(401);
  expect((await me.agent.get('/api/me')).status).toBe(200);

  const phone = agent(running);
  await phone.post('/api/auth/sign-in').send({ email: me.email, password: PASSWORD });
  expect((await phone.get('/api/me')).status).toBe(200);
  expect((await me.agent.post('/api/auth/sign-out-everywhere')).status).toBe(204);
  expect((await phone.get('/api/me')).status).toBe(401);
  expect((await me.agent.get('/api/me')).status).toBe(401);
});

test('a session ends when idle longer than the idle lifetime, and after the absolute lifetime however busy', async () => {
  const idle = await signUp(running, 'idle');
  await running.db.sequelize.query("UPDATE user_sessions SET last_seen_at = now() - interval '8 days' WHERE user_id = $1", { bind: [idle.userId] });
  expect((await idle.agent.get('/api/me')).status).toBe(401);

  const busy = await signUp(running, 'busy');
  await running.db.sequelize.query("UPDATE user_sessions SET created_at = now() - interval '31 days', last_seen_at = now() WHERE user_id = $1", { bind: [busy.userId] });
  expect((await busy.agent.get('/api/me')).status).toBe(401);

  const fine = await signUp(running, 'fine');
  await running.db.sequelize.query("UPDATE user_sessions SET created_at = now() - interval '29 days', last_seen_at = now() - interval '6 days' WHERE user_id = $1", { bind: [fine.userId] });
  expect((await fine.agent.get('/api/me')).status).toBe(200);
});

test('the lifetimes come from the configuration', async () => {
  const app = await startTestApp({ sessionIdleMs: 60 * 60_000, sessionAbsoluteMs: 2 * 60 * 60_000 });
  try {
    const me = await signUp(app, 'short');
    await app.db.sequelize.query("UPDATE user_sessions SET last_seen_at = now() - interval '61 minutes' WHERE user_id = $1", { bind: [me.userId] });
    expect((await me.agent.get('/api/me')).status).toBe(401);
  } finally {
    await app.close();
  }
});

test("a member's session gets a new id when a lead changes their roles; the old id no longer works", async () => {
  const lead = await signUp(running, 'rotating-lead');
  const member = await addMember(running, lead.agent, lead.labId, ['designer'], 'rotated');
  const first = await member.agent.get('/api/me');
  expect(first.status).toBe(200);
  const [[row]] = (await running.db.sequelize.query('SELECT id FROM user_sessions WHERE user_id = $1', { bind: [member.userId] })) as [Array<{ id: string }>, unknown];
  const oldId = row.id;

  expect((await lead.agent.patch(`/api/labs/${lead.labId}/members/${member.userId}`).send({ roles: ['designer', 'planner'] })).status).toBe(200);
  const next = await member.agent.get('/api/me');
  expect(next.status).toBe(200);
  const newId = cookieOf(next);
  expect(newId).toBeDefined();
  expect(newId).not.toBe(oldId);
  expect(next.body.labs[0].roles).toEqual(['designer', 'planner']);

  const withOld = await agent(running).get('/api/me').set('Cookie', `${SESSION_COOKIE}=${oldId}`);
  expect(withOld.status).toBe(401);
  expect((await member.agent.get('/api/me')).status).toBe(200);
  // The new session keeps the sign-in time: rotation does not extend the absolute lifetime.
  const [rows] = (await running.db.sequelize.query('SELECT count(*)::int AS n, count(DISTINCT created_at)::int AS starts FROM user_sessions WHERE user_id = $1', { bind: [member.userId] })) as [Array<{ n: number; starts: number }>, unknown];
  expect(rows[0]).toEqual({ n: 1, starts: 1 });
});

test('sessions need a session', async () => {
  expect((await agent(running).get('/api/auth/sessions')).status).toBe(401);
  expect((await agent(running).post('/api/auth/sign-out-everywhere')).status).toBe(401);
});
