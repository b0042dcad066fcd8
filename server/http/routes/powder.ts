import { Router } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import type { LabsService } from '../../services/labs';
import type { PowderService } from '../../services/powder';
import { validate } from '../validate';
import { meltFlowSchema, movementSchema, policySchema, receiveLotSchema, recoverySchema, releaseSchema } from '../../../shared/schemas/powder';

/**
 * Powder stock of a lab: everyone in the lab reads it (planners see a plan's
 * effect on the stock), leads and operators record movements, checks and
 * breakout recoveries, leads set a material's rules and release a failed
 * melt-flow check.
 */
export function powderRoutes({ labs, powder }: { labs: LabsService; powder: PowderService }): Router {
  const r = Router();
  const member = labAccess(labs);
  const lead = labAccess(labs, ['lead']);
  const hands = labAccess(labs, ['operator', 'lead']);
  const p = (req: { params: Record<string, string | string[]> }, name: string) => String(req.params[name]);
  const base = '/labs/:labId/powder';
  const policy = validate(policySchema);
  const lot = validate(receiveLotSchema);
  const movement = validate(movementSchema);
  const check = validate(meltFlowSchema);
  const release = validate(releaseSchema);
  const recovery = validate(recoverySchema);

  r.get(base, member, async (req, res) => {
    res.json(await powder.overview(requireLab(req).labId));
  });
  r.get(`${base}/materials/:materialId`, member, async (req, res) => {
    res.json(await powder.material(requireLab(req).labId, p(req, 'materialId')));
  });
  r.put(`${base}/materials/:materialId/policy`, lead, policy, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await powder.setPolicy(labId, p(req, 'materialId'), user, policy.input(req)));
  });
  r.post(`${base}/lots`, hands, lot, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await powder.receiveLot(labId, user, lot.input(req)));
  });
  r.get(`${base}/lots/:lotId`, member, async (req, res) => {
    res.json(await powder.lot(requireLab(req).labId, p(req, 'lotId')));
  });
  r.post(`${base}/movements`, hands, movement, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await powder.recordMovement(labId, user, movement.input(req)));
  });
  r.post(`${base}/checks`, hands, check, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await powder.addCheck(labId, user, check.input(req)));
  });
  r.post(`${base}/checks/:checkId/release`, lead, release, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await powder.release(labId, p(req, 'checkId'), user, release.input(req)));
  });
  r.get(`${base}/plans/:planId`, member, async (req, res) => {
    res.json(await powder.plan(requireLab(req).labId, p(req, 'planId')));
  });
  r.post(`${base}/plans/:planId/recovery`, hands, recovery, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await powder.recordRecovery(labId, p(req, 'planId'), user, recovery.input(req)));
  });
  r.get(`${base}/requests/:requestId`, member, async (req, res) => {
    res.json(await powder.requestLots(requireLab(req).labId, p(req, 'requestId')));
  });
  return r;
}
