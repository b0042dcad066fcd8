import { Router } from 'express';
import { inviteAcceptSchema, inviteCreateSchema, memberUpdateSchema } from '../../../shared/schemas/auth';
import { parseOrThrow } from '../../validation';
import { labAccess, setSessionCookie } from '../middleware/auth';
import { ctx, requireLab } from '../context';
import { notFound } from '../../errors';
import type { AppDeps } from '../../app';
import type { ProfilesService } from '../../services/profiles';

export function labRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, invites, machines, materials } = deps.services;
  const member = labAccess(labs);
  const lead = labAccess(labs, ['lead']);
  const secure = deps.config.appUrl.startsWith('https:');

  r.get('/labs/:labId/members', member, async (req, res) => {
    res.json(await labs.members(requireLab(req).labId));
  });
  r.patch('/labs/:labId/members/:userId', lead, async (req, res) => {
    const { roles } = parseOrThrow(memberUpdateSchema, req.body);
    const { labId, user } = requireLab(req);
    res.json(await labs.setRoles(labId, String(req.params.userId), roles, user.id));
  });
  r.delete('/labs/:labId/members/:userId', lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    await labs.removeMember(labId, String(req.params.userId), user.id);
    res.status(204).end();
  });

  r.get('/labs/:labId/invites', lead, async (req, res) => {
    res.json(await invites.list(requireLab(req).labId));
  });
  r.post('/labs/:labId/invites', lead, async (req, res) => {
    const { email, roles } = parseOrThrow(inviteCreateSchema, req.body);
    const { labId, user } = requireLab(req);
    res.status(201).json(await invites.create(labId, user, email, roles));
  });
  r.delete('/labs/:labId/invites/:inviteId', lead, async (req, res) => {
    const id = String(req.params.inviteId);
    if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('That invite');
    await invites.revoke(requireLab(req).labId, id);
    res.status(204).end();
  });

  r.get('/invites/:token', async (req, res) => {
    res.json(await invites.lookup(String(req.params.token)));
  });
  r.post('/invites/:token/accept', async (req, res) => {
    const input = parseOrThrow(inviteAcceptSchema, req.body ?? {});
    const userId = await invites.accept(String(req.params.token), input, ctx(req).user?.id);
    if (ctx(req).user?.id !== userId) {
      const session = await deps.auth.createSession(userId, {});
      setSessionCookie(deps.auth, req, res, session.id, secure);
    }
    res.json(await labs.me(userId));
  });

  const profileRoutes = (path: string, service: ProfilesService) => {
    const idOk = (id: string) => /^[0-9a-f-]{36}$/i.test(id);
    const param = (req: { params: Record<string, string | string[]> }) => {
      const id = String(req.params.id);
      if (!idOk(id)) throw notFound();
      return id;
    };
    r.get(`/labs/:labId/${path}`, member, async (req, res) => res.json(await service.list(requireLab(req).labId)));
    r.post(`/labs/:labId/${path}`, lead, async (req, res) => res.status(201).json(await service.create(requireLab(req).labId, req.body)));
    r.get(`/labs/:labId/${path}/:id`, member, async (req, res) => res.json(await service.get(requireLab(req).labId, param(req))));
    r.patch(`/labs/:labId/${path}/:id`, lead, async (req, res) => res.json(await service.update(requireLab(req).labId, param(req), req.body)));
    r.delete(`/labs/:labId/${path}/:id`, lead, async (req, res) => {
      await service.remove(requireLab(req).labId, param(req));
      res.status(204).end();
    });
  };
  profileRoutes('machines', machines);
  profileRoutes('materials', materials);
  return r;
}
