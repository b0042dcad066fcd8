import request from 'supertest';
import { randomBytes } from 'node:crypto';
import { loadConfig, type Config } from '../../server/config';
import { boot, type Running } from '../../server/boot';

export const ORIGIN = 'http://127.0.0.1:8080';

let apps = 0;

/**
 * The real app on the test database (`npm test` makes it), with a fresh
 * mail catcher. The rate limit is high unless a test asks for a low one.
 * Each app serves a job queue of its own with its in-process worker (so a
 * test's injected failures meet only its own uploads), and an upload waits
 * for its measuring as long as a loaded machine may need (201, not 202),
 * unless the test asks for a short wait.
 */
export async function startTestApp(overrides: Partial<Config> = {}): Promise<Running> {
  if (!process.env.DATABASE_URL) throw new Error('DATABASE_URL is not set: run the suite with `npm test`');
  const base = loadConfig({ ...process.env, NODE_ENV: 'test', APP_URL: ORIGIN });
  // Rate-limit counters live in the shared database: each test app counts on its own unless a test shares them on purpose.
  const config = {
    ...base,
    authRateLimit: 10_000,
    jobQueue: `mesh-test-${process.pid}-${++apps}`,
    uploadWaitMs: 120_000,
    layoutSliceWaitMs: 120_000,
    rateLimitNamespace: `test-${randomBytes(6).toString('hex')}:`,
    ...overrides,
  };
  return boot(config, () => {});
}

/** A supertest agent that keeps cookies and sends the app's own Origin. */
export function agent(running: Running) {
  const a = request.agent(running.app);
  a.set('Origin', ORIGIN);
  return a;
}

export const uniqueEmail = (tag = 'user') => `${tag}-${randomBytes(5).toString('hex')}@test.example`;
export const PASSWORD = 'correct-horse-battery';

/** Signs up a new user with a new lab; returns the agent (signed in) and the ids. */
export async function signUp(running: Running, tag = 'user') {
  const a = agent(running);
  const email = uniqueEmail(tag);
  const res = await a.post('/api/auth/sign-up').send({ email, password: PASSWORD, name: `Test ${tag}`, labName: `Lab of ${tag}` });
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent: a, email, userId: res.body.user.id as string, labId: res.body.labs[0].id as string };
}

/** Invites `email` with `roles` into `labId` and accepts as a new user; returns that user's agent. */
export async function addMember(running: Running, lead: ReturnType<typeof agent>, labId: string, roles: string[], tag = 'member') {
  const email = uniqueEmail(tag);
  const before = running.mailer.caught!.length;
  const inv = await lead.post(`/api/labs/${labId}/invites`).send({ email, roles });
  if (inv.status !== 201) throw new Error(`invite failed: ${inv.status} ${JSON.stringify(inv.body)}`);
  const mail = await waitForMail(running, before, email);
  const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1];
  const a = agent(running);
  const acc = await a.post(`/api/invites/${token}/accept`).send({ name: `Test ${tag}`, password: PASSWORD });
  if (acc.status !== 200) throw new Error(`accept failed: ${acc.status} ${JSON.stringify(acc.body)}`);
  return { agent: a, email, userId: acc.body.user.id as string };
}

export async function waitForMail(running: Running, after: number, to: string) {
  for (let i = 0; i < 100; i++) {
    const found = running.mailer.caught!.slice(after).find((m) => m.to.includes(to));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`no mail to ${to} arrived`);
}
