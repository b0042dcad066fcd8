import { Router, type RequestHandler } from 'express';
import type { AppDeps } from '../../app';
import { mayHear, topicOfPath, type LabEvent, type LabEvents, type LabTopic } from '../../events/labEvents';
import { labAccess } from '../middleware/auth';
import { ctx, requireLab } from '../context';

/** How often an open stream says it is alive and re-checks that its reader still belongs to the lab. */
const PING_MS = 20_000;

/**
 * After a request that changed something of a lab has been answered with
 * success, tells the lab's open screens which kind of record changed, and
 * `onChange` (work that follows a change, such as the powder forecast).
 */
export function announceChanges(events: LabEvents, log: (msg: string) => void, onChange?: (changed: { labId: string; topic: LabTopic }) => void): RequestHandler {
  return (req, res, next) => {
    if (req.method === 'GET' || req.method === 'HEAD' || req.method === 'OPTIONS') return next();
    res.on('finish', () => {
      if (res.statusCode >= 400) return;
      const changed = topicOfPath(req.originalUrl);
      if (!changed) return;
      events.publish(changed).catch((err: Error) => log(`live updates: could not announce a change (${err.message})`));
      onChange?.(changed);
    });
    next();
  };
}

/**
 * GET /api/labs/:labId/events: a server-sent event stream of the lab's
 * changes ("change" events with { topic, id, at }), filtered by what the
 * reader's roles may hear of. A "ready" event tells the screen it is live.
 */
export function eventRoutes(deps: AppDeps): Router {
  const r = Router();
  const member = labAccess(deps.services.labs);
  r.get('/labs/:labId/events', member, async (req, res) => {
    const { labId, user, roles: initialRoles } = requireLab(req);
    const sessionId = ctx(req).sessionId;
    let roles = initialRoles;
    let open = true;
    const timer: { ping?: ReturnType<typeof setInterval> } = {};
    const send = (event: string, data: unknown) => {
      if (open) res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
    };
    // Subscribed before anything is sent, so a database that is away still
    // answers with the usual error (503) instead of a broken stream.
    const unsubscribe = await deps.events.subscribe(
      labId,
      (e: LabEvent) => {
        if (mayHear(e.topic, roles)) send('change', { topic: e.topic, id: e.id, at: e.at });
      },
      () => stop(),
    );
    function stop() {
      if (!open) return;
      open = false;
      if (timer.ping) clearInterval(timer.ping);
      unsubscribe();
      res.end();
    }
    if (req.destroyed) return stop();
    req.on('close', stop);

    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-store');
    res.setHeader('Connection', 'keep-alive');
    res.setHeader('X-Accel-Buffering', 'no');
    res.flushHeaders();
    // The browser reconnects after this many ms if the stream breaks.
    res.write('retry: 3000\n\n');
    send('ready', { labId });

    // A member removed from the lab, or a session that ended, stops hearing at the next ping.
    timer.ping = setInterval(() => {
      void (async () => {
        try {
          const session = sessionId ? await deps.auth.validateSession(sessionId) : { session: null };
          const membership = session.session ? await deps.services.labs.membership(labId, user.id) : null;
          if (!membership) return stop();
          roles = membership.roles;
          if (open) res.write(': alive\n\n');
        } catch {
          // The database is away for a moment: keep the stream, try again at the next ping.
        }
      })();
    }, PING_MS);
  });
  return r;
}
