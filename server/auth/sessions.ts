import { Lucia, TimeSpan } from 'lucia';
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import type pg from 'pg';

export const SESSION_COOKIE = 'sinterstack_session';

/**
 * Sessions (lucia, rows in `user_sessions`). Lucia's own expiry slides with
 * use and is the idle lifetime; the absolute lifetime and the exact idle
 * check are applied by the session middleware from `created_at` and
 * `last_seen_at`.
 */
export function createAuth(pool: pg.Pool, opts: { idleMs?: number } = {}) {
  const adapter = new NodePostgresAdapter(pool, { user: 'users', session: 'user_sessions' });
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(Math.max(1, Math.round((opts.idleMs ?? 7 * 86_400_000) / 1000)), 's'),
    sessionCookie: { name: SESSION_COOKIE, expires: true, attributes: { sameSite: 'lax' } },
    getUserAttributes: (row) => ({ email: String(row.email), name: String(row.name) }),
    getSessionAttributes: (row) => ({
      createdAt: row.created_at ? new Date(row.created_at) : new Date(),
      lastSeenAt: row.last_seen_at ? new Date(row.last_seen_at) : new Date(),
      rotate: row.rotate === true,
      userAgent: row.user_agent ?? null,
      ipAddress: row.ip_address ?? null,
    }),
  });
}
export type Auth = ReturnType<typeof createAuth>;

declare module 'lucia' {
  interface Register {
    Lucia: Auth;
    DatabaseUserAttributes: { email: string; name: string };
    DatabaseSessionAttributes: {
      created_at?: Date;
      last_seen_at?: Date;
      rotate?: boolean;
      user_agent?: string | null;
      ip_address?: string | null;
    };
  }
}
