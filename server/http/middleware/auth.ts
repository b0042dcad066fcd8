import type { Request, RequestHandler, Response } from 'express';
import type { Auth } from '../../auth/sessions';
import { AppError, forbidden, notFound, unauthenticated } from '../../errors';
import type { Role } from '../../../shared/schemas/auth';
import { ctx } from '../context';
import type { LabsService } from '../../services/labs';

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

/** Reads the session cookie, if any; renews it when it is half-way to expiry. */
export function loadSession(auth: Auth, secureApp: boolean): RequestHandler {
  return async (req, res, next) => {
    const sessionId = auth.readSessionCookie(req.headers.cookie ?? '');
    if (!sessionId) return next();
    const { session, user } = await auth.validateSession(sessionId);
    if (!session) {
      clearSessionCookie(auth, req, res, secureApp);
      return next();
    }
    if (session.fresh) setSessionCookie(auth, req, res, session.id, secureApp);
    ctx(req).user = { id: user.id, email: user.email, name: user.name };
    ctx(req).sessionId = session.id;
    next();
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
