import express, { type RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type pg from 'pg';
import type { Config } from './config';
import type { Database } from './db';
import type { Auth } from './auth/sessions';
import type { Mailer } from './mail/mailer';
import type { LabEvents } from './events/labEvents';
import { AppError } from './errors';
import { PostgresRateLimitStore } from './auth/rateLimitStore';
import { errorHandler, isDatabaseDown, notFoundRoute } from './http/middleware/errors';
import { checkOrigin, loadSession } from './http/middleware/auth';
import { checkInput, jsonBodies } from './http/middleware/input';
import { noStore, securityHeaders } from './http/middleware/headers';
import { authRoutes } from './http/routes/auth';
import { labRoutes } from './http/routes/labs';
import { settingsRoutes } from './http/routes/settings';
import { partRoutes } from './http/routes/parts';
import { jobRoutes } from './http/routes/jobs';
import { requestRoutes } from './http/routes/requests';
import { planRoutes } from './http/routes/plans';
import { runRoutes } from './http/routes/runs';
import { powderRoutes } from './http/routes/powder';
import { announceChanges, eventRoutes } from './http/routes/events';
import { labsService } from './services/labs';
import { authService } from './services/auth';
import { auditService } from './services/audit';
import { invitesService } from './services/invites';
import { profilesService } from './services/profiles';
import { partsService } from './services/parts';
import { requestsService } from './services/requests';
import { plansService } from './services/plans';
import { layoutsService } from './services/layouts';
import { layoutProfilesService } from './services/layoutProfiles';
import { reviewService } from './services/review';
import { reviewFlagsService } from './services/reviewFlags';
import { takeBackService } from './services/takeBack';
import { partRevisionsService } from './services/partRevisions';
import { calibrationService } from './services/calibration';
import { queueService } from './services/queue';
import { runsService } from './services/runs';
import { powderService } from './services/powder';
import { sheetService } from './services/sheet';
import { export3mfService } from './services/export3mf';
import { thumbnailsService } from './services/thumbnails';
import { drawSheetViews, partThumbnail, writeBuildFile } from './mesh/pool';
import { createStorage } from './storage';
import { meshJobsService, type MeshQueueSettings } from './jobs/meshJobs';
import type PgBoss from 'pg-boss';
import { checkedMachineProfileSchema, checkedMaterialProfileSchema, machineProfileSchema, materialProfileSchema } from '../shared/types/profiles';
import type { LabTopic } from './events/labEvents';

/** Changes after which the powder forecast is looked at again. */
const FORECAST_TOPICS: ReadonlySet<LabTopic> = new Set<LabTopic>(['powder', 'queue', 'plans', 'runs', 'materials']);

export type Services = ReturnType<typeof createServices>;
export type AppDeps = {
  config: Config;
  db: Database;
  pool: pg.Pool;
  auth: Auth;
  mailer: Mailer;
  /** Live updates to the lab's open screens (PostgreSQL LISTEN/NOTIFY). */
  events: LabEvents;
  services: Services;
  log: (msg: string) => void;
};

/** What the mesh job queue needs beyond the database. */
export type QueueDeps = { boss: PgBoss; pool: pg.Pool; events: LabEvents; settings: MeshQueueSettings; log: (msg: string) => void };

export function createServices(db: Database, mailer: Mailer, config: Config, jobs: QueueDeps) {
  const labs = labsService(db);
  const audit = auditService(db);
  const auth = authService(db, { labs, audit, mailer, appUrl: config.appUrl, resetTokenMs: config.resetTokenMs, log: jobs.log });
  const invites = invitesService(db, { labs, auth, mailer, appUrl: config.appUrl });
  const machines = profilesService(db, 'machines', machineProfileSchema, 'machine', checkedMachineProfileSchema);
  const materials = profilesService(db, 'materials', materialProfileSchema, 'material', checkedMaterialProfileSchema);
  const storage = createStorage(db, config.storage);
  const parts = partsService(db, { storage, max3mfExpandedBytes: config.max3mfExpandedBytes, maxMeshTriangles: config.maxMeshTriangles });
  const meshJobs = meshJobsService({
    db,
    pool: jobs.pool,
    boss: jobs.boss,
    storage,
    parts,
    settings: jobs.settings,
    publish: (e) => jobs.events.publish(e),
    subscribe: (labId, fn) => jobs.events.subscribe(labId, fn),
    log: jobs.log,
  });
  // The queue is made below; a request asks it for its builds' ready dates only when read.
  const partRevisions = partRevisionsService(db, { parts });
  const requests = requestsService(db, parts, {
    readyDates: (labId, machineId) => queue.readyDates(labId, machineId),
    newestRevisions: (ids, transaction) => partRevisions.newest(ids, transaction),
  });
  const plans = plansService(db, { labs, mailer, appUrl: config.appUrl });
  const calibration = calibrationService(db);
  const layouts = layoutsService(db, {
    calibrationFor: calibration.lookup,
    profilesFor: layoutProfilesService(db, {
      slice: (labId, userId, task) => meshJobs.sliceLayout(labId, userId, task, config.layoutSliceWaitMs),
    }),
  });
  const review = reviewService(db, { plans, appUrl: config.appUrl, labs });
  const queue = queueService(db, { calibration });
  const reviewFlags = reviewFlagsService(db, { labs, queue });
  const takeBack = takeBackService(db, { plans, appUrl: config.appUrl });
  const powder = powderService(db, { labs, queue, mailer, appUrl: config.appUrl, log: jobs.log });
  const runs = runsService(db, { drawPowder: powder.drawForRun, mailer, appUrl: config.appUrl });
  const sheet = sheetService(db, { layouts, storage, draw: drawSheetViews });
  const export3mf = export3mfService(db, { storage, layouts, write: writeBuildFile });
  const thumbnails = thumbnailsService(db, { storage, parts, draw: partThumbnail });
  return { labs, audit, auth, invites, machines, materials, storage, parts, meshJobs, requests, plans, layouts, review, reviewFlags, takeBack, partRevisions, calibration, queue, runs, sheet, export3mf, powder, thumbnails };
}

/** The Express app, without listen(), so tests can drive it with supertest. */
export function createApp(deps: AppDeps) {
  const app = express();
  app.disable('x-powered-by');
  // Off unless configured: otherwise anyone could pick their own address in X-Forwarded-For and dodge the limits.
  app.set('trust proxy', deps.config.trustProxy);

  app.use(securityHeaders(deps.config.appUrl.startsWith('https:')));

  const api = express.Router();
  api.use(noStore);
  api.get('/health', async (_req, res) => {
    try {
      await deps.db.sequelize.query('SELECT 1');
      res.json({ ok: true, db: true });
    } catch {
      res.status(503).json({ ok: false, db: false });
    }
  });
  api.use(checkOrigin(deps.config.appUrl));
  // The session first, so that no large body is read for someone who has not signed in.
  api.use(loadSession(deps.auth, deps.config.appUrl.startsWith('https:'), deps.pool, { idleMs: deps.config.sessionIdleMs, absoluteMs: deps.config.sessionAbsoluteMs }));
  api.use(jsonBodies());
  api.use(checkInput);

  // Counters in PostgreSQL, shared by every server process behind a load balancer.
  const store = (name: string) => new PostgresRateLimitStore(deps.pool, `${deps.config.rateLimitNamespace}${name}:`);
  const limiter: RequestHandler = rateLimit({
    windowMs: deps.config.authRateWindowMs,
    limit: deps.config.authRateLimit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: store('address'),
    // X-Forwarded-For is ignored on purpose unless TRUST_PROXY says a proxy sets it.
    validate: { xForwardedForHeader: false },
    handler: (_req, _res, next) =>
      next(new AppError(429, 'rate_limited', 'Too many attempts from this address; wait a few minutes and try again.')),
  });
  // Per account (sign-in) or per invite (acceptance): failed attempts only, whatever address they come from.
  const accountLimiter: RequestHandler = rateLimit({
    windowMs: deps.config.authRateWindowMs,
    limit: deps.config.authAccountRateLimit,
    skipSuccessfulRequests: true,
    validate: { xForwardedForHeader: false },
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: store('account'),
    keyGenerator: (req) =>
      req.params.token ? `invite:${String(req.params.token)}` : `account:${String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase()}`,
    handler: (_req, _res, next) =>
      next(new AppError(429, 'rate_limited', 'Too many failed attempts for this account; wait a few minutes and try again.')),
  });
  // Reset links asked for one address, whatever address the asking comes from: every request counts.
  const resetLimiter: RequestHandler = rateLimit({
    windowMs: deps.config.authRateWindowMs,
    limit: deps.config.authAccountRateLimit,
    validate: { xForwardedForHeader: false },
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: store('reset'),
    keyGenerator: (req) => `reset:${String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase()}`,
    handler: (_req, _res, next) =>
      next(new AppError(429, 'rate_limited', 'Too many reset requests for this address; wait a few minutes and try again.')),
  });
  api.post('/auth/sign-in', accountLimiter);
  api.post('/invites/:token/accept', limiter, accountLimiter);
  api.use(
    announceChanges(deps.events, deps.log, ({ labId, topic }) => {
      // Stock, queue, plans, runs and a material's policy move the powder forecast: a shortage newly in sight is mailed once.
      if (FORECAST_TOPICS.has(topic)) deps.services.powder.checkShortages(labId).catch((err: Error) => deps.log(`powder forecast: ${err.message}`));
    }),
  );
  api.use(eventRoutes(deps));
  api.use(authRoutes(deps, limiter, resetLimiter));
  api.use(labRoutes(deps));
  api.use(settingsRoutes(deps));
  api.use(partRoutes(deps));
  api.use(jobRoutes(deps));
  api.use(requestRoutes(deps));
  api.use(planRoutes(deps.services));
  api.use(runRoutes(deps.services));
  api.use(powderRoutes(deps.services));
  api.use(notFoundRoute);
  api.use(errorHandler(deps.log));
  app.use('/api', api);

  // The exported web app: files as they are, every other path to index.html
  // so that deep links (an invite link, a plan) open the app.
  const dist = resolve(deps.config.webDist);
  const index = join(dist, 'index.html');
  app.use(express.static(dist, { index: false, maxAge: '1h', setHeaders: (res, path) => {
    if (path.endsWith('.html')) res.setHeader('Cache-Control', 'no-cache');
  } }));
  app.get(/.*/, (_req, res) => {
    if (existsSync(index)) {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(index);
    } else {
      res.status(503).type('text').send('The web app has not been exported yet: run `npm start`, which exports it.');
    }
  });
  const final: express.ErrorRequestHandler = (err, _req, res, _next) => {
    res.status(isDatabaseDown(err) ? 503 : 500).type('text').send('Server error');
  };
  app.use(final);
  return app;
}
