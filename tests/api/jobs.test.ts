/**
 * Uploads on the job queue, within one test process: the 202 answer and the
 * job route, the per-lab limit on files handed to the queue, fair turns
 * between labs, and lab scoping. The first app has no worker, so files stay
 * queued until a second app with a worker joins the same queue.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import type { Running } from '../../server/boot';
import { prism, writeBinaryStl } from '../../shared/geometry';
import { signUp, startTestApp } from '../helpers/app';

jest.setTimeout(240_000);

const QUEUE = `mesh-fair-test-${process.pid}`;
let web: Running;
let worker: Running | null = null;
let db: pg.Pool;

const box = (x: number, y: number, z: number, name: string) =>
  Buffer.from(writeBinaryStl(prism([[0, 0], [x, 0], [x, y], [0, y]], 0, z), name));

async function until<T>(what: string, fn: () => Promise<T | null | undefined | false>, limitMs = 180_000): Promise<T> {
  const deadline = Date.now() + limitMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`gave up waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
  web = await startTestApp({ meshWorker: false, jobQueue: QUEUE, uploadWaitMs: 0, meshLabConcurrency: 2 });
});

afterAll(async () => {
  await worker?.close();
  await web?.close();
  await db?.end();
});

test("a lab's batch waits its turns: at most two of its files are handed out, another lab's file goes next, and every job ends with its parts", async () => {
  const busy = await signUp(web, 'busy');
  const quiet = await signUp(web, 'quiet');

  let upload = busy.agent.post(`/api/labs/${busy.labId}/parts`);
  for (let i = 0; i < 4; i++) upload = upload.attach('file', box(20 + i, 10, 5, `busy ${i}`), `busy-${i}.stl`);
  const batch = await upload;
  expect(batch.status).toBe(202);
  expect(batch.body).toEqual({ job: { id: expect.any(String), state: 'queued' } });
  const small = await quiet.agent.post(`/api/labs/${quiet.labId}/parts`).attach('file', box(7, 7, 7, 'quiet'), 'quiet.stl');
  expect(small.status).toBe(202);

  // No worker yet: the job is queued, with its files counted, and the busy lab has only two files in the queue.
  const queued = await busy.agent.get(`/api/labs/${busy.labId}/jobs/${batch.body.job.id}`);
  expect(queued.status).toBe(200);
  expect(queued.body.job).toMatchObject({ id: batch.body.job.id, state: 'queued', files: { total: 4, finished: 0, running: 0 }, finishedAt: null });
  expect(queued.body.parts).toBeUndefined();
  const states = (await db.query<{ state: string; n: number }>(
    'SELECT state, count(*)::int AS n FROM mesh_job_files WHERE lab_id = $1 GROUP BY state ORDER BY state',
    [busy.labId],
  )).rows;
  expect(states).toEqual([{ state: 'queued', n: 2 }, { state: 'waiting', n: 2 }]);

  // Another lab cannot see the job, through its own lab or the busy one's.
  expect((await quiet.agent.get(`/api/labs/${quiet.labId}/jobs/${batch.body.job.id}`)).status).toBe(404);
  expect((await quiet.agent.get(`/api/labs/${busy.labId}/jobs/${batch.body.job.id}`)).status).toBe(404);
  expect((await busy.agent.get(`/api/labs/${busy.labId}/jobs/not-a-job`)).status).toBe(404);

  // A worker with one thread joins the queue and measures one file at a time.
  worker = await startTestApp({ jobQueue: QUEUE, meshWorker: true, meshThreads: 1, meshLabConcurrency: 2 });
  const done = await until('both jobs to finish', async () => {
    const a = await busy.agent.get(`/api/labs/${busy.labId}/jobs/${batch.body.job.id}`);
    const b = await quiet.agent.get(`/api/labs/${quiet.labId}/jobs/${small.body.job.id}`);
    return a.body.job.state === 'done' && b.body.job.state === 'done' ? { a: a.body, b: b.body } : null;
  });
  expect(done.a.parts.map((p: { name: string }) => p.name)).toEqual(['busy-0', 'busy-1', 'busy-2', 'busy-3']);
  expect(done.a.rejected).toEqual([]);
  expect(done.b.parts).toHaveLength(1);
  // The measured box: 7 x 7 x 7 mm, 343 mm³.
  expect(done.b.parts[0].volumeMm3).toBeCloseTo(343, 6);

  // The quiet lab's file was not kept behind the batch: it was taken first or second (after the busy lab's first
  // file, or before it when an older turn elsewhere in the database set the floor), and before the rest of the batch.
  const order = (await db.query<{ lab_id: string; file_name: string }>(
    'SELECT lab_id, file_name FROM mesh_job_files WHERE lab_id = ANY($1::uuid[]) ORDER BY started_at',
    [[busy.labId, quiet.labId]],
  )).rows.map((r) => r.file_name);
  expect(order.indexOf('quiet.stl')).toBeLessThanOrEqual(1);
  expect(order.filter((n) => n !== 'quiet.stl')).toEqual(['busy-0.stl', 'busy-1.stl', 'busy-2.stl', 'busy-3.stl']);
});

test('an upload whose files are all refused by the workers ends as failed, naming each file', async () => {
  const lab = await signUp(web, 'refused');
  const res = await lab.agent
    .post(`/api/labs/${lab.labId}/parts`)
    // Bytes of their own, so no other test's upload shares their stored file.
    .attach('file', randomBytes(100), 'noise.stl')
    .attach('file', Buffer.from(`solid ${randomBytes(8).toString('hex')}\nfacet normal 0 0 1\nendsolid x\n`), 'broken.stl');
  expect(res.status).toBe(202);
  const view = await until('the job to fail', async () => {
    const v = await lab.agent.get(`/api/labs/${lab.labId}/jobs/${res.body.job.id}`);
    return v.body.job.state === 'failed' ? v.body : null;
  });
  expect(view.error.code).toBe('invalid_file');
  expect(view.parts).toEqual([]);
  expect(view.rejected.map((r: { file: string }) => r.file).sort()).toEqual(['broken.stl', 'noise.stl']);
  // Nothing of them is kept: no part, no stored file.
  expect((await lab.agent.get(`/api/labs/${lab.labId}/parts`)).body.total).toBe(0);
  const kept = await db.query('SELECT 1 FROM mesh_job_files f JOIN files ON files.key = f.file_key WHERE f.lab_id = $1', [lab.labId]);
  expect(kept.rowCount).toBe(0);
});
