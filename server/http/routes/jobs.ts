import { Router } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import type { AppDeps } from '../../app';

/** Uploads measured on the job queue: where one stands, and its parts once done. */
export function jobRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, meshJobs } = deps.services;
  r.get('/labs/:labId/jobs/:jobId', labAccess(labs), async (req, res) => {
    res.json(await meshJobs.view(requireLab(req).labId, String(req.params.jobId)));
  });
  return r;
}
