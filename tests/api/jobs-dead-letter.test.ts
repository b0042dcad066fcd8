/**
 * A file whose worker keeps failing on it (here a worker whose measuring
 * throws every time, as a process lost in the middle of a file does) is tried
 * again up to the queue's retry limit; then the queue gives up on it: the job
 * ends `failed` with the reason, and nothing of the upload is left half
 * written (no part, no stored bytes).
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import type PgBoss from 'pg-boss';
import { meshQueueSettings, type Running } from '../../server/boot';
import { startBoss } from '../../server/jobs/boss';
import { startMeshWorker, type MeshWorker } from '../../server/jobs/worker';
import { prism, writeBinaryStl } from '../../shared/geometry';
import { signUp, startTestApp } from '../helpers/app';

jest.setTimeout(240_000);

let web: Running;
let boss: PgBoss;
let worker: MeshWorker;
let db: pg.Pool;
let attempts = 0;

beforeAll(async () => {
  db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
  web = await startTestApp({ meshWorker: false, uploadWaitMs: 0 });
  const settings = meshQueueSettings(web.config);
  boss = await startBoss(process.env.DATABASE_URL!, settings);
  worker = await startMeshWorker({
    boss,
    jobs: web.services.meshJobs,
    threads: 1,
    settings,
    tools: {
      measure: async () => {
        attempts++;
        throw new Error('the measuring process was lost');
      },
      slice: async () => {
        throw new Error('not used here');
      },
    },
  });
});

afterAll(async () => {
  await worker?.stop();
  await boss?.stop({ graceful: false, wait: true }).catch(() => {});
  await web?.close();
  await db?.end();
});

test('a file that fails on every attempt ends its job failed with the reason, after the retries, with nothing kept', async () => {
  const lab = await signUp(web, 'deadletter');
  // Bytes of their own (a name inside the STL header), so no other upload shares the stored file.
  const bytes = Buffer.from(writeBinaryStl(prism([[0, 0], [9, 0], [9, 9], [0, 9]], 0, 4), `lost ${randomBytes(6).toString('hex')}`));
  const res = await lab.agent.post(`/api/labs/${lab.labId}/parts`).attach('file', bytes, 'cursed.stl');
  expect(res.status).toBe(202);

  let view: { job: { state: string }; error?: { message: string }; parts?: unknown[]; rejected?: { file: string; code: string; message: string }[] } | null = null;
  for (let i = 0; i < 1200; i++) {
    const v = await lab.agent.get(`/api/labs/${lab.labId}/jobs/${res.body.job.id}`);
    if (v.body.job.state === 'failed' || v.body.job.state === 'done') {
      view = v.body;
      break;
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  expect(view?.job.state).toBe('failed');

  // Tried once and again up to the retry limit, then given up on.
  const retryLimit = meshQueueSettings(web.config).retryLimit;
  expect(attempts).toBe(1 + retryLimit);
  expect(view!.rejected).toEqual([
    { file: 'cursed.stl', code: 'measure-failed', message: expect.stringContaining(`the worker measuring it stopped ${1 + retryLimit} times`) },
  ]);
  expect(view!.error!.message).toContain('"cursed.stl" could not be measured');
  expect(view!.parts).toEqual([]);

  // Nothing half written: no part in the library, the job's hold on the bytes released (the stored file gone).
  expect((await lab.agent.get(`/api/labs/${lab.labId}/parts`)).body.total).toBe(0);
  const row = (await db.query<{ state: string; attempts: number; file_key: string }>('SELECT state, attempts, file_key FROM mesh_job_files WHERE job_id = $1', [res.body.job.id])).rows;
  expect(row).toEqual([{ state: 'rejected', attempts: 1 + retryLimit, file_key: expect.any(String) }]);
  expect((await db.query('SELECT 1 FROM files WHERE key = $1', [row[0].file_key])).rowCount).toBe(0);
});
