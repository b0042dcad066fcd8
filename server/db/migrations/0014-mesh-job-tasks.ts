import type { QueryInterface } from 'sequelize';

/**
 * The job queue also slices kept layouts: a job has a kind (`measure` for an
 * upload, `layout` for the sections of a layout being kept), and a layout's
 * one row in `mesh_job_files` carries what to slice (`task`: the parts' file
 * keys and placements) instead of a file, and the sections once sliced
 * (`result`).
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`ALTER TABLE mesh_jobs ADD COLUMN kind TEXT NOT NULL DEFAULT 'measure' CHECK (kind IN ('measure', 'layout'))`);
    await run('ALTER TABLE mesh_job_files ADD COLUMN task JSONB, ADD COLUMN result JSONB');
    // The unnamed check "an unfinished row has a file" becomes "a file or a task".
    await run(`DO $$
               DECLARE c text;
               BEGIN
                 SELECT conname INTO c FROM pg_constraint
                  WHERE conrelid = 'mesh_job_files'::regclass AND contype = 'c' AND pg_get_constraintdef(oid) LIKE '%file_key IS NOT NULL%';
                 IF c IS NOT NULL THEN EXECUTE format('ALTER TABLE mesh_job_files DROP CONSTRAINT %I', c); END IF;
               END $$`);
    await run(`ALTER TABLE mesh_job_files ADD CONSTRAINT mesh_job_files_input
                 CHECK (state IN ('done', 'rejected') OR file_key IS NOT NULL OR task IS NOT NULL)`);
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`DELETE FROM mesh_jobs WHERE kind = 'layout'`);
    await run('ALTER TABLE mesh_job_files DROP CONSTRAINT mesh_job_files_input');
    await run(`ALTER TABLE mesh_job_files ADD CHECK (state IN ('done', 'rejected') OR file_key IS NOT NULL)`);
    await run('ALTER TABLE mesh_job_files DROP COLUMN task, DROP COLUMN result');
    await run('ALTER TABLE mesh_jobs DROP COLUMN kind');
  });
}
