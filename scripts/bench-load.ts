/**
 * Load check: the server (one process, its in-process mesh worker) on
 * loopback, a fresh database with the demo lab; 50 signed-in clients read the
 * main routes as fast as they are answered for 60 s, while one lab uploads a
 * batch of large meshes and three other labs each upload a small file every
 * few seconds. Prints the request and error counts, latency percentiles per
 * route and the small uploads' times (target: 0 errors, small uploads within
 * 2 s while the large batch is measured).
 *
 *   npm run bench:load                      (60 s)
 *   npm run bench:load -- --seconds 15      (a short run)
 *   options: --clients 50 --large 6 --large-triangles 400000 --profile DIR
 *
 * Measuring runs in one `npm run worker` process with one bulk thread (large
 * files, at nice 10: MESH_BULK_NICE) and the quick thread (files up to
 * MESH_QUICK_MB, at full priority), and a per-lab limit of one file at a
 * time, so the other labs' small files always find the quick thread free
 * (MESH_THREADS, MESH_QUICK_MB, MESH_BULK_NICE and MESH_LAB_CONCURRENCY in
 * the environment override them); `--in-process` measures in the server's
 * own worker instead.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { ensureCluster, ensureDatabase, dropDatabase } from './lib/postgres';
import { torus, writeBinaryStl, prism } from '../shared/geometry';

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const v = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isFinite(v) || v <= 0) throw new Error(`--${name} takes a positive number`);
  return v;
}

const SECONDS = arg('seconds', 60);
const CLIENTS = arg('clients', 50);
const LARGE_FILES = arg('large', 6);
const LARGE_TRIANGLES = arg('large-triangles', 400_000);
const IN_PROCESS = process.argv.includes('--in-process');
/** `--profile DIR`: the server and the worker write V8 CPU profiles there (open them in Chrome's DevTools). */
const PROFILE_DIR = process.argv.includes('--profile') ? path.resolve(process.argv[process.argv.indexOf('--profile') + 1] ?? '') : null;
const profiling = PROFILE_DIR ? ['--cpu-prof', '--cpu-prof-dir', PROFILE_DIR] : [];
const SMALL_LABS = 3;
const SMALL_EVERY_MS = 4000;
const ROOT = path.resolve(__dirname, '..');
const PASSWORD = 'sinter-demo-2026';
const DEMO_EMAILS = ['owner', 'lead', 'planner', 'designer', 'operator'].map((r) => `${r}@tinkerfin.example`);

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

/** A cookie jar of one: the session cookie the server set. */
class Client {
  cookie = '';
  constructor(readonly base: string) {}
  async fetch(p: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    headers.set('Origin', this.base);
    if (this.cookie) headers.set('Cookie', this.cookie);
    const res = await fetch(`${this.base}/api${p}`, { ...init, headers });
    const set = res.headers.getSetCookie?.() ?? [];
    if (set.length) this.cookie = set.map((c) => c.split(';')[0]).join('; ');
    return res;
  }
  async json<T>(p: string, init: RequestInit = {}): Promise<T> {
    const res = await this.fetch(p, init);
    const body = await res.text();
    if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${p}: ${res.status} ${body.slice(0, 200)}`);
    return JSON.parse(body) as T;
  }
  post<T>(p: string, body: unknown) {
    return this.json<T>(p, { method: 'POST', body: JSON.stringify(body), headers: { 'Content-Type': 'application/json' } });
  }
}

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];
}

const stlForm = (name: string, bytes: Uint8Array) => {
  const form = new FormData();
  form.append('unit', 'mm');
  form.append('file', new Blob([bytes as Uint8Array<ArrayBuffer>]), name);
  return form;
};

async function main() {
  const log = (s: string) => console.log(s);
  const cluster = await ensureCluster(() => {});
  const dbName = `sinterstack_bench_${process.pid}`;
  const databaseUrl = await ensureDatabase(cluster, dbName, { fresh: true });
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  let server: ChildProcess | null = null;
  let worker: ChildProcess | null = null;
  try {
    // The schema and the demo lab, as `npm start` makes them.
    process.env.DATABASE_URL = databaseUrl;
    const { connectDatabase, migrate } = await import('../server/db');
    const db = connectDatabase(databaseUrl);
    await migrate(db.sequelize);
    await db.close();
    const { loadConfig } = await import('../server/config');
    const { boot } = await import('../server/boot');
    const { seedDemoIfEmpty } = await import('../server/db/seeders/demo');
    // With a worker of its own: the demo plan's layout is sliced on the queue, as under `npm start`.
    const seeding = await boot({ ...loadConfig({ ...process.env, DATABASE_URL: databaseUrl }), meshWorker: true }, () => {});
    await seedDemoIfEmpty(seeding.db, seeding.services, { planInReview: true });
    await seeding.close();

    const env = {
      MESH_THREADS: '1',
      MESH_LAB_CONCURRENCY: '1',
      ...process.env,
      DATABASE_URL: databaseUrl,
      PORT: String(port),
      APP_URL: base,
      NODE_ENV: 'production' as const,
      AUTH_RATE_LIMIT: '100000',
      MESH_WORKER: IN_PROCESS ? 'on' : 'off',
    };
    const started = (proc: ChildProcess, text: string, what: string) => {
      const output: string[] = [];
      proc.stdout!.on('data', (d: Buffer) => output.push(d.toString()));
      proc.stderr!.on('data', (d: Buffer) => output.push(d.toString()));
      return (async () => {
        for (let i = 0; !output.join('').includes(text); i++) {
          if (i > 600 || proc.exitCode !== null) throw new Error(`the ${what} did not start:\n${output.join('')}`);
          await new Promise((r) => setTimeout(r, 200));
        }
      })();
    };
    server = spawn(process.execPath, [...profiling, '--import', 'tsx', 'server/index.ts'], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
    await started(server, 'serving on', 'server');
    if (!IN_PROCESS) {
      worker = spawn(process.execPath, [...profiling, '--import', 'tsx', 'scripts/worker.ts'], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
      await started(worker, 'serving queue', 'worker');
    }

    // 50 sessions of the demo lab's members, and the ids the read routes need.
    const clients: Client[] = [];
    for (let i = 0; i < CLIENTS; i++) {
      const c = new Client(base);
      await c.post('/auth/sign-in', { email: DEMO_EMAILS[i % DEMO_EMAILS.length], password: PASSWORD });
      clients.push(c);
    }
    const me = await clients[0].json<{ labs: { id: string }[] }>('/me');
    const labId = me.labs[0].id;
    const machines = await clients[0].json<{ id: string }[] | { items: { id: string }[] }>(`/labs/${labId}/machines`);
    const machineId = (Array.isArray(machines) ? machines : machines.items)[0].id;
    const routes: { name: string; path: string }[] = [
      { name: 'GET /me', path: '/me' },
      { name: 'GET /labs/:id/parts', path: `/labs/${labId}/parts` },
      { name: 'GET /labs/:id/requests', path: `/labs/${labId}/requests` },
      { name: 'GET /labs/:id/plans', path: `/labs/${labId}/plans` },
      { name: 'GET /labs/:id/machines', path: `/labs/${labId}/machines` },
      { name: 'GET /labs/:id/materials', path: `/labs/${labId}/materials` },
      { name: 'GET /labs/:id/machines/:id/queue', path: `/labs/${labId}/machines/${machineId}/queue` },
    ];

    // The lab with the large batch, and the labs with small files, each its own designer.
    const signUp = async (tag: string) => {
      const c = new Client(base);
      const out = await c.post<{ labs: { id: string }[] }>('/auth/sign-up', {
        email: `${tag}-${process.pid}@bench.example`,
        password: 'correct-horse-battery-staple',
        name: `Bench ${tag}`,
        labName: `Bench lab ${tag}`,
      });
      return { client: c, labId: out.labs[0].id };
    };
    const busy = await signUp('busy');
    const small = await Promise.all(Array.from({ length: SMALL_LABS }, (_, i) => signUp(`small${i}`)));
    const minor = Math.round(LARGE_TRIANGLES / 2 / 400);
    const large = Array.from({ length: LARGE_FILES }, (_, i) => writeBinaryStl(torus(60 + i, 20, 400, minor), `large ${i}`));
    log(`server on ${base}; measuring ${IN_PROCESS ? 'in the server' : 'in one worker process'} with MESH_THREADS ${env.MESH_THREADS} (bulk, nice ${process.env.MESH_BULK_NICE ?? 10}) and a quick thread for files up to ${process.env.MESH_QUICK_MB ?? 1} MB, MESH_LAB_CONCURRENCY ${env.MESH_LAB_CONCURRENCY}`);
    log(`${CLIENTS} clients on ${routes.length} read routes for ${SECONDS} s; ` +
      `one lab uploads ${LARGE_FILES} files of ${(2 * 400 * minor).toLocaleString('en')} triangles (${(large[0].byteLength / 1e6).toFixed(1)} MB each); ` +
      `${SMALL_LABS} other labs upload a 12-triangle STL every ${SMALL_EVERY_MS / 1000} s`);

    const latencies = new Map<string, number[]>(routes.map((r) => [r.name, []]));
    const errors = new Map<string, number>();
    const errorSamples: string[] = [];
    let requests = 0;
    const startedAt = performance.now();
    const stopAt = startedAt + SECONDS * 1000;
    const fail = (what: string, why: string) => {
      errors.set(what, (errors.get(what) ?? 0) + 1);
      if (errorSamples.length < 5) errorSamples.push(`${what}: ${why}`);
    };

    const readers = clients.map(async (c, i) => {
      let k = i;
      while (performance.now() < stopAt) {
        const route = routes[k++ % routes.length];
        const t0 = performance.now();
        try {
          const res = await c.fetch(route.path);
          await res.arrayBuffer();
          requests++;
          if (res.status !== 200) fail(route.name, `HTTP ${res.status}`);
          else latencies.get(route.name)!.push(performance.now() - t0);
        } catch (e) {
          requests++;
          fail(route.name, (e as Error).message);
        }
      }
    });

    // The batch: all large files in one upload, followed to its end.
    const batch = (async () => {
      const form = new FormData();
      form.append('unit', 'mm');
      large.forEach((bytes, i) => form.append('file', new Blob([bytes as Uint8Array<ArrayBuffer>]), `large-${i}.stl`));
      const t0 = performance.now();
      const res = await busy.client.fetch(`/labs/${busy.labId}/parts`, { method: 'POST', body: form });
      const body = (await res.json()) as { job?: { id: string }; parts?: unknown[] };
      if (res.status === 201) return { answered: res.status, parts: body.parts?.length ?? 0, seconds: (performance.now() - t0) / 1000 };
      if (res.status !== 202 || !body.job) throw new Error(`the large batch answered ${res.status}: ${JSON.stringify(body).slice(0, 200)}`);
      for (;;) {
        await new Promise((r) => setTimeout(r, 1000));
        const v = await busy.client.json<{ job: { state: string; files: { finished: number; total: number } }; parts?: unknown[] }>(`/labs/${busy.labId}/jobs/${body.job.id}`);
        const seconds = (performance.now() - t0) / 1000;
        if (v.job.state === 'done' || v.job.state === 'failed') return { answered: 202, state: v.job.state, parts: v.parts?.length ?? 0, seconds };
        // Not followed for long after the run: the figures are about the run.
        if (performance.now() > stopAt + 30_000) return { answered: 202, state: `${v.job.state}, ${v.job.files.finished} of ${v.job.files.total} files finished`, parts: 0, seconds };
      }
    })();

    // Small uploads of the other labs, each timed from sending to the measured part.
    const smallTimes: number[] = [];
    const slowSmall: string[] = [];
    /** Each measured small upload's wall-clock send and answer times and its part, to split its time into phases. */
    const smallTraces: { sentAt: number; answeredAt: number; partId: string; label: string }[] = [];
    const smallFailures: string[] = [];
    await new Promise((r) => setTimeout(r, 1500));
    const uploaders = small.map(async ({ client, labId: lab }, i) => {
      let n = 0;
      await new Promise((r) => setTimeout(r, (i * SMALL_EVERY_MS) / SMALL_LABS));
      while (performance.now() < stopAt - 1000) {
        const side = 10 + i + n++ / 100;
        const bytes = writeBinaryStl(prism([[0, 0], [side, 0], [side, side], [0, side]], 0, 5), `small ${i}`);
        const t0 = performance.now();
        try {
          const sentAt = Date.now();
          const res = await client.fetch(`/labs/${lab}/parts`, { method: 'POST', body: stlForm(`small-${i}-${n}.stl`, bytes) });
          const body = (await res.json()) as { parts?: { id: string }[] };
          const took = (performance.now() - t0) / 1000;
          if (res.status === 201) {
            smallTimes.push(took);
            const label = `${took.toFixed(2)} s (sent ${((t0 - startedAt) / 1000).toFixed(0)} s in)`;
            if (took > 2) slowSmall.push(label);
            if (body.parts?.[0]) smallTraces.push({ sentAt, answeredAt: Date.now(), partId: body.parts[0].id, label });
          } else smallFailures.push(`HTTP ${res.status}`);
        } catch (e) {
          smallFailures.push((e as Error).message);
        }
        await new Promise((r) => setTimeout(r, SMALL_EVERY_MS));
      }
    });

    await Promise.all([...readers, ...uploaders]);
    const batchResult = await batch;

    const totalErrors = [...errors.values()].reduce((a, b) => a + b, 0);
    log('');
    log(`requests: ${requests} in ${SECONDS} s (${(requests / SECONDS).toFixed(0)}/s), errors: ${totalErrors}`);
    log('route                                   count    p50 ms   p90 ms   p99 ms   max ms');
    for (const r of routes) {
      const l = latencies.get(r.name)!.sort((a, b) => a - b);
      const f = (v: number) => v.toFixed(0).padStart(8);
      log(`${r.name.padEnd(38)} ${String(l.length).padStart(6)} ${f(percentile(l, 50))} ${f(percentile(l, 90))} ${f(percentile(l, 99))} ${f(l[l.length - 1] ?? NaN)}`);
    }
    for (const s of errorSamples) log(`  error: ${s}`);
    const st = [...smallTimes].sort((a, b) => a - b);
    log(`small uploads of other labs: ${st.length} measured (201), ${smallFailures.length} failed; ` +
      `median ${percentile(st, 50).toFixed(2)} s, max ${(st[st.length - 1] ?? NaN).toFixed(2)} s, within 2 s: ${st.filter((t) => t <= 2).length}/${st.length}`);
    if (slowSmall.length > 0) log(`  over 2 s: ${slowSmall.join(', ')}`);
    await printPhases(databaseUrl, smallTraces, log);
    for (const f of smallFailures.slice(0, 5)) log(`  small upload failed: ${f}`);
    log(`large batch: answered ${batchResult.answered}${'state' in batchResult ? `, job ${batchResult.state}` : ''}, ${batchResult.parts} parts, ${batchResult.seconds.toFixed(1)} s after sending`);
  } finally {
    if (worker && worker.exitCode === null) {
      // A profiled worker must stop by itself to write its profile.
      worker.kill(PROFILE_DIR ? 'SIGTERM' : 'SIGKILL');
      if (PROFILE_DIR) setTimeout(() => worker?.kill('SIGKILL'), 15_000).unref();
      await new Promise((r) => worker!.once('exit', r));
    }
    if (server && server.exitCode === null) {
      server.kill('SIGTERM');
      await new Promise((r) => server!.once('exit', r));
    }
    await dropDatabase(cluster, dbName).catch(() => {});
  }
}

/**
 * Splits each small upload's time by the job's own timestamps (the database's clock, on this machine): sent to
 * job created (the server took the file in and stored it), created to started (handed out and fetched by a
 * worker), started to finished (read and measured: the finishing transaction's start), finished to answered (the part stored, the server told, the answer sent).
 */
async function printPhases(databaseUrl: string, traces: { sentAt: number; answeredAt: number; partId: string; label: string }[], log: (s: string) => void) {
  if (traces.length === 0) return;
  const pg = (await import('pg')).default;
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ part_id: string; created: string; started: string | null; finished: string | null }>(
      `SELECT p.id AS part_id, (extract(epoch FROM j.created_at) * 1000)::float8 AS created,
              (extract(epoch FROM f.started_at) * 1000)::float8 AS started, (extract(epoch FROM f.finished_at) * 1000)::float8 AS finished
         FROM unnest($1::uuid[]) AS p(id) JOIN mesh_job_files f ON p.id = ANY (f.part_ids) JOIN mesh_jobs j ON j.id = f.job_id`,
      [traces.map((t) => t.partId)],
    );
    const byPart = new Map(rows.map((r) => [r.part_id, r]));
    const phases = ['taken in', 'to a worker', 'read and measured', 'stored and answered'] as const;
    const split = traces.flatMap((t) => {
      const r = byPart.get(t.partId);
      if (!r || r.started === null || r.finished === null) return [];
      const at = [t.sentAt, Number(r.created), Number(r.started), Number(r.finished), t.answeredAt];
      return [{ t, ms: phases.map((_, k) => at[k + 1] - at[k]) }];
    });
    const med = (k: number) => percentile(split.map((s) => s.ms[k]).sort((a, b) => a - b), 50);
    log(`  small uploads' phases, median ms: ${phases.map((p, k) => `${p} ${med(k).toFixed(0)}`).join(', ')}`);
    for (const s of split.filter((x) => x.ms.reduce((a, b) => a + b, 0) > 2000)) {
      log(`    ${s.t.label}: ${phases.map((p, k) => `${p} ${s.ms[k].toFixed(0)}`).join(', ')}`);
    }
  } finally {
    await client.end();
  }
}

main().then(
  () => process.exit(0),
  (err: Error) => {
    console.error(`bench:load: ${err.message}`);
    process.exit(1);
  },
);
