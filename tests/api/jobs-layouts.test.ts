/**
 * Keeping a layout slices its parts on the mesh job queue, in the lab's turn
 * like an upload's files: a worker serving the queue (here one that joins
 * later, in an app of its own) slices the parts and the layout is estimated
 * by their sections. With no worker answering in time, the layout is still
 * kept, estimated by its boxes and saying so, and the slicing is called off.
 */
import pg from 'pg';
import type { Running } from '../../server/boot';
import { startTestApp } from '../helpers/app';
import { createPlan, gridLayout, labWithProfiles, makeRequest, planInstance } from '../helpers/plans';

jest.setTimeout(240_000);

const QUEUE = `mesh-layout-test-${process.pid}`;
const apps: Running[] = [];
let db: pg.Pool;

beforeAll(() => {
  db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
});

afterAll(async () => {
  for (const app of apps.reverse()) await app.close();
  await db?.end();
});

async function start(overrides: Parameters<typeof startTestApp>[0]) {
  const app = await startTestApp({ jobQueue: QUEUE, ...overrides });
  apps.push(app);
  return app;
}

/** A lab with a plan of 4 blocks and a grid layout of them, ready to be kept. */
async function planToKeep(web: Running, tag: string) {
  const lab = await labWithProfiles(web, tag);
  const { lines } = await makeRequest(web, lab.labId, lab.userId, lab.materialId, [{ name: 'Block', sizeMm: [40, 30, 20], quantity: 4 }]);
  const plan = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, lines);
  const instance = planInstance(plan.view, lab.machine, lab.material);
  return { lab, plan, instance, result: gridLayout(instance) };
}

const layoutJobs = async (labId: string) =>
  (
    await db.query<{ job_id: string; kind: string; job_state: string; file_id: string; file_state: string; worker: string | null; rejected: { code: string; message: string } | null; sliced: boolean }>(
      `SELECT j.id AS job_id, j.kind, j.state AS job_state, f.id AS file_id, f.state AS file_state, f.worker, f.rejected, f.result IS NOT NULL AS sliced
         FROM mesh_jobs j JOIN mesh_job_files f ON f.job_id = j.id WHERE j.lab_id = $1 ORDER BY j.created_at`,
      [labId],
    )
  ).rows;

test('with no worker answering in time, the layout is kept by its boxes and says so, and its slicing job is called off', async () => {
  const web = await start({ meshWorker: false, layoutSliceWaitMs: 1500 });
  const { lab, plan, instance, result } = await planToKeep(web, 'noworker');
  const res = await lab.agent.post(`/api/labs/${lab.labId}/plans/${plan.id}/layouts`).send({ instance, result });
  expect(res.status).toBe(201);
  expect(res.body.estimate.profileSource).toBe('box');
  expect(res.body.estimate.profileBoxPlacements).toBeNull();

  const [job] = await layoutJobs(lab.labId);
  expect(job).toMatchObject({ kind: 'layout', job_state: 'failed', file_state: 'rejected', worker: null, sliced: false });
  expect(job.rejected!.code).toBe('not_needed');
  expect(job.rejected!.message).toContain('estimated by its boxes');
  // The lab follows it like an upload's job, with the reason.
  const view = await lab.agent.get(`/api/labs/${lab.labId}/jobs/${job.job_id}`);
  expect(view.status).toBe(200);
  expect(view.body.job.state).toBe('failed');
  expect(view.body.error.message).toContain('no worker finished slicing it');
});

test("a kept layout's parts are sliced by a worker serving the queue, and the estimate uses their sections", async () => {
  // A web server without a worker of its own, and a worker (an app that only serves the queue here).
  const web = await start({ meshWorker: false });
  await start({ meshWorker: true, meshThreads: 1 });
  const { lab, plan, instance, result } = await planToKeep(web, 'withworker');
  const res = await lab.agent.post(`/api/labs/${lab.labId}/plans/${plan.id}/layouts`).send({ instance, result });
  expect(res.status).toBe(201);
  expect(res.body.estimate.profileSource).toBe('mesh');
  expect(res.body.estimate.profileBoxPlacements).toBe(0);
  // Cavalieri: the sections times the layer height hold the four blocks' volume, 4 x 40 x 30 x 20 mm³ (within a layer's worth).
  const area: number[] = res.body.estimate.areaPerLayerMm2;
  const sliced = area.reduce((s, a) => s + a, 0) * instance.layerHeight!;
  expect(Math.abs(sliced - 4 * 40 * 30 * 20) / (4 * 40 * 30 * 20)).toBeLessThan(0.01);

  const [job] = await layoutJobs(lab.labId);
  expect(job).toMatchObject({ kind: 'layout', job_state: 'done', file_state: 'done', sliced: true });
  expect(job.worker).toEqual(expect.any(String));
  // It went through the queue: the queue's own record of it (marked completed once the worker's turn returns).
  const record = async () =>
    (await db.query<{ name: string; state: string }>('SELECT name, state FROM pgboss.job WHERE id = $1 UNION ALL SELECT name, state FROM pgboss.archive WHERE id = $1', [job.file_id])).rows;
  for (let i = 0; i < 600 && (await record())[0]?.state !== 'completed'; i++) await new Promise((r) => setTimeout(r, 100));
  expect(await record()).toEqual([{ name: QUEUE, state: 'completed' }]);
});
