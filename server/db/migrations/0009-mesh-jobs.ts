import type { QueryInterface } from 'sequelize';

/**
 * Uploads measured on the job queue. A mesh job is one upload; each of its
 * files is measured on its own (one queue job a file). A file's bytes are
 * held in the file store with one reference of the job's own until it is
 * measured, so any worker on any machine can read them. `turn` orders the
 * files fairly across labs; `part_ids` is written in the same transaction as
 * the parts, so a file retried after a lost worker is never stored twice.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`CREATE TABLE mesh_jobs (
                 id UUID PRIMARY KEY,
                 lab_id UUID NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
                 user_id TEXT REFERENCES users(id) ON DELETE SET NULL,
                 state TEXT NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'running', 'done', 'failed')),
                 options JSONB NOT NULL,
                 created_at TIMESTAMPTZ NOT NULL DEFAULT now(),
                 started_at TIMESTAMPTZ,
                 finished_at TIMESTAMPTZ)`);
    await run('CREATE INDEX mesh_jobs_lab ON mesh_jobs (lab_id, created_at)');
    await run(`CREATE TABLE mesh_job_files (
                 id UUID PRIMARY KEY,
                 job_id UUID NOT NULL REFERENCES mesh_jobs(id) ON DELETE CASCADE,
                 lab_id UUID NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
                 position INTEGER NOT NULL,
                 file_name TEXT NOT NULL,
                 file_key TEXT,
                 size_bytes BIGINT NOT NULL DEFAULT 0,
                 turn INTEGER NOT NULL,
                 state TEXT NOT NULL CHECK (state IN ('waiting', 'queued', 'running', 'done', 'rejected')),
                 attempts INTEGER NOT NULL DEFAULT 0,
                 worker TEXT,
                 part_ids UUID[] NOT NULL DEFAULT '{}',
                 rejected JSONB,
                 started_at TIMESTAMPTZ,
                 finished_at TIMESTAMPTZ,
                 CHECK (state <> 'rejected' OR rejected IS NOT NULL),
                 CHECK (state IN ('done', 'rejected') OR file_key IS NOT NULL))`);
    await run('CREATE INDEX mesh_job_files_job ON mesh_job_files (job_id, position)');
    await run(`CREATE INDEX mesh_job_files_pending ON mesh_job_files (lab_id, state, turn) WHERE state IN ('waiting', 'queued', 'running')`);
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    await q.sequelize.query('DROP TABLE mesh_job_files', { transaction });
    await q.sequelize.query('DROP TABLE mesh_jobs', { transaction });
  });
}
