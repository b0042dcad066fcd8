import { hostname } from 'node:os';
import pg from 'pg';
import type PgBoss from 'pg-boss';
import { deadLetterQueue, MESH_WORK_CHANNEL, type MeshJobs, type WorkerTools, type MeshQueueSettings } from './meshJobs';

export type MeshWorker = { name: string; stop(): Promise<void> };

/**
 * How often an idle poller looks for files when no notice woke it (the
 * queue's shortest): a notice (LISTEN, or this process handing out) wakes it
 * at once, so this only bounds the wait when a notice is lost.
 */
const POLL_SECONDS = 0.5;

/** How often a worker looks for labs whose files wait with room in their limit (a lost hand-over). */
const SWEEP_MS = 10_000;

/**
 * Serves the mesh queue from this process: one poller a thread of the mesh
 * pool, so a process never takes more files than it can measure at once.
 * Several of these (in `npm start` and in `npm run worker` processes, on
 * this machine or others) share the queue through the database.
 */
export async function startMeshWorker(opts: {
  boss: PgBoss;
  jobs: MeshJobs;
  /** For hearing that files were handed out (LISTEN); without it the pollers find them within half a second. */
  databaseUrl?: string;
  /** Files this process measures at once (the size of its thread pool). */
  threads: number;
  /** Measuring a file and slicing a layout (the mesh pool's). */
  tools: WorkerTools;
  settings: MeshQueueSettings;
  log?: (msg: string) => void;
}): Promise<MeshWorker> {
  const { boss, jobs, tools, settings } = opts;
  const log = opts.log ?? (() => {});
  const name = `${hostname()}:${process.pid}`;
  const ids: string[] = [];
  for (let i = 0; i < opts.threads; i++) {
    ids.push(
      await boss.work<{ fileId: string }>(settings.queue, { batchSize: 1, pollingIntervalSeconds: POLL_SECONDS }, async ([job]) => {
        await jobs.processFile(job.data.fileId, name, tools);
      }),
    );
  }
  ids.push(
    await boss.work<{ fileId: string }>(deadLetterQueue(settings.queue), { batchSize: 1, pollingIntervalSeconds: 2 }, async ([job]) => {
      await jobs.giveUp(job.data.fileId);
    }),
  );
  jobs.addLocalWorkers(ids);
  const pollers = ids.slice(0, opts.threads);
  let listener: pg.Client | null = null;
  if (opts.databaseUrl) {
    const client = new pg.Client({ connectionString: opts.databaseUrl });
    client.on('notification', (msg) => {
      if (msg.channel === MESH_WORK_CHANNEL && msg.payload === settings.queue) for (const id of pollers) boss.notifyWorker(id);
    });
    // Losing it only costs the pollers' half second of delay.
    client.on('error', (err) => log(`mesh worker: lost the wake-up listener (${err.message}); polling only`));
    try {
      await client.connect();
      await client.query(`LISTEN ${MESH_WORK_CHANNEL}`);
      listener = client;
    } catch (err) {
      log(`mesh worker: no wake-up listener (${(err as Error).message}); polling only`);
      await client.end().catch(() => {});
    }
  }
  const sweep = setInterval(() => {
    jobs.dispatchAll().catch((err: Error) => log(`mesh worker: sweep failed: ${err.message}`));
  }, SWEEP_MS);
  sweep.unref();
  // Files left waiting by a process that stopped between an upload and its hand-over.
  await jobs.dispatchAll().catch((err: Error) => log(`mesh worker: first sweep failed: ${err.message}`));
  return {
    name,
    async stop() {
      clearInterval(sweep);
      await listener?.end().catch(() => {});
      await boss.offWork(settings.queue).catch(() => {});
      await boss.offWork(deadLetterQueue(settings.queue)).catch(() => {});
    },
  };
}
