import { Router } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import { validate } from '../validate';
import { labSettingsUpdateSchema } from '../../../shared/schemas/auth';
import { auditQuerySchema } from '../../../shared/schemas/audit';
import type { AppDeps } from '../../app';

/** The lab's settings and its audit log. */
export function settingsRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, audit } = deps.services;
  const member = labAccess(labs);
  const lead = labAccess(labs, ['lead']);
  const settingsUpdate = validate(labSettingsUpdateSchema);
  const auditQuery = validate(auditQuerySchema, 'query');

  r.get('/labs/:labId/settings', member, async (req, res) => {
    res.json(await labs.settings(requireLab(req).labId));
  });
  r.patch('/labs/:labId/settings', lead, settingsUpdate, async (req, res) => {
    res.json(await labs.updateSettings(requireLab(req).labId, settingsUpdate.input(req)));
  });
  r.get('/labs/:labId/audit', lead, auditQuery, async (req, res) => {
    res.json(await audit.list(requireLab(req).labId, auditQuery.input(req)));
  });
  return r;
}
