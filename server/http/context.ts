import type { Request } from 'express';
import type { Role } from '../../shared/schemas/auth';
import { unauthenticated } from '../errors';

export type SessionUser = { id: string; email: string; name: string };
export type LabAccess = { labId: string; roles: Role[] };

/** What the middleware learnt about the caller, kept on the request. */
export type RequestContext = { user?: SessionUser; sessionId?: string; lab?: LabAccess };

export function ctx(req: Request): RequestContext {
  const r = req as Request & { sinterstack?: RequestContext };
  r.sinterstack ??= {};
  return r.sinterstack;
}

export function requireUser(req: Request): SessionUser {
  const user = ctx(req).user;
  if (!user) throw unauthenticated();
  return user;
}

export function requireLab(req: Request): LabAccess & { user: SessionUser } {
  const c = ctx(req);
  if (!c.user || !c.lab) throw unauthenticated();
  return { ...c.lab, user: c.user };
}
