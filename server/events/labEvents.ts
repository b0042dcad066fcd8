/**
 * Live updates: "something of this kind changed in this lab", pushed to the
 * lab's open screens so they read it again at once instead of polling.
 *
 * Changes are announced through PostgreSQL's NOTIFY on one channel and heard
 * through LISTEN, so every server process of the lab (several behind a load
 * balancer, on one database) hears every change, whichever process made it;
 * nothing is kept in the web server between requests. An event carries only
 * the lab, the kind of record and its id: the screens fetch the data through
 * the usual routes, which check the reader's roles.
 *
 *   server A: POST /labs/L/plans/P/review ──NOTIFY──┐
 *                                                    PostgreSQL
 *   server B: LISTEN ◄───────────────────────────────┘ ──► SSE to L's screens
 */
import { EventEmitter } from 'node:events';
import pg from 'pg';
import type { Role } from '../../shared/schemas/auth';

export const LAB_EVENTS_CHANNEL = 'sinterstack_lab_events';

/** The kinds of record a screen may be told about, and who may hear of each. */
export const LAB_TOPICS = {
  parts: null,
  requests: null,
  plans: null,
  runs: null,
  queue: null,
  machines: null,
  materials: null,
  members: null,
  powder: null,
  /** Uploads measured on the job queue: a file started or finished. */
  jobs: null,
  invites: ['lead'],
  audit: ['lead'],
} as const satisfies Record<string, readonly Role[] | null>;
export type LabTopic = keyof typeof LAB_TOPICS;

export type LabEvent = { labId: string; topic: LabTopic; id?: string; at: string };

export function isLabTopic(t: string): t is LabTopic {
  return Object.prototype.hasOwnProperty.call(LAB_TOPICS, t);
}

/** Whether a member with these roles may hear of this kind of change. */
export function mayHear(topic: LabTopic, roles: readonly Role[]): boolean {
  const only: readonly Role[] | null = LAB_TOPICS[topic];
  return !only || only.some((r) => roles.includes(r));
}

/**
 * Maps a changed route to the kind of record it changed:
 * /labs/:labId/plans/:planId/review -> plans, /labs/:labId/machines/:id/queue -> queue.
 */
export function topicOfPath(path: string): { labId: string; topic: LabTopic; id?: string } | null {
  const m = /^\/(?:api\/)?labs\/([0-9a-f-]{36})\/([a-z-]+)(?:\/([^/?#]+))?(?:\/([a-z-]+))?/i.exec(path);
  if (!m) return null;
  const [, labId, resource, id, sub] = m;
  if (sub === 'queue' || resource === 'queue') return { labId, topic: 'queue', id };
  if (sub === 'run' || sub === 'runs' || resource === 'runs') return { labId, topic: 'runs', id };
  return isLabTopic(resource) ? { labId, topic: resource, id } : null;
}

export interface LabEvents {
  /** Announces a change to every server of the lab (after the change is committed). */
  publish(e: Omit<LabEvent, 'at'>): Promise<void>;
  /**
   * Calls `fn` for each change of the lab, and `onEnd` when the server shuts
   * down (so open streams end and the server can close); returns the
   * unsubscribe. Starts listening on first use.
   */
  subscribe(labId: string, fn: (e: LabEvent) => void, onEnd?: () => void): Promise<() => void>;
  close(): Promise<void>;
}

/** Not a lab id (those are UUIDs): the event that ends every open stream at shutdown. */
const CLOSING = 'closing';

export function createLabEvents(pool: pg.Pool, databaseUrl: string, log: (msg: string) => void = () => {}): LabEvents {
  const local = new EventEmitter();
  local.setMaxListeners(0);
  let listener: pg.Client | null = null;
  let starting: Promise<void> | null = null;
  let closed = false;

  const listen = async () => {
    const client = new pg.Client({ connectionString: databaseUrl });
    client.on('notification', (msg) => {
      if (msg.channel !== LAB_EVENTS_CHANNEL || !msg.payload) return;
      try {
        const e = JSON.parse(msg.payload) as LabEvent;
        if (typeof e.labId === 'string' && isLabTopic(e.topic)) local.emit(e.labId, e);
      } catch {
        // Not ours: ignore.
      }
    });
    // A lost connection is made again on the next subscription; the screens
    // poll meanwhile (their EventSource reconnects and reads everything anew).
    client.on('error', (err) => {
      log(`live updates: lost the database listener (${err.message})`);
      if (listener === client) listener = null;
      starting = null;
    });
    await client.connect();
    await client.query(`LISTEN ${LAB_EVENTS_CHANNEL}`);
    listener = client;
  };

  const ensureListening = () => {
    if (closed) return Promise.reject(new Error('live updates are closed'));
    if (listener) return Promise.resolve();
    starting ??= listen().catch((err) => {
      starting = null;
      throw err;
    });
    return starting;
  };

  return {
    async publish(e) {
      const event: LabEvent = { ...e, at: new Date().toISOString() };
      await pool.query('SELECT pg_notify($1, $2)', [LAB_EVENTS_CHANNEL, JSON.stringify(event)]);
    },
    async subscribe(labId, fn, onEnd) {
      await ensureListening();
      local.on(labId, fn);
      if (onEnd) local.on(CLOSING, onEnd);
      return () => {
        local.off(labId, fn);
        if (onEnd) local.off(CLOSING, onEnd);
      };
    },
    async close() {
      closed = true;
      local.emit(CLOSING);
      local.removeAllListeners();
      const c = listener;
      listener = null;
      await c?.end().catch(() => {});
    },
  };
}
