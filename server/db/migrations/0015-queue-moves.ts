import type { QueryInterface } from 'sequelize';

/**
 * A lead's reordering of a machine's queue, kept with the order before and
 * after it, so the lead can undo it shortly afterwards (and the record shows
 * who moved what, and when).
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`CREATE TABLE queue_moves (
                 id UUID PRIMARY KEY DEFAULT gen_random_uuid(),
                 lab_id UUID NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
                 machine_id UUID NOT NULL REFERENCES machines(id) ON DELETE CASCADE,
                 user_id TEXT REFERENCES users(id) ON DELETE SET NULL,
                 before_ids UUID[] NOT NULL,
                 after_ids UUID[] NOT NULL,
                 created_at TIMESTAMPTZ NOT NULL DEFAULT now(),
                 undone_at TIMESTAMPTZ)`);
    await run('CREATE INDEX queue_moves_machine ON queue_moves (machine_id, created_at DESC)');
    // In the lab's audit log like every other record of the lab (the trigger function is the audit log's own).
    await run(`CREATE TRIGGER queue_moves_audit AFTER INSERT OR UPDATE OR DELETE ON queue_moves
                 FOR EACH ROW EXECUTE FUNCTION audit_row_change('queue')`);
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('DROP TABLE queue_moves');
}
