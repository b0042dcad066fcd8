import { Router } from 'express';
import { hasRole, labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import type { AppDeps } from '../../app';

export function requestRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, requests } = deps.services;
  const member = labAccess(labs);
  // Designers file requests; a lead may file one for the lab too.
  const filer = labAccess(labs, ['designer', 'lead']);

  r.post('/labs/:labId/requests', filer, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await requests.create(labId, user.id, req.body ?? {}));
  });
  r.get('/labs/:labId/requests', member, async (req, res) => {
    res.json(await requests.list(requireLab(req).labId, { ...req.query }));
  });
  r.get('/labs/:labId/requests/:requestId', member, async (req, res) => {
    res.json(await requests.get(requireLab(req).labId, String(req.params.requestId)));
  });
  r.patch('/labs/:labId/requests/:requestId', filer, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await requests.update(labId, String(req.params.requestId), { userId: user.id, isLead: hasRole(req, 'lead') }, req.body ?? {}));
  });
  return r;
}
