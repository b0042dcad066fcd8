import type { ErrorRequestHandler, RequestHandler } from 'express';
import { AppError } from '../../errors';

/**
 * A transaction PostgreSQL gave up on because another one got in its way
 * (SQLSTATE 40P01 deadlock_detected, 40001 serialization_failure, PostgreSQL
 * manual, Appendix A): nothing of it was written and the same request may
 * simply be sent again.
 */
export function isTransactionConflict(err: unknown): boolean {
  let e = err as { code?: string; parent?: unknown; original?: unknown } | null;
  for (let i = 0; e && i < 4; i++) {
    if (e.code === '40P01' || e.code === '40001') return true;
    e = (e.parent ?? e.original ?? null) as typeof e;
  }
  return false;
}

/** Errors that mean "the database is not there right now", whoever raised them. */
export function isDatabaseDown(err: unknown): boolean {
  const e = err as { name?: string; code?: string; parent?: unknown; original?: unknown; message?: string } | null;
  if (!e) return false;
  if (e.name && /^Sequelize(Connection\w*|HostNotReachable|HostNotFound|AccessDenied|ConnectionTimedOut)Error$/.test(e.name)) return true;
  if (e.code && ['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', '57P01', '57P02', '57P03', '08000', '08003', '08006'].includes(e.code)) return true;
  if (e.message && /Connection terminated|connection timeout|the database system is (starting up|shutting down)/i.test(e.message)) return true;
  return isDatabaseDown(e.parent ?? e.original ?? null);
}

export const notFoundRoute: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'not_found', `There is no route ${req.method} ${req.path}.`));
};

export function errorHandler(log: (msg: string) => void): ErrorRequestHandler {
  return (err, _req, res, _next) => {
    if (res.headersSent) return;
    if (err instanceof AppError) {
      const body: Record<string, unknown> = { code: err.code, message: err.message };
      if (err.field) body.field = err.field;
      if (err.details) Object.assign(body, err.details);
      res.status(err.status).json({ error: body });
      return;
    }
    // body-parser's own errors carry a status and a type.
    const status = (err as { status?: number }).status;
    const type = (err as { type?: string }).type;
    if (type === 'entity.parse.failed') {
      res.status(400).json({ error: { code: 'invalid_json', message: 'The request body is not valid JSON.' } });
      return;
    }
    if (type === 'entity.too.large') {
      res.status(413).json({ error: { code: 'too_large', message: 'The request body is too large.' } });
      return;
    }
    if (status && status >= 400 && status < 500) {
      res.status(status).json({ error: { code: 'bad_request', message: 'The request could not be read.' } });
      return;
    }
    if (isTransactionConflict(err)) {
      res.status(409).json({ error: { code: 'busy_retry', message: 'Someone else changed the same thing at the same moment; nothing was saved. Try again.' } });
      return;
    }
    if (isDatabaseDown(err)) {
      res.status(503).json({ error: { code: 'db_unavailable', message: 'The database is not reachable right now; try again shortly.' } });
      return;
    }
    log(`unexpected error: ${(err as Error)?.stack ?? String(err)}`);
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on the server.' } });
  };
}
