/**
 * `npm test`: the whole suite on a fresh machine. Prepares the project's
 * PostgreSQL cluster with a separate, freshly made test database (migrated,
 * demo lab seeded), makes sure Debian's Chromium is there for the browser
 * tests, exports the web app when it is stale, then runs jest. Extra
 * arguments go to jest: `npm test -- tests/unit/packing`.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dropDatabase, dropStaleTestDatabases, ensureCluster, ensureDatabase, ROOT } from './lib/postgres';
import { ensureWebBundle } from './lib/web';

export const CHROMIUM = '/usr/bin/chromium';

function ensureChromium(log: (s: string) => void) {
  if (existsSync(CHROMIUM)) return;
  log('Chromium is not installed: installing Debian\'s chromium package (apt-get)...');
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
}

async function main() {
  const log = (s: string) => console.log(s);
  const args = process.argv.slice(2);
  const cluster = await ensureCluster(log);
  // A database of this run's own, so that runs side by side (several
  // contributors on one machine) never drop each other's data mid-test.
  await dropStaleTestDatabases(cluster);
  const dbName = `sinterstack_test_${process.pid}`;
  const databaseUrl = await ensureDatabase(cluster, dbName, { fresh: true });

  process.env.DATABASE_URL = databaseUrl;
  process.env.NODE_ENV = 'test';
  const { loadConfig } = await import('../server/config');
  const { connectDatabase, migrate } = await import('../server/db');
  const { boot } = await import('../server/boot');
  const { seedDemoIfEmpty } = await import('../server/db/seeders/demo');
  const db = connectDatabase(databaseUrl);
  await migrate(db.sequelize);
  await db.close();
  const running = await boot(loadConfig(process.env), () => {});
  await seedDemoIfEmpty(running.db, running.services);
  await running.close();

  ensureChromium(log);
  ensureWebBundle(log);

  if (!args.length) {
    // The dependency direction lives in lint rules; a break fails the suite.
    const lint = spawnSync('npx', ['eslint', '.'], { cwd: ROOT, stdio: 'inherit' });
    if (lint.status !== 0) process.exit(lint.status ?? 1);
  }
  const jest = spawnSync('npx', ['jest', ...args], { cwd: ROOT, stdio: 'inherit', env: process.env });
  // A run that is interrupted leaves its database; the next run drops it.
  await dropDatabase(cluster, dbName).catch(() => {});
  process.exit(jest.status ?? 1);
}

main().catch((err: Error) => {
  console.error(`sinterstack test: ${err.message}`);
  process.exit(1);
});
