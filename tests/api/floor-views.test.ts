import { startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { calibrationViewSchema, queueViewSchema, runViewSchema } from '../../shared/schemas/runs';
import { labWithCrew, queuedPlan, startBody } from './runs-fixtures';
import type { z } from 'zod';

// The floor card, the queue and the calibration panel parse the server's answers with the shared views: an
// answer that does not match (a number sent as a string, a field missing) would leave those screens empty.
jest.setTimeout(30_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

/** The parse's first problem, with its path, so a failure names the field the screens could not read. */
function problems(schema: z.ZodType, body: unknown): string[] {
  const parsed = schema.safeParse(body);
  return parsed.success ? [] : parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
}

test('every answer of a run from the queue to done, and the calibration after it, reads with the views the screens use', async () => {
  const lab = await labWithCrew(running, 'views');
  const { base, request, estimate } = await queuedPlan(running, lab, [{ name: 'Gear', sizeMm: [30, 30, 8], quantity: 4 }]);
  const op = lab.operator.agent;
  const queueUrl = `/api/labs/${lab.labId}/machines/${lab.machineId}/queue`;

  const queued = await op.get(queueUrl);
  expect(problems(queueViewSchema, queued.body)).toEqual([]);
  expect(queued.body.plans).toHaveLength(1);
  expect(problems(runViewSchema, (await op.get(`${base}/run`)).body)).toEqual([]);

  const steps: Array<Record<string, unknown>> = [];
  const started = await op.post(`${base}/run/advance`).send(startBody(estimate));
  expect(started.status).toBe(200);
  steps.push(started.body);
  const runId = started.body.id as string;
  const during = await op.get(queueUrl);
  expect(problems(queueViewSchema, during.body)).toEqual([]);
  expect(during.body.current).not.toBeNull();

  const cooling = await op.post(`${base}/run/advance`).send({ runId, to: 'cooling' });
  steps.push(cooling.body);
  const reading = await op.post(`${base}/run/readings`).send({ runId, tempC: 30, where: 'outside' });
  expect(reading.status).toBe(201);
  steps.push(reading.body);
  const accepted = await lab.agent.post(`${base}/run/readings/${reading.body.readings[0].id}/accept`).send({ runId, reason: 'Probe checked against the reference' });
  expect(accepted.status).toBe(200);
  steps.push(accepted.body);
  const breakout = await op.post(`${base}/run/advance`).send({ runId, to: 'breakout' });
  expect(breakout.status).toBe(200);
  steps.push(breakout.body);
  const finishing = await op.post(`${base}/run/advance`).send({ runId, to: 'finishing', counts: [{ requestLineId: request.lines[0].id, good: 3, failed: 1 }] });
  expect(finishing.status).toBe(200);
  steps.push(finishing.body);
  const done = await op
    .post(`${base}/run/advance`)
    .send({ runId, to: 'done', finishingChecklist: { powderRemoved: true, blasted: true, inspected: true }, powderUsedKg: 1.5 });
  expect(done.status).toBe(200);
  steps.push(done.body);

  for (const body of steps) expect(problems(runViewSchema, body)).toEqual([]);
  expect(steps.map((b) => b.status)).toEqual(['printing', 'cooling', 'cooling', 'cooling', 'breakout', 'finishing', 'done']);

  const calibration = await op.get(`/api/labs/${lab.labId}/machines/${lab.machineId}/calibration`);
  expect(problems(calibrationViewSchema, calibration.body)).toEqual([]);
  expect(calibration.body.recordedRuns).toHaveLength(1);
  const choice = await lab.agent
    .put(`/api/labs/${lab.labId}/machines/${lab.machineId}/calibration/runs/${runId}`)
    .send({ choice: 'include', reason: 'A short test build, timed by hand' });
  expect(choice.status).toBe(200);
  expect(problems(calibrationViewSchema, choice.body)).toEqual([]);
  expect(problems(queueViewSchema, (await op.get(queueUrl)).body)).toEqual([]);
});
