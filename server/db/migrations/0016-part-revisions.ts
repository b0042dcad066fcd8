import type { QueryInterface } from 'sequelize';

/**
 * A part's file revisions. A new file for a part is stored as a new part row
 * (its own file, sizes and measurements) numbered one more than the one it
 * replaces and pointing to the first; the replaced row names its successor.
 * Request lines and plans that used the old row keep it, so builds already
 * planned keep the file they used; the library shows only the newest.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`ALTER TABLE parts
                 ADD COLUMN revision INTEGER NOT NULL DEFAULT 1 CHECK (revision >= 1),
                 ADD COLUMN first_revision_id UUID REFERENCES parts(id) ON DELETE SET NULL,
                 ADD COLUMN superseded_by UUID REFERENCES parts(id) ON DELETE SET NULL`);
    await run('CREATE INDEX parts_first_revision ON parts (first_revision_id) WHERE first_revision_id IS NOT NULL');
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('ALTER TABLE parts DROP COLUMN superseded_by, DROP COLUMN first_revision_id, DROP COLUMN revision');
}
