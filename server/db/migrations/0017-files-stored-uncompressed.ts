import type { QueryInterface } from 'sequelize';

/**
 * Stored file bytes kept out of line and uncompressed (EXTERNAL), so that a
 * slice of a large file is read without decompressing everything before it:
 * the store reads large files a slice at a time. Mesh files gain little from
 * PostgreSQL's compression (binary STL is mostly floats; 3MF is a ZIP
 * already). Applies to values written from now on; older ones read the same.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.query('ALTER TABLE files ALTER COLUMN data SET STORAGE EXTERNAL');
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('ALTER TABLE files ALTER COLUMN data SET STORAGE EXTENDED');
}
