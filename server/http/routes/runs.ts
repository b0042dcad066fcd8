import { Router, type Response } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import type { LabsService } from '../../services/labs';
import type { QueueService } from '../../services/queue';
import type { TakeBackService } from '../../services/takeBack';
import type { RunsService } from '../../services/runs';
import type { CalibrationService } from '../../services/calibration';
import type { SheetService } from '../../services/sheet';
import type { Export3mfService } from '../../services/export3mf';
import { validate } from '../validate';
import { parseOrThrow } from '../../validation';
import { badRequest } from '../../errors';
import { STATUS_LABELS, type PlanStatus } from '../../../shared/plans/status';
import {
  ADVANCE_SCHEMAS,
  acceptReadingSchema,
  advanceTargetSchema,
  calibrationChoiceSchema,
  isMachineStep,
  queueOrderSchema,
  readingSchema,
  type AdvanceInput,
} from '../../../shared/schemas/runs';

export type RunRouteDeps = {
  labs: LabsService;
  queue: QueueService;
  runs: RunsService;
  calibration: CalibrationService;
  sheet: SheetService;
  export3mf: Export3mfService;
  takeBack: TakeBackService;
};

/** A file name for Content-Disposition: the plan's name in plain characters. */
function attachment(res: Response, name: string, ext: string) {
  const plain = name.replace(/[^A-Za-z0-9 ._-]+/g, '_').trim().slice(0, 100) || 'plan';
  res.setHeader('Content-Disposition', `attachment; filename="${plain}.${ext}"; filename*=UTF-8''${encodeURIComponent(name.slice(0, 100))}.${ext}`);
}

/** A step's own fields, checked by its stage's schema (the target alone was checked first). */
function stageInput(to: PlanStatus, body: unknown): AdvanceInput {
  if (!isMachineStep(to)) throw badRequest(`to: a plan becomes ${STATUS_LABELS[to].toLowerCase()} through its own route, not at the machine`, 'to');
  return parseOrThrow(ADVANCE_SCHEMAS[to], body ?? {});
}

/** Machine queues, runs at the machine, calibration, and the build sheet and build file of a plan. */
export function runRoutes({ labs, queue, runs, calibration, sheet, export3mf, takeBack }: RunRouteDeps): Router {
  const r = Router();
  const member = labAccess(labs);
  const lead = labAccess(labs, ['lead']);
  const operator = labAccess(labs, ['operator', 'lead']);
  const p = (req: { params: Record<string, string | string[]> }, name: string) => String(req.params[name]);
  const machine = '/labs/:labId/machines/:machineId';
  const plan = '/labs/:labId/plans/:planId';
  const order = validate(queueOrderSchema);
  const target = validate(advanceTargetSchema);
  const reading = validate(readingSchema);
  const acceptance = validate(acceptReadingSchema);
  const calibrationChoice = validate(calibrationChoiceSchema);

  r.get(`${machine}/queue`, member, async (req, res) => {
    res.json(await queue.get(requireLab(req).labId, p(req, 'machineId')));
  });
  r.put(`${machine}/queue`, lead, order, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await queue.reorder(labId, p(req, 'machineId'), user, order.input(req)));
  });
  r.post(`${machine}/queue/moves/:moveId/undo`, lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    await takeBack.undoQueueMove(labId, p(req, 'machineId'), p(req, 'moveId'), user);
    res.json(await queue.get(labId, p(req, 'machineId')));
  });
  r.get(`${machine}/calibration`, member, async (req, res) => {
    res.json(await calibration.get(requireLab(req).labId, p(req, 'machineId')));
  });
  r.put(`${machine}/calibration/runs/:runId`, lead, calibrationChoice, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await calibration.choose(labId, p(req, 'machineId'), p(req, 'runId'), user, calibrationChoice.input(req)));
  });

  r.get(`${plan}/run`, member, async (req, res) => {
    res.json(await runs.get(requireLab(req).labId, p(req, 'planId')));
  });
  r.post(`${plan}/run/advance`, operator, target, async (req, res) => {
    const { labId, user } = requireLab(req);
    const { to } = target.input(req);
    // Whether the move is allowed is answered before the stage's fields are checked.
    await runs.checkAdvance(labId, p(req, 'planId'), to);
    res.json(await runs.advance(labId, p(req, 'planId'), user, stageInput(to, req.body)));
  });
  r.post(`${plan}/run/readings`, operator, reading, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await runs.addReading(labId, p(req, 'planId'), user, reading.input(req)));
  });
  r.post(`${plan}/run/readings/:readingId/accept`, lead, acceptance, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await runs.acceptReading(labId, p(req, 'planId'), p(req, 'readingId'), user, acceptance.input(req)));
  });

  r.get(`${plan}/sheet.pdf`, member, async (req, res) => {
    const { name, bytes } = await sheet.build(requireLab(req).labId, p(req, 'planId'));
    res.type('application/pdf');
    attachment(res, `${name} build sheet`, 'pdf');
    res.send(bytes);
  });
  r.get(`${plan}/build.3mf`, member, async (req, res) => {
    const { name, bytes } = await export3mf.build(requireLab(req).labId, p(req, 'planId'));
    res.type('model/3mf');
    attachment(res, name, '3mf');
    res.send(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength));
  });
  return r;
}
