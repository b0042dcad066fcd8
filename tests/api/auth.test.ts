import request from 'supertest';
import { agent, ORIGIN, PASSWORD, signUp, startTestApp, uniqueEmail } from '../helpers/app';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

describe('health', () => {
  test('answers ok with the database reachable', async () => {
    const res = await request(running.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, db: true });
  });
});

describe('sign-up', () => {
  test('creates the user, a lab and a membership holding all four roles, and signs in with an HttpOnly Lax cookie', async () => {
    const a = agent(running);
    const email = uniqueEmail('signup');
    const res = await a.post('/api/auth/sign-up').send({ email, password: PASSWORD, name: 'New Person', labName: 'Night Shift Lab' });
    expect(res.status).toBe(201);
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/sinterstack_session=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i); // served over plain http here
    const me = await a.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.user).toEqual({ id: expect.any(String), email, name: 'New Person' });
    expect(me.body.labs).toEqual([{ id: expect.any(String), name: 'Night Shift Lab', roles: ['designer', 'planner', 'lead', 'operator'] }]);
  });

  test('an e-mail already used answers 409, whatever its case', async () => {
    const { email } = await signUp(running, 'dup');
    const res = await agent(running).post('/api/auth/sign-up').send({ email: email.toUpperCase(), password: PASSWORD, name: 'Again', labName: 'Other' });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'email_taken', field: 'email' });
  });

  test('a password under 10 characters is refused naming the field', async () => {
    const res = await agent(running).post('/api/auth/sign-up').send({ email: uniqueEmail(), password: 'short', name: 'A', labName: 'B' });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'password' });
    expect(res.body.error.message).toMatch(/at least 10/);
  });

  test.each([
    ['an unknown field', { extra: true }, 'extra'],
    ['a wrong type', { name: 42 }, 'name'],
    ['an over-long string', { labName: 'x'.repeat(500) }, 'labName'],
    ['a malformed e-mail', { email: 'not-an-address' }, 'email'],
  ])('%s answers 400 naming the field', async (_what, patch, field) => {
    const body = { email: uniqueEmail(), password: PASSWORD, name: 'A', labName: 'B', ...patch };
    const res = await agent(running).post('/api/auth/sign-up').send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe(field);
  });

  test('malformed JSON answers 400 without a stack trace', async () => {
    const res = await agent(running).post('/api/auth/sign-up').set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_json');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.(ts|js):\d+/);
  });
});

describe('sign-in and sign-out', () => {
  test('the right password signs in; sign-out ends the session', async () => {
    const { email } = await signUp(running, 'signin');
    const a = agent(running);
    const res = await a.post('/api/auth/sign-in').send({ email, password: PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe(email);
    expect((await a.get('/api/me')).status).toBe(200);
    const out = await a.post('/api/auth/sign-out');
    expect(out.status).toBe(204);
    expect((await a.get('/api/me')).status).toBe(401);
  });

  test('a wrong password and an unknown e-mail get the same 401 message', async () => {
    const { email } = await signUp(running, 'wrongpw');
    const wrong = await agent(running).post('/api/auth/sign-in').send({ email, password: 'not-the-password' });
    const unknown = await agent(running).post('/api/auth/sign-in').send({ email: uniqueEmail('nobody'), password: PASSWORD });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
  });

  test('without a session /api/me answers 401', async () => {
    const res = await request(running.app).get('/api/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  test('a forged session cookie is not accepted', async () => {
    const res = await request(running.app).get('/api/me').set('Cookie', 'sinterstack_session=forgedvalue');
    expect(res.status).toBe(401);
  });
});

describe('request forgery and abuse', () => {
  test('a state-changing request from a foreign Origin is refused with 403', async () => {
    const { agent: a } = await signUp(running, 'origin');
    const res = await a.post('/api/auth/sign-out').set('Origin', 'https://evil.example');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden_origin');
    expect((await a.get('/api/me')).status).toBe(200);
  });

  test('a state-changing request without an Origin is refused with 403', async () => {
    const res = await request(running.app).post('/api/auth/sign-in').send({ email: uniqueEmail(), password: PASSWORD });
    expect(res.status).toBe(403);
  });

  test('sign-in attempts past the limit answer 429', async () => {
    const limited = await startTestApp({ authRateLimit: 3 });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) {
        const res = await request(limited.app).post('/api/auth/sign-in').set('Origin', ORIGIN).send({ email: uniqueEmail(), password: PASSWORD });
        statuses.push(res.status);
      }
      expect(statuses).toEqual([401, 401, 401, 429, 429]);
    } finally {
      await limited.close();
    }
  });

  test('an unknown /api route answers 404 as JSON', async () => {
    const res = await request(running.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body.error.code).toBe('not_found');
  });
});
