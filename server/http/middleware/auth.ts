import type { Request, RequestHandler, Response } from 'express';
import type { Auth } from '../../auth/sessions';
import { AppError, forbidden, notFound, unauthenticated } from '../../errors';
import type { Role } from '../../../shared/schemas/auth';
import { ctx } from '../context';
import type { LabsService } from '../../services/labs';
import type pg from 'pg';
import { asActor } from '../../audit/actor';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export const isUuid = (s: string) => UUID.test(s);

export function setSessionCookie(auth: Auth, req: Request, res: Response, sessionId: string, secureApp: boolean) {
  const cookie = auth.createSessionCookie(sessionId);
  res.cookie(cookie.name, cookie.value, {
    httpOnly: true,
    sameSite: 'lax',
    secure: secureApp || req.secure,
    path: '/',
    expires: cookie.attributes.expires,
  });
}

export function clearSessionCookie(auth: Auth, req: Request, res: Response, secureApp: boolean) {
  const cookie = auth.createBlankSessionCookie();
  res.cookie(cookie.name, '', { httpOnly: true, sameSite: 'lax', secure: secureApp || req.secure, path: '/', maxAge: 0 });
}

export type SessionLifetimes = { idleMs: number; absoluteMs: number };

/** The browser and address a session is opened from, kept so its owner can recognise it in the list. */
export function sessionOrigin(req: Request): { user_agent: string | null; ip_address: string | null } {
  const ua = req.get('user-agent');
  return { user_agent: ua ? ua.slice(0, 300) : null, ip_address: req.ip ?? null };
}

/** Starts a session for `userId` and sets its cookie. */
export async function startSession(auth: Auth, req: Request, res: Response, userId: string, secureApp: boolean): Promise<void> {
  const session = await auth.createSession(userId, { created_at: new Date(), last_seen_at: new Date(), ...sessionOrigin(req) });
  setSessionCookie(auth, req, res, session.id, secureApp);
}

/** "Last seen" is written at most this often per session. */
const SEEN_EVERY_MS = 60_000;

/**
 * Reads the session cookie, if any. A session past its absolute lifetime
 * (since sign-in) or idle longer than the idle lifetime ends here; one marked
 * for rotation (its owner's roles changed) is replaced by a new id with the
 * same sign-in time; lucia renews the cookie when it is half-way to expiry.
 * The rest of the request runs as this user for the audit log.
 */
export function loadSession(auth: Auth, secureApp: boolean, pool: pg.Pool, lifetimes: SessionLifetimes): RequestHandler {
  return async (req, res, next) => {
    const sessionId = auth.readSessionCookie(req.headers.cookie ?? '');
    if (!sessionId) return next();
    const validated = await auth.validateSession(sessionId);
    let session = validated.session;
    const user = validated.user;
    if (!session || !user) {
      clearSessionCookie(auth, req, res, secureApp);
      return next();
    }
    const now = Date.now();
    if (now - session.createdAt.getTime() > lifetimes.absoluteMs || now - session.lastSeenAt.getTime() > lifetimes.idleMs) {
      await auth.invalidateSession(session.id);
      clearSessionCookie(auth, req, res, secureApp);
      return next();
    }
    if (session.rotate) {
      // Only one request wins the old id; a parallel one finds it gone and is signed out like any stale cookie.
      const { rowCount } = await pool.query('DELETE FROM user_sessions WHERE id = $1 AND rotate', [session.id]);
      if (!rowCount) {
        clearSessionCookie(auth, req, res, secureApp);
        return next();
      }
      const fresh = await auth.createSession(user.id, {
        created_at: session.createdAt,
        last_seen_at: new Date(),
        user_agent: session.userAgent,
        ip_address: session.ipAddress,
      });
      setSessionCookie(auth, req, res, fresh.id, secureApp);
      session = fresh;
    } else {
      if (session.fresh) setSessionCookie(auth, req, res, session.id, secureApp);
      if (now - session.lastSeenAt.getTime() > SEEN_EVERY_MS) {
        const origin = sessionOrigin(req);
        await pool.query('UPDATE user_sessions SET last_seen_at = now(), user_agent = coalesce(user_agent, $2), ip_address = coalesce(ip_address, $3) WHERE id = $1', [
          session.id,
          origin.user_agent,
          origin.ip_address,
        ]);
      }
    }
    ctx(req).user = { id: user.id, email: user.email, name: user.name };
    ctx(req).sessionId = session.id;
    asActor(user.id, () => next());
  };
}

/**
 * Refuses a state-changing request that does not come from the app's own
 * pages: a missing or foreign Origin header answers 403 (cross-site request
 * forgery defence on top of SameSite=Lax cookies).
 */
export function checkOrigin(appUrl: string): RequestHandler {
  const own = new URL(appUrl).origin;
  return (req, _res, next) => {
    if (['GET', 'HEAD', 'OPTIONS'].includes(req.method)) return next();
    const origin = req.headers.origin;
    let allowed = false;
    if (origin) {
      try {
        const o = new URL(origin).origin;
        // The host the request was sent to also counts as the app's own, so
        // that 127.0.0.1 and localhost both work behind the same server.
        allowed = o === own || (req.headers.host !== undefined && new URL(origin).host === req.headers.host);
      } catch {
        allowed = false;
      }
    }
    if (!allowed) return next(new AppError(403, 'forbidden_origin', 'This request did not come from the Sinterstack app.'));
    next();
  };
}

export const requireSession: RequestHandler = (req, _res, next) => {
  if (!ctx(req).user) return next(unauthenticated());
  next();
};

/**
 * Loads the caller's membership of `:labId`. Not a member (or not a lab id at
 * all) answers 404, so another lab's existence is not revealed; a member
 * without one of `roles` answers 403.
 */
export function labAccess(labs: LabsService, roles?: readonly Role[]): RequestHandler {
  return async (req, _res, next) => {
    const user = ctx(req).user;
    if (!user) return next(unauthenticated());
    const labId = String(req.params.labId ?? '');
    if (!isUuid(labId)) return next(notFound('That lab'));
    const membership = await labs.membership(labId, user.id);
    if (!membership) return next(notFound('That lab'));
    ctx(req).lab = { labId, roles: membership.roles };
    if (roles && !roles.some((r) => membership.roles.includes(r))) {
      return next(forbidden(`Only a ${roles.join(' or ')} of this lab may do that.`));
    }
    next();
  };
}

/** For handlers that check a role after reading the object (e.g. "the uploader or a lead"). */
export function hasRole(req: Request, ...roles: Role[]): boolean {
  const lab = ctx(req).lab;
  return !!lab && roles.some((r) => lab.roles.includes(r));
}
