import { Router } from 'express';
import { hasRole, labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import type { AppDeps } from '../../app';
import { validate } from '../validate';
import { requestCreateSchema, requestListQuerySchema, requestPatchSchema } from '../../../shared/schemas/requests';

export function requestRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, requests } = deps.services;
  const member = labAccess(labs);
  // Designers file requests; a lead may file one for the lab too.
  const filer = labAccess(labs, ['designer', 'lead']);
  const create = validate(requestCreateSchema);
  const listQuery = validate(requestListQuerySchema, 'query');
  const patch = validate(requestPatchSchema);

  r.post('/labs/:labId/requests', filer, create, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await requests.create(labId, user.id, create.input(req)));
  });
  r.get('/labs/:labId/requests', member, listQuery, async (req, res) => {
    res.json(await requests.list(requireLab(req).labId, listQuery.input(req)));
  });
  r.get('/labs/:labId/requests/:requestId', member, async (req, res) => {
    res.json(await requests.get(requireLab(req).labId, String(req.params.requestId)));
  });
  r.patch('/labs/:labId/requests/:requestId', filer, patch, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await requests.update(labId, String(req.params.requestId), { userId: user.id, isLead: hasRole(req, 'lead') }, patch.input(req)));
  });
  return r;
}
