import pg from 'pg';
import type { Config } from '../config';
import { connectDatabase } from '../db';
import { meshJobsRepository } from '../db/repositories/meshJobs';
import { createStorage } from '../storage';
import { partsService } from '../services/parts';
import { createLabEvents } from '../events/labEvents';
import { configureMeshPool, meshPool, closeMeshPool, defaultMeshThreads, measureFile, profileLayout } from '../mesh';
import { startBoss } from './boss';
import { meshJobsService, type MeshQueueSettings } from './meshJobs';
import { startMeshWorker } from './worker';

/**
 * A worker process without a web server: the database, the file store, the
 * part library's storing half and the queue, nothing else. It needs the
 * same DATABASE_URL and file store settings as the servers.
 */
export async function runWorkerProcess(config: Config, settings: MeshQueueSettings, log: (msg: string) => void) {
  const db = connectDatabase(config.databaseUrl);
  if (!(await meshJobsRepository(db).tablesExist())) {
    await db.close();
    throw new Error('the database has no job tables yet: start a server once (npm start), which applies the migrations');
  }
  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: 3, connectionTimeoutMillis: 5_000 });
  pool.on('error', () => {});
  const events = createLabEvents(pool, config.databaseUrl, log);
  const threads = config.meshThreads ?? defaultMeshThreads();
  configureMeshPool({ size: threads, timeoutMs: config.meshTimeoutMs, quickBytes: config.meshQuickBytes, bulkNice: config.meshBulkNice });
  const storage = createStorage(db, config.storage);
  const parts = partsService(db, { storage, max3mfExpandedBytes: config.max3mfExpandedBytes, maxMeshTriangles: config.maxMeshTriangles });
  const boss = await startBoss(config.databaseUrl, settings, log);
  const jobs = meshJobsService({ db, pool, boss, storage, parts, settings, publish: (e) => events.publish(e), log });
  // The threads start now (loading the geometry code takes seconds on a busy machine), not with the first file.
  const capacity = meshPool().capacity;
  const worker = await startMeshWorker({ boss, jobs, databaseUrl: config.databaseUrl, threads: capacity, tools: { measure: measureFile, slice: profileLayout }, settings, log });
  return {
    name: worker.name,
    threads: capacity,
    async stop() {
      await worker.stop();
      // Waits for the files being measured (up to their time limit); what is left goes back to the queue.
      await boss.stop({ graceful: true, timeout: config.meshTimeoutMs, wait: true }).catch(() => {});
      await closeMeshPool();
      await events.close();
      await pool.end();
      await db.close();
    },
  };
}
