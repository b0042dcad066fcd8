import { readFile } from 'node:fs/promises';
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import type { StorageConfig } from '../config';
import { AppError } from '../errors';
import { s3ObjectStore } from './s3';
import { SHA256_HEX, type FileSource, type FileStorage, type ObjectStore } from './types';

export type { FileSource, FileStorage, ObjectStore } from './types';
export { sha256Bytes, sha256File } from './hash';

/** The object store did not answer as it should: the upload is not kept. */
export const storageUnavailable = (cause?: unknown) => {
  const err = new AppError(503, 'storage_unavailable', 'The file store is not reachable right now; nothing was saved. Try again shortly.');
  (err as Error & { cause?: unknown }).cause = cause;
  return err;
};

function checkKey(key: string) {
  if (!SHA256_HEX.test(key)) throw new RangeError(`storage key must be a lower-case SHA-256 hex digest, got "${key.slice(0, 80)}"`);
}

async function readSource(source: FileSource): Promise<Buffer> {
  if ('bytes' in source) return Buffer.from(source.bytes.buffer, source.bytes.byteOffset, source.bytes.byteLength);
  return readFile(source.path);
}

/** How much of a stored file one query reads (see readInSlices). */
const READ_SLICE_BYTES = 2 * 1024 * 1024;

const sourceSize = (source: FileSource) => ('bytes' in source ? source.bytes.byteLength : source.sizeBytes);

/**
 * The `files` table is the index of every stored file and holds its reference
 * count in both drivers; with the PostgreSQL driver it also holds the bytes.
 * With the S3 driver the object is written before its row, inside the
 * caller's transaction: when the store fails the transaction fails and no
 * row that would point at a missing object is committed. Rows are read and
 * removed through the StoredFile model; the reference count moves in single
 * SQL statements (added to on conflict, lowered with RETURNING), so two
 * uploads of the same bytes never lose a count.
 */
export function createStorage(db: Database, config: StorageConfig, objects?: ObjectStore): FileStorage {
  const sequelize = db.sequelize;
  const { StoredFile } = db.models;
  const store: ObjectStore | null = config.driver === 's3' ? (objects ?? s3ObjectStore(config)) : null;
  const driver = config.driver;

  /**
   * With an object store, the object and its row change in two places. Every
   * step that writes or removes an object holds a transaction lock on its key
   * until its row is settled, so a rolled-back upload cannot remove an object
   * that a concurrent upload of the same bytes is about to commit.
   */
  /**
   * A file kept in PostgreSQL, read a slice at a time: the driver receives a
   * bytea as text and decodes it on the event loop, and one 20 MB file in one
   * row held a worker's loop for a second or more (with its other files'
   * notices waiting). Slices of READ_SLICE_BYTES, each its own query, let the
   * loop serve everything else between them; base64 is a third less text than
   * the driver's hex. A row changed or removed meanwhile is read as missing.
   * The bytes land in shared memory: handed to a measuring thread they are
   * shared, not cloned (a 20 MB clone cost the posting thread 80 ms on a quiet
   * machine and most of a second on a busy one).
   */
  async function readInSlices(key: string, size: number): Promise<Buffer | null> {
    const out = Buffer.from(new SharedArrayBuffer(size));
    let at = 0;
    do {
      const rows = await sequelize.query<{ part: string | null; size: string }>(
        "SELECT encode(substring(data FROM $2 FOR $3), 'base64') AS part, size_bytes AS size FROM files WHERE key = $1",
        { bind: [key, at + 1, READ_SLICE_BYTES], type: QueryTypes.SELECT },
      );
      const row = rows[0];
      if (!row || row.part === null || Number(row.size) !== size) return null;
      const n = out.write(row.part, at, 'base64');
      if (n === 0 && at < size) return null;
      at += n;
    } while (at < size);
    return out;
  }

  async function lockKey(key: string, transaction: Transaction) {
    await sequelize.query('INSERT INTO file_key_locks (key) VALUES ($1) ON CONFLICT DO NOTHING', { bind: [key], transaction });
    await sequelize.query('SELECT key FROM file_key_locks WHERE key = $1 FOR UPDATE', { bind: [key], transaction });
  }

  /** Removes the object when no row points at it, under the key's lock. */
  async function removeUnreferencedObject(key: string) {
    if (!store) return;
    await sequelize.transaction(async (transaction) => {
      await lockKey(key, transaction);
      if ((await StoredFile.count({ where: { key }, transaction })) === 0) await store.deleteObject(key);
    });
  }

  async function addRefs(key: string, refs: number, transaction: Transaction): Promise<boolean> {
    const rows = await sequelize.query('UPDATE files SET ref_count = ref_count + $1 WHERE key = $2 RETURNING key', {
      bind: [refs, key],
      type: QueryTypes.SELECT,
      transaction,
    });
    return rows.length > 0;
  }

  return {
    driver,

    async put(key, source, { transaction, refs = 1 }) {
      checkKey(key);
      if (store) await lockKey(key, transaction);
      if (await addRefs(key, refs, transaction)) return { created: false };
      const size = sourceSize(source);
      if (store) {
        try {
          await store.putObject(key, source);
        } catch (err) {
          throw storageUnavailable(err);
        }
        // Another upload of the same bytes may have committed meanwhile: count its reference too.
        await sequelize.query(
          `INSERT INTO files (key, size_bytes, location, data, ref_count, created_at) VALUES ($1, $2, 's3', NULL, $3, now())
           ON CONFLICT (key) DO UPDATE SET ref_count = files.ref_count + EXCLUDED.ref_count`,
          { bind: [key, size, refs], transaction },
        );
        return { created: true };
      }
      const bytes = await readSource(source);
      await sequelize.query(
        `INSERT INTO files (key, size_bytes, location, data, ref_count, created_at) VALUES ($1, $2, 'postgres', $3, $4, now())
         ON CONFLICT (key) DO UPDATE SET ref_count = files.ref_count + EXCLUDED.ref_count`,
        { bind: [key, bytes.byteLength, bytes, refs], transaction },
      );
      return { created: true };
    },

    async get(key) {
      if (!SHA256_HEX.test(key)) return null;
      const row = await StoredFile.findByPk(key, { attributes: ['location', 'sizeBytes'] });
      if (!row) return null;
      if (row.location === 'postgres') return readInSlices(key, Number(row.sizeBytes));
      if (!store) throw new AppError(503, 'storage_unavailable', 'This file is kept in object storage, which this server is not configured to reach.');
      try {
        return await store.getObject(key);
      } catch (err) {
        throw storageUnavailable(err);
      }
    },

    async delete(key, { transaction, refs = 1 }) {
      checkKey(key);
      const rows = await sequelize.query<{ ref_count: number; location: string }>(
        'UPDATE files SET ref_count = GREATEST(ref_count - $1, 0) WHERE key = $2 RETURNING ref_count, location',
        { bind: [refs, key], type: QueryTypes.SELECT, transaction },
      );
      const row = rows[0];
      if (!row || row.ref_count > 0) return;
      await StoredFile.destroy({ where: { key, refCount: 0 }, transaction });
      if (row.location === 's3' && store) {
        // The object goes only once the row is gone for good, and only if no
        // new upload of the same bytes has brought the row back.
        transaction.afterCommit(() => {
          void removeUnreferencedObject(key).catch(() => {});
        });
      }
    },

    async discard(key) {
      if (!store || !SHA256_HEX.test(key)) return;
      await removeUnreferencedObject(key).catch(() => {});
    },
  };
}
