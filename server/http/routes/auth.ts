import { Router, type RequestHandler } from 'express';
import { passwordChangeSchema, resetRequestSchema, resetSchema, signInSchema, signUpSchema } from '../../../shared/schemas/auth';
import { validate } from '../validate';
import { clearSessionCookie, requireSession, startSession } from '../middleware/auth';
import { sessionsService } from '../../services/sessions';
import { ctx, requireUser } from '../context';
import { notFound, unauthenticated } from '../../errors';
import type { AppDeps } from '../../app';

export function authRoutes(deps: AppDeps, limiter: RequestHandler, resetLimiter: RequestHandler): Router {
  const r = Router();
  const secure = deps.config.appUrl.startsWith('https:');
  const signUp = validate(signUpSchema);
  const signIn = validate(signInSchema);
  const passwordChange = validate(passwordChangeSchema);
  const resetRequest = validate(resetRequestSchema);
  const reset = validate(resetSchema);

  r.post('/auth/sign-up', limiter, signUp, async (req, res) => {
    const userId = await deps.services.auth.signUp(signUp.input(req));
    await startSession(deps.auth, req, res, userId, secure);
    res.status(201).json(await deps.services.labs.me(userId));
  });

  r.post('/auth/sign-in', limiter, signIn, async (req, res) => {
    const userId = await deps.services.auth.signIn(signIn.input(req));
    await startSession(deps.auth, req, res, userId, secure);
    res.json(await deps.services.labs.me(userId));
  });

  r.post('/auth/sign-out', async (req, res) => {
    const sessionId = ctx(req).sessionId;
    if (sessionId) await deps.auth.invalidateSession(sessionId);
    clearSessionCookie(deps.auth, req, res, secure);
    res.status(204).end();
  });

  r.post('/auth/password', requireSession, limiter, passwordChange, async (req, res) => {
    await deps.services.auth.changePassword(requireUser(req).id, ctx(req).sessionId!, passwordChange.input(req));
    res.status(204).end();
  });

  // Same answer whether or not the address has an account; limited per address and per e-mail.
  r.post('/auth/reset-request', limiter, resetLimiter, resetRequest, async (req, res) => {
    const { email } = resetRequest.input(req);
    deps.services.auth.requestReset(email);
    res.status(202).json({ ok: true });
  });

  r.post('/auth/reset', limiter, reset, async (req, res) => {
    await deps.services.auth.resetPassword(reset.input(req));
    clearSessionCookie(deps.auth, req, res, secure);
    res.status(204).end();
  });

  const sessions = sessionsService(deps.db, deps.services.audit);
  r.get('/auth/sessions', requireSession, async (req, res) => {
    res.json(await sessions.list(requireUser(req).id, ctx(req).sessionId!));
  });
  r.delete('/auth/sessions/:sessionId', requireSession, async (req, res) => {
    const handle = String(req.params.sessionId);
    if (!/^[0-9a-f]{24}$/.test(handle)) throw notFound('That session');
    if (await sessions.revoke(requireUser(req).id, handle, ctx(req).sessionId!)) clearSessionCookie(deps.auth, req, res, secure);
    res.status(204).end();
  });
  r.post('/auth/sign-out-everywhere', requireSession, async (req, res) => {
    await sessions.revokeAll(requireUser(req).id);
    clearSessionCookie(deps.auth, req, res, secure);
    res.status(204).end();
  });

  r.get('/me', requireSession, async (req, res) => {
    const me = await deps.services.labs.me(requireUser(req).id);
    if (!me) throw unauthenticated();
    res.json(me);
  });
  return r;
}
