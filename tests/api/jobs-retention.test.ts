/**
 * Finished jobs do not pile up: those finished longer ago than the retention
 * (JOB_RETENTION_HOURS) are deleted, with their file rows and the queue's own
 * records of them; a job still waiting is kept however old, and so is one
 * finished recently. (Ages are set in the database: the pruning compares
 * finish times with now.)
 */
import { randomBytes } from 'node:crypto';
import { writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import type { Running } from '../../server/boot';
import { prism, writeBinaryStl } from '../../shared/geometry';
import { signUp, startTestApp } from '../helpers/app';

jest.setTimeout(240_000);

const RETENTION_HOURS = 24;
let measuring: Running;
let idle: Running;
let db: pg.Pool;

const stl = (tag: string) =>
  Buffer.from(writeBinaryStl(prism([[0, 0], [8, 0], [8, 8], [0, 8]], 0, 3), `${tag} ${randomBytes(6).toString('hex')}`));

beforeAll(async () => {
  db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
  // One app measures its uploads; the other's queue (a queue of its own: the first app's worker would serve a
  // shared one, and once did before the test looked) has no worker, so its upload stays waiting.
  measuring = await startTestApp({ jobRetentionHours: RETENTION_HOURS });
  idle = await startTestApp({ meshWorker: false, uploadWaitMs: 0, jobRetentionHours: RETENTION_HOURS, jobQueue: `retention-idle-${process.pid}` });
});

afterAll(async () => {
  await idle?.close();
  await measuring?.close();
  await db?.end();
});

const fileIds = async (jobId: string) => (await db.query<{ id: string }>('SELECT id FROM mesh_job_files WHERE job_id = $1', [jobId])).rows.map((r) => r.id);
const queueRecords = async (ids: string[]) =>
  (await db.query('SELECT id FROM pgboss.job WHERE id = ANY($1::uuid[]) UNION ALL SELECT id FROM pgboss.archive WHERE id = ANY($1::uuid[])', [ids])).rowCount;

test('finished jobs older than the retention are deleted with their records; waiting and recent ones are kept', async () => {
  const lab = await signUp(measuring, 'retention');
  const upload = (tag: string) => lab.agent.post(`/api/labs/${lab.labId}/parts`).attach('file', stl(tag), `${tag}.stl`);

  // Two measured uploads, and one left waiting on the queue that has no worker.
  expect((await upload('old')).status).toBe(201);
  expect((await upload('recent')).status).toBe(201);
  const tmp = join(tmpdir(), `retention-${randomBytes(6).toString('hex')}.stl`);
  const bytes = stl('stuck');
  await writeFile(tmp, bytes);
  await idle.services.meshJobs.submit(lab.labId, lab.userId, [{ originalname: 'stuck.stl', path: tmp, size: bytes.length }], { unit: 'mm', split: false });
  const jobs = (await db.query<{ id: string; file_name: string; state: string }>(
    'SELECT j.id, f.file_name, j.state FROM mesh_jobs j JOIN mesh_job_files f ON f.job_id = j.id WHERE j.lab_id = $1',
    [lab.labId],
  )).rows;
  const jobOf = (name: string) => jobs.find((j) => j.file_name === name)!;
  const [old, recent, pending] = [jobOf('old.stl'), jobOf('recent.stl'), jobOf('stuck.stl')];
  expect([old.state, recent.state, pending.state]).toEqual(['done', 'done', 'queued']);
  const oldFiles = await fileIds(old.id);
  const pendingFiles = await fileIds(pending.id);
  // The queue records the measured file once it is completed (just after the upload is answered).
  for (let i = 0; i < 300 && (await queueRecords(oldFiles)) === 0; i++) await new Promise((r) => setTimeout(r, 100));
  expect(await queueRecords(oldFiles)).toBe(1);
  expect(await queueRecords(pendingFiles)).toBe(1);

  // The first finished a day and an hour ago; the waiting one was uploaded two days ago.
  await db.query(`UPDATE mesh_jobs SET created_at = now() - interval '25 hours', finished_at = now() - interval '25 hours' WHERE id = $1`, [old.id]);
  await db.query(`UPDATE pgboss.job SET created_on = now() - interval '25 hours', completed_on = now() - interval '25 hours' WHERE id = ANY($1::uuid[])`, [oldFiles]);
  await db.query(`UPDATE pgboss.archive SET archived_on = now() - interval '25 hours' WHERE id = ANY($1::uuid[])`, [oldFiles]);
  await db.query(`UPDATE mesh_jobs SET created_at = now() - interval '48 hours' WHERE id = $1`, [pending.id]);
  await db.query(`UPDATE pgboss.job SET created_on = now() - interval '48 hours' WHERE id = ANY($1::uuid[])`, [pendingFiles]);

  await measuring.services.meshJobs.prune();
  await idle.services.meshJobs.prune();

  // The old finished job is gone: its rows, its record in the queue, and the job route.
  expect((await lab.agent.get(`/api/labs/${lab.labId}/jobs/${old.id}`)).status).toBe(404);
  expect((await db.query('SELECT 1 FROM mesh_job_files WHERE job_id = $1', [old.id])).rowCount).toBe(0);
  expect(await queueRecords(oldFiles)).toBe(0);
  // Its part stays in the library: only the job's record of the upload goes.
  const parts = (await lab.agent.get(`/api/labs/${lab.labId}/parts`)).body.items.map((p: { name: string }) => p.name).sort();
  expect(parts).toEqual(['old', 'recent']);

  // The recent one and the waiting one are kept.
  expect((await lab.agent.get(`/api/labs/${lab.labId}/jobs/${recent.id}`)).body.job.state).toBe('done');
  expect((await lab.agent.get(`/api/labs/${lab.labId}/jobs/${pending.id}`)).body.job.state).toBe('queued');
  expect(await queueRecords(pendingFiles)).toBe(1);
});
