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
  AUTH_RATE_WINDOW_MS: z.coerce.number().int().positive().default(15 * 60 * 1000),
  /** SMTP relay; without it a local catcher receives mail (development and tests). */
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Sinterstack <no-reply@sinterstack.invalid>'),
  /** Where the local mail catcher writes the messages it receives. */
  MAIL_CATCH_DIR: z.string().default('.data/mail'),
  /** Folder of the exported web app. */
  WEB_DIST: z.string().default('dist'),
  UPLOAD_LIMIT_MB: z.coerce.number().positive().default(200),
});

export type Config = {
  env: 'development' | 'test' | 'production';
  port: number;
  host: string;
  databaseUrl: string;
  appUrl: string;
  authRateLimit: number;
  authRateWindowMs: number;
  smtpUrl?: string;
  mailFrom: string;
  mailCatchDir: string;
  webDist: string;
  uploadLimitBytes: number;
};

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new Error(`configuration: ${issue.path.join('.')}: ${issue.message}`);
  }
  const e = parsed.data;
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    databaseUrl: e.DATABASE_URL,
    appUrl: (e.APP_URL ?? `http://${e.HOST}:${e.PORT}`).replace(/\/$/, ''),
    authRateLimit: e.AUTH_RATE_LIMIT,
    authRateWindowMs: e.AUTH_RATE_WINDOW_MS,
    smtpUrl: e.SMTP_URL,
    mailFrom: e.MAIL_FROM,
    mailCatchDir: e.MAIL_CATCH_DIR,
    webDist: e.WEB_DIST,
    uploadLimitBytes: Math.round(e.UPLOAD_LIMIT_MB * 1024 * 1024),
  };
}
