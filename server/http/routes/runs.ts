import { Router, type Response } from 'express';
import { labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import type { LabsService } from '../../services/labs';
import type { QueueService } from '../../services/queue';
import type { RunsService } from '../../services/runs';
import type { CalibrationService } from '../../services/calibration';
import type { SheetService } from '../../services/sheet';
import type { Export3mfService } from '../../services/export3mf';

export type RunRouteDeps = {
  labs: LabsService;
  queue: QueueService;
  runs: RunsService;
  calibration: CalibrationService;
  sheet: SheetService;
  export3mf: Export3mfService;
};

/** A file name for Content-Disposition: the plan's name in plain characters. */
function attachment(res: Response, name: string, ext: string) {
  const plain = name.replace(/[^A-Za-z0-9 ._-]+/g, '_').trim().slice(0, 100) || 'plan';
  res.setHeader('Content-Disposition', `attachment; filename="${plain}.${ext}"; filename*=UTF-8''${encodeURIComponent(name.slice(0, 100))}.${ext}`);
}

/** Machine queues, runs at the machine, calibration, and the build sheet and build file of a plan. */
export function runRoutes({ labs, queue, runs, calibration, sheet, export3mf }: RunRouteDeps): Router {
  const r = Router();
  const member = labAccess(labs);
  const lead = labAccess(labs, ['lead']);
  const operator = labAccess(labs, ['operator', 'lead']);
  const p = (req: { params: Record<string, string | string[]> }, name: string) => String(req.params[name]);
  const machine = '/labs/:labId/machines/:machineId';
  const plan = '/labs/:labId/plans/:planId';

  r.get(`${machine}/queue`, member, async (req, res) => {
    res.json(await queue.get(requireLab(req).labId, p(req, 'machineId')));
  });
  r.put(`${machine}/queue`, lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await queue.reorder(labId, p(req, 'machineId'), user, req.body));
  });
  r.get(`${machine}/calibration`, member, async (req, res) => {
    res.json(await calibration.get(requireLab(req).labId, p(req, 'machineId')));
  });
  r.put(`${machine}/calibration/runs/:runId`, lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await calibration.choose(labId, p(req, 'machineId'), p(req, 'runId'), user, req.body));
  });

  r.get(`${plan}/run`, member, async (req, res) => {
    res.json(await runs.get(requireLab(req).labId, p(req, 'planId')));
  });
  r.post(`${plan}/run/advance`, operator, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await runs.advance(labId, p(req, 'planId'), user, req.body));
  });
  r.post(`${plan}/run/readings`, operator, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.status(201).json(await runs.addReading(labId, p(req, 'planId'), user, req.body));
  });
  r.post(`${plan}/run/readings/:readingId/accept`, lead, async (req, res) => {
    const { labId, user } = requireLab(req);
    res.json(await runs.acceptReading(labId, p(req, 'planId'), p(req, 'readingId'), user, req.body));
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
