/**
 * `npm run worker`: one more process measuring uploads from the job queue,
 * on this machine or another, against the same database and file store as
 * the servers (DATABASE_URL, STORAGE_DRIVER and the S3_* settings; see the
 * README). Without DATABASE_URL it uses this checkout's own PostgreSQL, as
 * `npm start` does. MESH_THREADS sets how many files it measures at once.
 */
async function main() {
  const log = (s: string) => console.log(s);
  if (!process.env.DATABASE_URL) {
    const { ensureCluster, ensureDatabase } = await import('./lib/postgres');
    const cluster = await ensureCluster(log);
    process.env.DATABASE_URL = await ensureDatabase(cluster, process.env.SINTERSTACK_DB ?? 'sinterstack');
  }
  const { loadConfig } = await import('../server/config');
  const { checkDatabase, meshQueueSettings } = await import('../server/boot');
  const { runWorkerProcess } = await import('../server/jobs/process');
  const config = loadConfig(process.env);
  await checkDatabase(config.databaseUrl);
  const worker = await runWorkerProcess(config, meshQueueSettings(config), log);
  log(`mesh worker ${worker.name} serving queue "${config.jobQueue}" with ${worker.threads} thread${worker.threads === 1 ? '' : 's'}`);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    log(`${signal}: finishing the files in hand, then stopping...`);
    await worker.stop();
    log('stopped.');
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((err: Error) => {
  console.error(`sinterstack worker: ${err.message}`);
  process.exit(1);
});
