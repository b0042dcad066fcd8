/**
 * Several processes on one database and file store: this test's server (no
 * worker of its own), a second server process and two worker processes
 * (`scripts/worker.ts`). A large upload is taken by one worker, which is
 * killed (SIGKILL) while it measures; the queue gives the file to the other
 * worker once the lost one's time runs out, and the part is stored once. The
 * job is followed on the second server signed in there (sessions live in the database).
 *
 * No timing is asserted: every wait polls for a state, with generous limits
 * for a loaded machine.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import path from 'node:path';
import pg from 'pg';
import request from 'supertest';
import type { Running } from '../../server/boot';
import { torus, writeBinaryStl } from '../../shared/geometry';
import { ORIGIN, signUp, startTestApp } from '../helpers/app';

jest.setTimeout(420_000);

const ROOT = path.resolve(__dirname, '..', '..');
const QUEUE = `mesh-kill-test-${process.pid}`;
// The time a lost worker's file waits before it is retried; longer than the measuring limit, as the configuration requires.
const TIMEOUT_S = 40;
const EXPIRE_S = 45;

type Child = { proc: ChildProcess; output: string[] };
const children: Child[] = [];
let running: Running;
let db: pg.Pool;

function start(script: string, env: Record<string, string>): Child {
  const proc = spawn(process.execPath, ['--import', 'tsx', script], {
    cwd: ROOT,
    env: { ...process.env, NODE_ENV: 'test', JOB_QUEUE: QUEUE, MESH_TIMEOUT_S: String(TIMEOUT_S), MESH_JOB_EXPIRE_S: String(EXPIRE_S), ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const child = { proc, output: [] as string[] };
  proc.stdout!.on('data', (d: Buffer) => child.output.push(d.toString()));
  proc.stderr!.on('data', (d: Buffer) => child.output.push(d.toString()));
  children.push(child);
  return child;
}

async function until<T>(what: string, fn: () => Promise<T | null | undefined | false>, limitMs: number, everyMs = 100): Promise<T> {
  const deadline = Date.now() + limitMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`gave up waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

const said = (child: Child, text: string) => async () => child.output.join('').includes(text);

/**
 * A second server process on a free port. The port is free when chosen but the process listens seconds later;
 * when something took the port meanwhile (it says so and stops), it starts again on another.
 */
async function startSecondServer(): Promise<{ child: Child; port: number }> {
  for (let attempt = 1; ; attempt++) {
    const port = await freePort();
    const child = start('server/index.ts', { PORT: String(port), APP_URL: ORIGIN, MESH_WORKER: 'off' });
    const outcome = await until(
      'the second server',
      async () => (child.output.join('').includes('serving on') ? 'up' : child.output.join('').includes('is already in use') ? 'taken' : null),
      120_000,
      250,
    );
    if (outcome === 'up') return { child, port };
    if (attempt === 3) throw new Error(`three free ports were taken before the second server could listen on them:\n${child.output.join('')}`);
  }
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

beforeAll(async () => {
  db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
  running = await startTestApp({ meshWorker: false, jobQueue: QUEUE, uploadWaitMs: 0, meshTimeoutMs: TIMEOUT_S * 1000, meshJobExpireSeconds: EXPIRE_S });
});

afterAll(async () => {
  for (const c of children) if (c.proc.exitCode === null && c.proc.signalCode === null) c.proc.kill('SIGKILL');
  await running?.close();
  await db?.end();
});

test('a worker killed in the middle of a file loses nothing: the other worker measures it and the part is stored once', async () => {
  const workers = [start('scripts/worker.ts', { MESH_THREADS: '1' }), start('scripts/worker.ts', { MESH_THREADS: '1' })];
  const { port } = await startSecondServer();
  for (const w of workers) await until('a worker to start', said(w, 'serving queue'), 120_000, 250);

  // A 1,000,000-triangle torus (48 MB): seconds of measuring, so the kill lands in the middle of it.
  const R = 60;
  const r = 20;
  const stl = Buffer.from(writeBinaryStl(torus(R, r, 1000, 500), 'kill test torus'));
  const { agent, labId, email } = await signUp(running, 'killtest');
  const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', stl, 'torus-1m.stl');
  expect(res.status).toBe(202);
  // Idle workers are woken at once, so one may already have taken the file when the answer is written.
  expect(res.body).toEqual({ job: { id: expect.any(String), state: expect.stringMatching(/^(queued|running)$/) } });
  const jobId: string = res.body.job.id;

  // Whichever worker takes the file is killed as soon as it has begun.
  const taken = await until(
    'a worker to take the file',
    async () => (await db.query<{ worker: string }>("SELECT worker FROM mesh_job_files WHERE job_id = $1 AND state = 'running'", [jobId])).rows[0],
    180_000,
    50,
  );
  const victim = workers.find((w) => taken.worker.endsWith(`:${w.proc.pid}`));
  expect(victim).toBeDefined();
  victim!.proc.kill('SIGKILL');
  await until('the killed worker to exit', async () => victim!.proc.exitCode !== null || victim!.proc.signalCode !== null, 30_000);
  // It was killed before it finished: the file is still in hand, nothing stored.
  const after = (await db.query("SELECT state, part_ids FROM mesh_job_files WHERE job_id = $1", [jobId])).rows[0];
  expect(after.state).toBe('running');
  expect(after.part_ids).toEqual([]);

  // The same member follows the job on the second server (sessions live in the database).
  const server2Agent = request.agent(`http://127.0.0.1:${port}`);
  server2Agent.set('Origin', ORIGIN);
  const signIn = await server2Agent.post('/api/auth/sign-in').send({ email, password: 'correct-horse-battery' });
  expect(signIn.status).toBe(200);
  const seen = new Set<string>();
  const done = await until(
    'the job to finish on the other worker',
    async () => {
      const view = await server2Agent.get(`/api/labs/${labId}/jobs/${jobId}`);
      expect(view.status).toBe(200);
      seen.add(view.body.job.state);
      return ['done', 'failed'].includes(view.body.job.state) ? view.body : null;
    },
    360_000,
    1000,
  );
  expect(done.job.state).toBe('done');
  expect(done.rejected).toEqual([]);
  expect(done.parts).toHaveLength(1);
  // Volume of a torus, 2 pi^2 R r^2 (Pappus's centroid theorem); the tessellation is fine enough to agree within 0.1 %.
  expect(Math.abs(done.parts[0].volumeMm3 / (2 * Math.PI ** 2 * R * r * r) - 1)).toBeLessThan(0.001);

  // Once: one part in the library, one stored file with one reference, taken twice, finished by the survivor.
  const library = await server2Agent.get(`/api/labs/${labId}/parts`);
  expect(library.body.total).toBe(1);
  expect(library.body.items[0].id).toBe(done.parts[0].id);
  const file = (await db.query('SELECT attempts, worker FROM mesh_job_files WHERE job_id = $1', [jobId])).rows[0];
  expect(file.attempts).toBe(2);
  const survivor = workers.find((w) => w !== victim)!;
  expect(file.worker.endsWith(`:${survivor.proc.pid}`)).toBe(true);
  const refs = (await db.query('SELECT ref_count FROM files WHERE key = $1', [library.body.items[0].file.sha256])).rows[0];
  expect(refs.ref_count).toBe(1);

  // Another lab's member cannot see the job.
  const other = await signUp(running, 'killtest-other');
  expect((await other.agent.get(`/api/labs/${labId}/jobs/${jobId}`)).status).toBe(404);
  expect((await other.agent.get(`/api/labs/${other.labId}/jobs/${jobId}`)).status).toBe(404);
});
