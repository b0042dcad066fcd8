import type { Transaction } from 'sequelize';

/** The bytes to store: an upload's temp file (streamed where the driver can) or bytes in memory. */
export type FileSource = { path: string; sizeBytes: number } | { bytes: Uint8Array };

/**
 * Files kept by their SHA-256 (lower-case hex). Each part that uses a file
 * holds one reference; the bytes are written on the first reference and
 * removed when the last one goes, so the same upload twice is stored once and
 * a file shared by two parts survives deleting one of them.
 *
 * `put` and `delete` take the caller's transaction: the reference count (and,
 * in PostgreSQL, the bytes) commit or roll back with the rows that use them.
 */
export interface FileStorage {
  readonly driver: 'postgres' | 's3';
  /** Adds `refs` references (default 1); `created` says whether the bytes were new. */
  put(key: string, source: FileSource, opts: { transaction: Transaction; refs?: number }): Promise<{ created: boolean }>;
  /** The stored bytes, or null when nothing is stored under `key`. */
  get(key: string): Promise<Buffer | null>;
  /** Drops `refs` references (default 1); at zero the bytes are removed once the transaction commits. */
  delete(key: string, opts: { transaction: Transaction; refs?: number }): Promise<void>;
  /**
   * After the transaction of a `put` that answered `created` rolled back:
   * removes bytes that were written outside the database and that no row
   * points at. Nothing to do when the bytes live in the database.
   */
  discard(key: string): Promise<void>;
}

/** Where objects go when the S3 driver is chosen; separate so tests can make it fail. */
export interface ObjectStore {
  putObject(key: string, source: FileSource): Promise<void>;
  getObject(key: string): Promise<Buffer | null>;
  deleteObject(key: string): Promise<void>;
}

export const SHA256_HEX = /^[0-9a-f]{64}$/;
