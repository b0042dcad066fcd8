/**
 * `npm start`: prepares everything on a fresh machine and serves the app:
 * PostgreSQL (installed if missing, a cluster of the project's own), the
 * database, its migrations, the demo lab, the exported web app, then the
 * server on http://127.0.0.1:8080 (PORT overrides).
 */
import { ensureCluster, ensureDatabase } from './lib/postgres';
import { ensureWebBundle } from './lib/web';

async function main() {
  const log = (s: string) => console.log(s);
  const cluster = await ensureCluster(log);
  const databaseUrl = await ensureDatabase(cluster, process.env.SINTERSTACK_DB ?? 'sinterstack');
  process.env.DATABASE_URL ??= databaseUrl;
  process.env.NODE_ENV ??= 'development';

  const { loadConfig } = await import('../server/config');
  const { connectDatabase, migrate } = await import('../server/db');
  const config = loadConfig(process.env);
  const db = connectDatabase(config.databaseUrl);
  const applied = await migrate(db.sequelize);
  if (applied.length) log(`Applied migrations: ${applied.join(', ')}`);
  await db.close();

  ensureWebBundle(log);

  const { runServer } = await import('../server/index');
  const { running } = await runServer(process.env);
  const { seedDemoIfEmpty, DEMO_MEMBERS, DEMO_PASSWORD, DEMO_LAB_NAME } = await import('../server/db/seeders/demo');
  if (await seedDemoIfEmpty(running.db, running.services, { planInReview: true })) log(`Seeded the demo lab "${DEMO_LAB_NAME}".`);

  log('');
  log(`Sinterstack is running at ${config.appUrl}`);
  log(`Demo sign-ins (password for all: ${DEMO_PASSWORD}):`);
  for (const m of DEMO_MEMBERS) log(`  ${m.email.padEnd(30)} ${m.roles.join(', ')}`);
  if (!config.smtpUrl) log(`E-mail is caught locally and written to ${config.mailCatchDir}/ (set SMTP_URL to send it).`);
  log('Press Ctrl-C to stop. PostgreSQL keeps running in the background for the next start.');
}

main().catch((err: Error) => {
  console.error(`sinterstack: ${err.message}`);
  process.exit(1);
});
