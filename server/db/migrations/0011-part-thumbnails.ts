import type { QueryInterface } from 'sequelize';

/**
 * The part library's pictures, drawn once per stored file, part and turn and
 * kept beside the file (gone with it), so every server answers from the same
 * cache and none draws a picture twice.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.query(`CREATE TABLE part_thumbnails (
                             file_key TEXT NOT NULL REFERENCES files(key) ON DELETE CASCADE,
                             view TEXT NOT NULL,
                             png BYTEA NOT NULL,
                             created_at TIMESTAMPTZ NOT NULL DEFAULT now(),
                             PRIMARY KEY (file_key, view))`);
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('DROP TABLE part_thumbnails');
}
