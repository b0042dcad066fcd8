import { Lucia, TimeSpan } from 'lucia';
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import type pg from 'pg';

export const SESSION_COOKIE = 'sinterstack_session';

export function createAuth(pool: pg.Pool) {
  const adapter = new NodePostgresAdapter(pool, { user: 'users', session: 'user_sessions' });
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(30, 'd'),
    sessionCookie: { name: SESSION_COOKIE, expires: true, attributes: { sameSite: 'lax' } },
    getUserAttributes: (row) => ({ email: String(row.email), name: String(row.name) }),
  });
}
export type Auth = ReturnType<typeof createAuth>;

declare module 'lucia' {
  interface Register {
    Lucia: Auth;
    DatabaseUserAttributes: { email: string; name: string };
  }
}
