import { Router } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import { parseOrThrow } from '../../validation';
import { labSettingsUpdateSchema } from '../../../shared/schemas/auth';
import { auditQuerySchema } from '../../../shared/schemas/audit';
import type { AppDeps } from '../../app';

/** The lab's settings and its audit log. */
export function settingsRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, audit } = deps.services;
  const member = labAccess(labs);
  const lead = labAccess(labs, ['lead']);

  r.get('/labs/:labId/settings', member, async (req, res) => {
    res.json(await labs.settings(requireLab(req).labId));
  });
  r.patch('/labs/:labId/settings', lead, async (req, res) => {
    res.json(await labs.updateSettings(requireLab(req).labId, parseOrThrow(labSettingsUpdateSchema, req.body)));
  });
  r.get('/labs/:labId/audit', lead, async (req, res) => {
    res.json(await audit.list(requireLab(req).labId, parseOrThrow(auditQuerySchema, { ...req.query })));
  });
  return r;
}
