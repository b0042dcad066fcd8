import { Router, type RequestHandler } from 'express';
import { passwordChangeSchema, signInSchema, signUpSchema } from '../../../shared/schemas/auth';
import { parseOrThrow } from '../../validation';
import { clearSessionCookie, requireSession, setSessionCookie } from '../middleware/auth';
import { ctx, requireUser } from '../context';
import { unauthenticated } from '../../errors';
import type { AppDeps } from '../../app';

export function authRoutes(deps: AppDeps, limiter: RequestHandler): Router {
  const r = Router();
  const secure = deps.config.appUrl.startsWith('https:');

  r.post('/auth/sign-up', limiter, async (req, res) => {
    const input = parseOrThrow(signUpSchema, req.body);
    const userId = await deps.services.auth.signUp(input);
    const session = await deps.auth.createSession(userId, {});
    setSessionCookie(deps.auth, req, res, session.id, secure);
    res.status(201).json(await deps.services.labs.me(userId));
  });

  r.post('/auth/sign-in', limiter, async (req, res) => {
    const input = parseOrThrow(signInSchema, req.body);
    const userId = await deps.services.auth.signIn(input);
    const session = await deps.auth.createSession(userId, {});
    setSessionCookie(deps.auth, req, res, session.id, secure);
    res.json(await deps.services.labs.me(userId));
  });

  r.post('/auth/sign-out', async (req, res) => {
    const sessionId = ctx(req).sessionId;
    if (sessionId) await deps.auth.invalidateSession(sessionId);
    clearSessionCookie(deps.auth, req, res, secure);
    res.status(204).end();
  });

  r.post('/auth/password', requireSession, limiter, async (req, res) => {
    const input = parseOrThrow(passwordChangeSchema, req.body);
    await deps.services.auth.changePassword(requireUser(req).id, ctx(req).sessionId!, input);
    res.status(204).end();
  });

  r.get('/me', requireSession, async (req, res) => {
    const me = await deps.services.labs.me(requireUser(req).id);
    if (!me) throw unauthenticated();
    res.json(me);
  });
  return r;
}
