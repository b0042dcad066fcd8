import { Router } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import { validate } from '../validate';
import {
  layoutCreateSchema,
  layoutPatchSchema,
  openLinesQuerySchema,
  planCommentSchema,
  planCreateSchema,
  planListQuerySchema,
  planUpdateSchema,
  reviewSchema,
} from '../../../shared/schemas/plans';
import type { PlansService } from '../../services/plans';
import type { LayoutsService } from '../../services/layouts';
import type { ReviewService } from '../../services/review';
import type { ReviewFlagsService } from '../../services/reviewFlags';
import type { TakeBackService } from '../../services/takeBack';
import { returnToDraftSchema } from '../../../shared/schemas/review';
import type { LabsService } from '../../services/labs';

export type PlanRouteDeps = { labs: LabsService; plans: PlansService; layouts: LayoutsService; review: ReviewService; reviewFlags: ReviewFlagsService; takeBack: TakeBackService };

/** Build plans, their layouts, sending for review, the lead's decision and cancelling. */
export function planRoutes({ labs, plans, layouts, review, reviewFlags, takeBack }: PlanRouteDeps): Router {
  const r = Router();
  const member = labAccess(labs);
  const planner = labAccess(labs, ['planner', 'lead']);
  const lead = labAccess(labs, ['lead']);
  const base = '/labs/:labId/plans';
  const p = (req: { params: Record<string, string | string[]> }, name: string) => String(req.params[name]);
  const listQuery = validate(planListQuerySchema, 'query');
  const openLinesQuery = validate(openLinesQuerySchema, 'query');
  const create = validate(planCreateSchema);
  const update = validate(planUpdateSchema);
  const layoutCreate = validate(layoutCreateSchema);
  const layoutPatch = validate(layoutPatchSchema);
  const decision = validate(reviewSchema);
  const withComment = validate(planCommentSchema);
  const withReason = validate(returnToDraftSchema);
  const comment = (req: Parameters<typeof withComment.input>[0]) => withComment.input(req).comment || null;

  r.get(base, member, listQuery, async (req, res) => {
    res.json(await plans.list(requireLab(req).labId, listQuery.input(req)));
  });
  r.get('/labs/:labId/plans/open-lines', member, openLinesQuery, async (req, res) => {
    res.json(await plans.openLines(requireLab(req).labId, openLinesQuery.input(req)));
  });
  r.post(base, planner, create, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await plans.create(labId, user, create.input(req)));
  });
  r.get(`${base}/:planId`, member, async (req, res) => {
    res.json(await plans.get(requireLab(req).labId, p(req, 'planId')));
  });
  r.get(`${base}/:planId/flags`, member, async (req, res) => {
    res.json(await reviewFlags.forPlan(requireLab(req).labId, p(req, 'planId')));
  });
  r.put(`${base}/:planId`, planner, update, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await plans.update(labId, p(req, 'planId'), user, update.input(req)));
  });

  r.post(`${base}/:planId/layouts`, planner, layoutCreate, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await layouts.add(labId, p(req, 'planId'), user, layoutCreate.input(req)));
  });
  r.get(`${base}/:planId/layouts/:layoutId`, member, async (req, res) => {
    res.json(await layouts.get(requireLab(req).labId, p(req, 'planId'), p(req, 'layoutId')));
  });
  r.patch(`${base}/:planId/layouts/:layoutId`, planner, layoutPatch, async (req, res) => {
    res.json(await layouts.update(requireLab(req).labId, p(req, 'planId'), p(req, 'layoutId'), layoutPatch.input(req)));
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

  r.post(`${base}/:planId/submit`, planner, withComment, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await plans.submit(labId, p(req, 'planId'), user, comment(req)));
  });
  r.post(`${base}/:planId/review`, lead, decision, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await review.review(labId, p(req, 'planId'), user, decision.input(req)));
  });
  r.post(`${base}/:planId/review/undo`, lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await takeBack.undoApproval(labId, p(req, 'planId'), user));
  });
  r.post(`${base}/:planId/return-to-draft`, planner, withReason, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await takeBack.returnToDraft(labId, p(req, 'planId'), user, withReason.input(req).reason));
  });
  r.post(`${base}/:planId/cancel`, planner, withComment, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await plans.cancel(labId, p(req, 'planId'), user, comment(req)));
  });
  return r;
}
