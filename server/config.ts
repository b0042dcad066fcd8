import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { z } from 'zod';

/**
 * The server's configuration, read once at boot from the environment and
 * checked here so the rest of the code can trust it.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  HOST: z.string().default('127.0.0.1'),
  DATABASE_URL: z.string().min(1, 'DATABASE_URL is required'),
  /** The address users open; invite links and the Origin check use it. */
  APP_URL: z.string().url().optional(),
  /** Sign-in and sign-up attempts per client address per window. */
  AUTH_RATE_LIMIT: z.coerce.number().int().positive().default(20),
  /** Failed sign-ins (or invite acceptances) per account (or invite) per window, whatever the address. */
  AUTH_ACCOUNT_RATE_LIMIT: z.coerce.number().int().positive().default(10),
  /**
   * Express's "trust proxy": unset, X-Forwarded-For is ignored and the
   * connecting address counts. Set it only behind a proxy that overwrites
   * the header: a hop count ("1"), "loopback", or addresses/CIDRs.
   */
  TRUST_PROXY: z.string().optional(),
  AUTH_RATE_WINDOW_MS: z.coerce.number().int().positive().default(15 * 60 * 1000),
  /**
   * A session unused this long ends (idle lifetime), and every session ends
   * this long after sign-in whatever its use (absolute lifetime). The
   * defaults follow NIST SP 800-63B's reauthentication bound for AAL1
   * (30 days whatever the activity); the idle week is this product's choice.
   */
  SESSION_IDLE_HOURS: z.coerce.number().positive().default(7 * 24),
  SESSION_ABSOLUTE_HOURS: z.coerce.number().positive().default(30 * 24),
  /** How long a mailed password reset link works. */
  RESET_TOKEN_MINUTES: z.coerce.number().positive().max(24 * 60).default(60),
  /** SMTP relay; without it a local catcher receives mail (development and tests). */
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Sinterstack <no-reply@sinterstack.invalid>'),
  /** Where the local mail catcher writes the messages it receives. */
  MAIL_CATCH_DIR: z.string().default('.data/mail'),
  /** Folder of the exported web app. */
  WEB_DIST: z.string().default('dist'),
  UPLOAD_LIMIT_MB: z.coerce.number().positive().default(200),
  /** A 3MF (a ZIP) may expand to at most this much when read: past it, it is refused as a ZIP bomb. */
  MAX_3MF_EXPANDED_MB: z.coerce.number().positive().default(1024),
  /** Triangles one uploaded file may hold once a 3MF's components are expanded. */
  MAX_MESH_TRIANGLES: z.coerce.number().int().positive().default(5_000_000),
  /** Whether this server process also measures uploads from the job queue (`off`: only `npm run worker` processes do). */
  MESH_WORKER: z.enum(['on', 'off']).default('on'),
  /** Worker threads measuring meshes in this process (default: half the cores, 1 to 4). */
  MESH_THREADS: z.coerce.number().int().min(1).max(64).optional(),
  /** Files up to this size are measured on a thread of their own at full priority, never behind a large file; 0: one lane for all. */
  MESH_QUICK_MB: z.coerce.number().min(0).max(1024).default(1),
  /** Nice value (0-19) of the threads measuring large files and slicing layouts, so they give way to the web server and small files. */
  MESH_BULK_NICE: z.coerce.number().int().min(0).max(19).default(10),
  /** Files of one lab measured at once, across every worker. */
  MESH_LAB_CONCURRENCY: z.coerce.number().int().min(1).max(64).default(2),
  /** Time limit for measuring one file. */
  MESH_TIMEOUT_S: z.coerce.number().int().min(1).default(120),
  /** A file whose worker went silent (killed, machine lost) this long is handed to another worker; more than MESH_TIMEOUT_S. */
  MESH_JOB_EXPIRE_S: z.coerce.number().int().min(2).optional(),
  /** The job queue's name: servers and workers of one installation use the same. */
  JOB_QUEUE: z.string().regex(/^[A-Za-z0-9_.-]{1,60}$/, 'letters, digits, "_", "-" and "." only').default('mesh-measure'),
  /** How long an upload waits for its files to be measured before answering 202 with the job to follow. */
  UPLOAD_WAIT_MS: z.coerce.number().int().min(0).max(600_000).default(5000),
  /** Finished jobs (uploads' and layouts', with the queue's own records of them) are deleted this long after they finish. */
  JOB_RETENTION_HOURS: z.coerce.number().int().min(1).max(24 * 365).default(168),
  /** How long keeping a layout waits for its parts to be sliced on the job queue before it is estimated by their boxes instead. */
  LAYOUT_SLICE_WAIT_MS: z.coerce.number().int().min(0).max(600_000).default(15_000),
  /** How often each server looks at every lab's powder forecast for the passing of time (changes are looked at as they happen); 0: never. */
  POWDER_SWEEP_MINUTES: z.coerce.number().int().min(0).max(24 * 60).default(60),
  /** Where uploads are streamed while they are measured; removed after each request. */
  UPLOAD_TMP_DIR: z.string().optional(),
  /** Where mesh files live: in PostgreSQL (default) or in S3-compatible object storage. */
  STORAGE_DRIVER: z.enum(['postgres', 's3']).default('postgres'),
  S3_ENDPOINT: z.string().url().optional(),
  S3_REGION: z.string().default('us-east-1'),
  S3_BUCKET: z.string().optional(),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  /** Path-style addresses (endpoint/bucket/key), which most self-hosted object stores need. */
  S3_FORCE_PATH_STYLE: z.enum(['true', 'false']).default('true'),
});

export type S3StorageConfig = {
  driver: 's3';
  endpoint?: string;
  region: string;
  bucket: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  forcePathStyle: boolean;
};
export type StorageConfig = { driver: 'postgres' } | S3StorageConfig;

export type Config = {
  env: 'development' | 'test' | 'production';
  port: number;
  host: string;
  databaseUrl: string;
  appUrl: string;
  authRateLimit: number;
  authRateWindowMs: number;
  authAccountRateLimit: number;
  trustProxy: boolean | number | string;
  sessionIdleMs: number;
  sessionAbsoluteMs: number;
  resetTokenMs: number;
  /** Prefixed to the shared rate-limit counters' keys; tests give each app its own. */
  rateLimitNamespace: string;
  smtpUrl?: string;
  mailFrom: string;
  mailCatchDir: string;
  webDist: string;
  uploadLimitBytes: number;
  uploadTmpDir: string;
  max3mfExpandedBytes: number;
  maxMeshTriangles: number;
  storage: StorageConfig;
  meshWorker: boolean;
  meshThreads?: number;
  meshQuickBytes: number;
  meshBulkNice: number;
  meshLabConcurrency: number;
  meshTimeoutMs: number;
  meshJobExpireSeconds: number;
  jobQueue: string;
  uploadWaitMs: number;
  layoutSliceWaitMs: number;
  jobRetentionHours: number;
  powderSweepMinutes: number;
};

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new Error(`configuration: ${issue.path.join('.')}: ${issue.message}`);
  }
  const e = parsed.data;
  if (e.STORAGE_DRIVER === 's3' && !e.S3_BUCKET) throw new Error('configuration: S3_BUCKET: is required when STORAGE_DRIVER is s3');
  if (e.STORAGE_DRIVER === 's3' && !!e.S3_ACCESS_KEY_ID !== !!e.S3_SECRET_ACCESS_KEY) {
    throw new Error('configuration: S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY go together: set both or neither');
  }
  const expire = e.MESH_JOB_EXPIRE_S ?? e.MESH_TIMEOUT_S + 60;
  if (expire <= e.MESH_TIMEOUT_S) throw new Error('configuration: MESH_JOB_EXPIRE_S: must be longer than MESH_TIMEOUT_S, or a slow file would be measured twice');
  const storage: StorageConfig =
    e.STORAGE_DRIVER === 's3'
      ? {
          driver: 's3',
          endpoint: e.S3_ENDPOINT,
          region: e.S3_REGION,
          bucket: e.S3_BUCKET!,
          accessKeyId: e.S3_ACCESS_KEY_ID,
          secretAccessKey: e.S3_SECRET_ACCESS_KEY,
          forcePathStyle: e.S3_FORCE_PATH_STYLE === 'true',
        }
      : { driver: 'postgres' };
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    databaseUrl: e.DATABASE_URL,
    appUrl: (e.APP_URL ?? `http://${e.HOST}:${e.PORT}`).replace(/\/$/, ''),
    authRateLimit: e.AUTH_RATE_LIMIT,
    authRateWindowMs: e.AUTH_RATE_WINDOW_MS,
    authAccountRateLimit: e.AUTH_ACCOUNT_RATE_LIMIT,
    trustProxy: e.TRUST_PROXY === undefined || e.TRUST_PROXY === '' || e.TRUST_PROXY === 'false' ? false : /^\d+$/.test(e.TRUST_PROXY) ? Number(e.TRUST_PROXY) : e.TRUST_PROXY,
    sessionIdleMs: Math.round(e.SESSION_IDLE_HOURS * 3_600_000),
    sessionAbsoluteMs: Math.round(e.SESSION_ABSOLUTE_HOURS * 3_600_000),
    resetTokenMs: Math.round(e.RESET_TOKEN_MINUTES * 60_000),
    rateLimitNamespace: '',
    smtpUrl: e.SMTP_URL,
    mailFrom: e.MAIL_FROM,
    mailCatchDir: e.MAIL_CATCH_DIR,
    webDist: e.WEB_DIST,
    uploadLimitBytes: Math.round(e.UPLOAD_LIMIT_MB * 1024 * 1024),
    uploadTmpDir: e.UPLOAD_TMP_DIR ?? join(tmpdir(), 'sinterstack-uploads'),
    max3mfExpandedBytes: Math.round(e.MAX_3MF_EXPANDED_MB * 1024 * 1024),
    maxMeshTriangles: e.MAX_MESH_TRIANGLES,
    storage,
    meshWorker: e.MESH_WORKER === 'on',
    meshThreads: e.MESH_THREADS,
    meshQuickBytes: Math.round(e.MESH_QUICK_MB * 1024 * 1024),
    meshBulkNice: e.MESH_BULK_NICE,
    meshLabConcurrency: e.MESH_LAB_CONCURRENCY,
    meshTimeoutMs: e.MESH_TIMEOUT_S * 1000,
    meshJobExpireSeconds: expire,
    jobQueue: e.JOB_QUEUE,
    uploadWaitMs: e.UPLOAD_WAIT_MS,
    layoutSliceWaitMs: e.LAYOUT_SLICE_WAIT_MS,
    jobRetentionHours: e.JOB_RETENTION_HOURS,
    powderSweepMinutes: e.POWDER_SWEEP_MINUTES,
  };
}
