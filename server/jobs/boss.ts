import PgBoss from 'pg-boss';
import { deadLetterQueue, type MeshQueueSettings } from './meshJobs';

/**
 * The queue's client: pg-boss keeps its tables in the `pgboss` schema of the
 * app's database and creates (or migrates) them on start, under a lock, so
 * any number of servers and workers may start at once. Its maintenance (which
 * hands the files of a lost worker back to the queue once they time out) runs
 * on whichever process gets there first, a few times per time-out; each
 * round also deletes the finished jobs older than the retention.
 */
export async function startBoss(databaseUrl: string, settings: MeshQueueSettings, log: (msg: string) => void = () => {}): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: databaseUrl,
    max: 4,
    schedule: false,
    maintenanceIntervalSeconds: Math.max(1, Math.min(60, Math.floor(settings.expireSeconds / 4))),
    // Its own finished records are moved aside after at most 12 h and deleted once the retention has passed.
    archiveCompletedAfterSeconds: Math.min(12 * 3600, settings.retentionHours * 3600),
    deleteAfterSeconds: settings.retentionHours * 3600,
  });
  boss.on('error', (err: Error) => log(`job queue: ${err.message}`));
  await boss.start();
  const failed = deadLetterQueue(settings.queue);
  // Creating a queue that exists does nothing (each file's own settings go with it when it is handed out).
  await boss.createQueue(failed, { name: failed });
  await boss.createQueue(settings.queue, { name: settings.queue, policy: 'standard', retryLimit: settings.retryLimit, expireInSeconds: settings.expireSeconds, deadLetter: failed });
  return boss;
}
