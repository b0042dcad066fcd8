import { loadConfig } from './config';
import { boot, checkDatabase, listen } from './boot';
import { meshPool } from './mesh';

/**
 * Runs the server against an already prepared database (`npm start` prepares
 * one and calls runServer itself). Exits non-zero with one line on a missing
 * database or a taken port.
 */
export async function runServer(env: NodeJS.ProcessEnv = process.env) {
  const config = loadConfig(env);
  await checkDatabase(config.databaseUrl);
  const running = await boot(config);
  // The measuring threads start now (loading the geometry code takes seconds on a busy machine), not with the first upload.
  if (config.meshWorker) meshPool();
  const server = await listen(running.app, config.port, config.host);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`\n${signal}: stopping the server...`);
    server.closeAllConnections?.();
    await new Promise<void>((r) => server.close(() => r()));
    await running.close();
    console.log('stopped.');
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
  return { config, running, server };
}

if (require.main === module) {
  runServer()
    .then(({ config }) => console.log(`Sinterstack is serving on ${config.appUrl}`))
    .catch((err: Error) => {
      console.error(`sinterstack: ${err.message}`);
      process.exit(1);
    });
}
