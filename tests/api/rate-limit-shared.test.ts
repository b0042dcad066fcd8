/**
 * Rate limits hold across server processes: two app instances on one
 * database (as behind a load balancer) count against the same limits, so a
 * client cannot double its guesses by alternating between servers.
 */
import { randomBytes } from 'node:crypto';
import { agent, signUp, startTestApp, uniqueEmail } from '../helpers/app';

jest.setTimeout(60_000);

test('sign-in guesses spread over two servers count once against the per-address and per-account limits', async () => {
  const shared = `shared-${randomBytes(6).toString('hex')}:`;
  const a = await startTestApp({ authRateLimit: 6, authAccountRateLimit: 1000, rateLimitNamespace: shared });
  const b = await startTestApp({ authRateLimit: 6, authAccountRateLimit: 1000, rateLimitNamespace: shared });
  try {
    const statuses: number[] = [];
    for (let i = 0; i < 10; i++) {
      const server = i % 2 === 0 ? a : b;
      statuses.push((await agent(server).post('/api/auth/sign-in').send({ email: uniqueEmail('nobody'), password: `guess-${i}` })).status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 401, 401, 429, 429, 429, 429]);
  } finally {
    await a.close();
    await b.close();
  }
});

test('the per-account limit is shared too, and a new window starts when the old one ends', async () => {
  const shared = `shared-${randomBytes(6).toString('hex')}:`;
  const a = await startTestApp({ authRateLimit: 1000, authAccountRateLimit: 4, rateLimitNamespace: shared });
  const b = await startTestApp({ authRateLimit: 1000, authAccountRateLimit: 4, rateLimitNamespace: shared });
  try {
    const victim = await signUp(a, 'two-servers');
    const statuses: number[] = [];
    for (let i = 0; i < 8; i++) {
      statuses.push((await agent(i % 2 ? b : a).post('/api/auth/sign-in').send({ email: victim.email, password: `guess-${i}` })).status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 429, 429, 429, 429]);
    // The window ends (moved into the past here rather than waited for).
    await a.db.sequelize.query("UPDATE rate_limit_hits SET reset_at = now() - interval '1 second' WHERE key LIKE $1", { bind: [`${shared}%`] });
    expect((await agent(b).post('/api/auth/sign-in').send({ email: victim.email, password: 'guess-again' })).status).toBe(401);
  } finally {
    await a.close();
    await b.close();
  }
});
