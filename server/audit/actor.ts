import { AsyncLocalStorage } from 'node:async_hooks';
import type { Sequelize, Transaction, TransactionOptions } from 'sequelize';

/**
 * Who is acting, for the audit log. The session middleware runs the rest of
 * the request inside `asActor(userId, ...)`; every transaction begun under it
 * starts by setting `sinterstack.actor` (transaction-local), which the audit
 * triggers read. Work outside a request (a queued job, an invite being
 * accepted by someone not yet signed in) names its actor the same way.
 */
const current = new AsyncLocalStorage<{ actorId: string }>();

export function asActor<T>(actorId: string, fn: () => T): T {
  return current.run({ actorId }, fn);
}

export function currentActor(): string | undefined {
  return current.getStore()?.actorId;
}

/** Names the actor inside a transaction that is already open (e.g. one begun before the actor was known). */
export async function stampActor(sequelize: Sequelize, transaction: Transaction, actorId = currentActor()): Promise<void> {
  if (!actorId) return;
  await sequelize.query("SELECT set_config('sinterstack.actor', $1, true)", { bind: [actorId], transaction });
}

const WRITE = /^\s*(INSERT|UPDATE|DELETE|WITH)\b/i;
const WRITE_TYPES = new Set(['INSERT', 'UPDATE', 'UPSERT', 'DELETE', 'BULKUPDATE', 'BULKDELETE']);

/**
 * Makes every `sequelize.transaction(...)` name the current actor first, and
 * runs a write made outside any transaction while someone acts in a
 * transaction of its own, so that it is named too.
 */
export function stampTransactions(sequelize: Sequelize): void {
  const begin = sequelize.transaction.bind(sequelize) as (options?: TransactionOptions, cb?: (t: Transaction) => Promise<unknown>) => Promise<unknown>;
  const wrapped = async (a?: TransactionOptions | ((t: Transaction) => Promise<unknown>), b?: (t: Transaction) => Promise<unknown>) => {
    const [options, cb] = typeof a === 'function' ? [{}, a] : [a ?? {}, b];
    if (!cb) {
      const t = (await begin(options)) as Transaction;
      await stampActor(sequelize, t);
      return t;
    }
    return begin(options, async (t) => {
      await stampActor(sequelize, t);
      return cb(t);
    });
  };
  sequelize.transaction = wrapped as unknown as Sequelize['transaction'];

  const query = sequelize.query.bind(sequelize) as (sql: unknown, options?: { transaction?: Transaction | null; type?: string }) => Promise<unknown>;
  const named = (sql: unknown, options?: { transaction?: Transaction | null; type?: string }) => {
    const text = typeof sql === 'string' ? sql : ((sql as { query?: string } | null)?.query ?? '');
    const writes = WRITE.test(text) || (options?.type !== undefined && WRITE_TYPES.has(options.type));
    if (options?.transaction || !writes || !currentActor()) return query(sql, options);
    return wrapped(async (t) => query(sql, { ...options, transaction: t }));
  };
  sequelize.query = named as unknown as Sequelize['query'];
}
