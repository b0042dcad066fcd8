import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import type pg from 'pg';

/**
 * A store for express-rate-limit that keeps its counters in PostgreSQL
 * (table `rate_limit_hits`), so that every server process behind a load
 * balancer counts against the same limit and a restart forgets nothing.
 * A fixed window per key, as express-rate-limit's own memory store does:
 * the first hit opens a window of `windowMs`; hits inside it add up; the
 * first hit after it ends starts a new one. One statement per hit.
 */
export class PostgresRateLimitStore implements Store {
  /** Counters are shared by every process: express-rate-limit must not assume they are its own. */
  localKeys = false;
  private windowMs = 60_000;
  private hitsSinceSweep = 0;

  /** `prefix` tells the limiters apart (per address, per account) in the one table. */
  constructor(
    private readonly pool: pg.Pool,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>(
      'SELECT hits, reset_at FROM rate_limit_hits WHERE key = $1 AND reset_at > now()',
      [this.prefix + key],
    );
    return rows[0] ? { totalHits: rows[0].hits, resetTime: rows[0].reset_at } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>(
      `INSERT INTO rate_limit_hits (key, hits, reset_at)
       VALUES ($1, 1, now() + make_interval(secs => $2::double precision / 1000))
       ON CONFLICT (key) DO UPDATE SET
         hits = CASE WHEN rate_limit_hits.reset_at <= now() THEN 1 ELSE rate_limit_hits.hits + 1 END,
         reset_at = CASE WHEN rate_limit_hits.reset_at <= now() THEN excluded.reset_at ELSE rate_limit_hits.reset_at END
       RETURNING hits, reset_at`,
      [this.prefix + key, this.windowMs],
    );
    if (++this.hitsSinceSweep >= 500) {
      this.hitsSinceSweep = 0;
      // Windows long over are of no use to anyone; keep the table small.
      await this.pool.query("DELETE FROM rate_limit_hits WHERE reset_at < now() - interval '1 hour'");
    }
    return { totalHits: rows[0].hits, resetTime: rows[0].reset_at };
  }

  async decrement(key: string): Promise<void> {
    await this.pool.query('UPDATE rate_limit_hits SET hits = GREATEST(hits - 1, 0) WHERE key = $1 AND reset_at > now()', [this.prefix + key]);
  }

  async resetKey(key: string): Promise<void> {
    await this.pool.query('DELETE FROM rate_limit_hits WHERE key = $1', [this.prefix + key]);
  }
}
