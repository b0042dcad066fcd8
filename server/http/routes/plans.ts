import { Router } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import { parseOrThrow } from '../../validation';
import { planCommentSchema } from '../../../shared/schemas/plans';
import type { PlansService } from '../../services/plans';
import type { LayoutsService } from '../../services/layouts';
import type { ReviewService } from '../../services/review';
import type { LabsService } from '../../services/labs';

export type PlanRouteDeps = { labs: LabsService; plans: PlansService; layouts: LayoutsService; review: ReviewService };

/** Build plans, their layouts, sending for review, the lead's decision and cancelling. */
export function planRoutes({ labs, plans, layouts, review }: PlanRouteDeps): Router {
  const r = Router();
  const member = labAccess(labs);
  const planner = labAccess(labs, ['planner', 'lead']);
  const lead = labAccess(labs, ['lead']);
  const base = '/labs/:labId/plans';
  const p = (req: { params: Record<string, string | string[]> }, name: string) => String(req.params[name]);
  const comment = (body: unknown) => parseOrThrow(planCommentSchema, body ?? {}).comment || null;

  r.get(base, member, async (req, res) => {
    res.json(await plans.list(requireLab(req).labId, req.query));
  });
  r.get('/labs/:labId/plans/open-lines', member, async (req, res) => {
    res.json(await plans.openLines(requireLab(req).labId, req.query));
  });
  r.post(base, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await plans.create(labId, user, req.body));
  });
  r.get(`${base}/:planId`, member, async (req, res) => {
    res.json(await plans.get(requireLab(req).labId, p(req, 'planId')));
  });
  r.put(`${base}/:planId`, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await plans.update(labId, p(req, 'planId'), user, req.body));
  });

  r.post(`${base}/:planId/layouts`, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await layouts.add(labId, p(req, 'planId'), user, req.body));
  });
  r.get(`${base}/:planId/layouts/:layoutId`, member, async (req, res) => {
    res.json(await layouts.get(requireLab(req).labId, p(req, 'planId'), p(req, 'layoutId')));
  });
  r.patch(`${base}/:planId/layouts/:layoutId`, planner, async (req, res) => {
    res.json(await layouts.update(requireLab(req).labId, p(req, 'planId'), p(req, 'layoutId'), req.body));
  });
  r.post(`${base}/:planId/layouts/:layoutId/choose`, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await layouts.choose(labId, p(req, 'planId'), p(req, 'layoutId'), user));
  });
  r.delete(`${base}/:planId/layouts/:layoutId`, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    await layouts.remove(labId, p(req, 'planId'), p(req, 'layoutId'), user);
    res.status(204).end();
  });

  r.post(`${base}/:planId/submit`, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await plans.submit(labId, p(req, 'planId'), user, comment(req.body)));
  });
  r.post(`${base}/:planId/review`, lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await review.review(labId, p(req, 'planId'), user, req.body));
  });
  r.post(`${base}/:planId/cancel`, planner, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await plans.cancel(labId, p(req, 'planId'), user, comment(req.body)));
  });
  return r;
}
