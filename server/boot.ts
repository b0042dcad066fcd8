import pg from 'pg';
import type { Server } from 'node:http';
import type { Config } from './config';
import { connectDatabase } from './db';
import { createAuth } from './auth/sessions';
import { createMailer } from './mail/mailer';
import { createLabEvents } from './events/labEvents';
import { createApp, createServices, type AppDeps } from './app';
import { configureMeshPool, defaultMeshThreads, measureFile, meshPool, profileLayout } from './mesh';
import { startBoss } from './jobs/boss';
import { startMeshWorker, type MeshWorker } from './jobs/worker';
import type { MeshQueueSettings } from './jobs/meshJobs';

/** The job queue's settings from the configuration. */
export function meshQueueSettings(config: Config): MeshQueueSettings {
  return { queue: config.jobQueue, labConcurrency: config.meshLabConcurrency, expireSeconds: config.meshJobExpireSeconds, retryLimit: 2, retentionHours: config.jobRetentionHours };
}

export type Running = AppDeps & { app: ReturnType<typeof createApp>; close(): Promise<void> };

/**
 * Everything the app needs, wired once: database, sessions, mail, the job
 * queue, services; and, unless MESH_WORKER is off, a worker serving the mesh
 * queue from this process.
 */
export async function boot(config: Config, log: (msg: string) => void = console.log): Promise<Running> {
  const db = connectDatabase(config.databaseUrl);
  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: 5, connectionTimeoutMillis: 5_000 });
  // An idle client whose server went away must not take the process down;
  // the next query gets a new connection (or a 503 while it is still down).
  pool.on('error', () => {});
  const auth = createAuth(pool, { idleMs: config.sessionIdleMs });
  const mailer = await createMailer(config);
  const events = createLabEvents(pool, config.databaseUrl, log);
  const threads = config.meshThreads ?? defaultMeshThreads();
  configureMeshPool({ size: threads, timeoutMs: config.meshTimeoutMs, quickBytes: config.meshQuickBytes, bulkNice: config.meshBulkNice });
  const settings = meshQueueSettings(config);
  const boss = await startBoss(config.databaseUrl, settings, log);
  const services = createServices(db, mailer, config, { boss, pool, events, settings, log });
  let worker: MeshWorker | null = null;
  if (config.meshWorker) worker = await startMeshWorker({ boss, jobs: services.meshJobs, databaseUrl: config.databaseUrl, threads: meshPool().capacity, tools: { measure: measureFile, slice: profileLayout }, settings, log });
  const deps: AppDeps = { config, db, pool, auth, mailer, events, services, log };
  const app = createApp(deps);
  // Forecasts move with time as well as with changes: a shortage can come into its lead time overnight.
  const sweep = config.powderSweepMinutes > 0 ? setInterval(() => void services.powder.sweepShortages(), config.powderSweepMinutes * 60_000) : null;
  sweep?.unref();
  return {
    ...deps,
    app,
    async close() {
      if (sweep) clearInterval(sweep);
      await worker?.stop();
      // Files this process was measuring go back to the queue for another worker.
      await boss.stop({ graceful: true, timeout: 5_000, wait: true }).catch(() => {});
      await events.close();
      await mailer.close();
      await pool.end();
      await db.close();
    },
  };
}

/** Listens, turning "port in use" into one clear line. */
export function listen(app: Running['app'], port: number, host: string): Promise<Server> {
  return new Promise((resolve, reject) => {
    const server = app.listen(port, host);
    server.once('listening', () => resolve(server));
    server.once('error', (err: NodeJS.ErrnoException) => {
      if (err.code === 'EADDRINUSE') reject(new Error(`port ${port} is already in use on ${host} (set PORT to choose another)`));
      else if (err.code === 'EACCES') reject(new Error(`port ${port} needs privileges this user does not have (set PORT to choose another)`));
      else reject(err);
    });
  });
}

/** Fails with one readable line when the database cannot be reached. */
export async function checkDatabase(databaseUrl: string): Promise<void> {
  const client = new pg.Client({ connectionString: databaseUrl, connectionTimeoutMillis: 5_000 });
  const where = (() => {
    try {
      const u = new URL(databaseUrl);
      return `${u.hostname}:${u.port || 5432}${u.pathname}`;
    } catch {
      return 'the configured address';
    }
  })();
  try {
    await client.connect();
    await client.query('SELECT 1');
  } catch (err) {
    const e = err as NodeJS.ErrnoException;
    const why = e.code === 'ECONNREFUSED' ? 'connection refused (is PostgreSQL running?)' : e.message;
    throw new Error(`cannot reach the database at ${where}: ${why}`);
  } finally {
    await client.end().catch(() => {});
  }
}
