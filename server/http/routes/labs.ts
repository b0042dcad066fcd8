import { Router } from 'express';
import { inviteAcceptSchema, inviteCreateSchema, memberUpdateSchema } from '../../../shared/schemas/auth';
import { validate } from '../validate';
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
  const memberUpdate = validate(memberUpdateSchema);
  const inviteCreate = validate(inviteCreateSchema);
  const inviteAccept = validate(inviteAcceptSchema);

  r.get('/labs/:labId/members', member, async (req, res) => {
    res.json(await labs.members(requireLab(req).labId));
  });
  r.patch('/labs/:labId/members/:userId', lead, memberUpdate, async (req, res) => {
    const { roles } = memberUpdate.input(req);
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
  r.post('/labs/:labId/invites', lead, inviteCreate, async (req, res) => {
    const { email, roles } = inviteCreate.input(req);
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
  r.post('/invites/:token/accept', inviteAccept, async (req, res) => {
    const userId = await invites.accept(String(req.params.token), inviteAccept.input(req), ctx(req).user?.id);
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
    const create = validate(service.schema);
    const patch = validate(service.patchSchema);
    r.post(`/labs/:labId/${path}`, lead, create, async (req, res) => res.status(201).json(await service.create(requireLab(req).labId, create.input(req))));
    r.get(`/labs/:labId/${path}/:id`, member, async (req, res) => res.json(await service.get(requireLab(req).labId, param(req))));
    r.patch(`/labs/:labId/${path}/:id`, lead, patch, async (req, res) => res.json(await service.update(requireLab(req).labId, param(req), patch.input(req))));
    r.delete(`/labs/:labId/${path}/:id`, lead, async (req, res) => {
      await service.remove(requireLab(req).labId, param(req));
      res.status(204).end();
    });
  };
  profileRoutes('machines', machines);
  profileRoutes('materials', materials);
  return r;
}
