import type { QueryInterface } from 'sequelize';

/**
 * Accounts and the lab's record:
 * - sessions remember when they began, when they were last used, the browser
 *   and address that opened them, and whether they must be replaced by a new
 *   id on their next use (after the member's roles changed);
 * - password reset tokens, stored as hashes, single-use and expiring;
 * - rate-limit counters shared by every server process;
 * - the audit log: append-only (a trigger refuses UPDATE, DELETE and
 *   TRUNCATE), filled by row triggers on the lab's tables inside the same
 *   transaction as each change, with the acting user taken from the
 *   transaction's `sinterstack.actor` setting;
 * - the lab setting "a plan needs a second person's approval" (NULL: the
 *   default, on when the lab has more than one lead).
 */
const AUDITED: Array<[table: string, kind: string]> = [
  ['labs', 'lab'],
  ['memberships', 'member'],
  ['invites', 'invite'],
  ['machines', 'machine'],
  ['materials', 'material'],
  ['parts', 'part'],
  ['requests', 'request'],
  ['plans', 'plan'],
  ['runs', 'run'],
];

export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`ALTER TABLE user_sessions
                 ADD COLUMN created_at TIMESTAMPTZ NOT NULL DEFAULT now(),
                 ADD COLUMN last_seen_at TIMESTAMPTZ NOT NULL DEFAULT now(),
                 ADD COLUMN user_agent TEXT,
                 ADD COLUMN ip_address TEXT,
                 ADD COLUMN rotate BOOLEAN NOT NULL DEFAULT false`);
    await run(`CREATE TABLE password_resets (
                 token_hash TEXT PRIMARY KEY,
                 user_id TEXT NOT NULL REFERENCES users(id) ON DELETE CASCADE,
                 expires_at TIMESTAMPTZ NOT NULL,
                 used_at TIMESTAMPTZ,
                 created_at TIMESTAMPTZ NOT NULL DEFAULT now())`);
    await run('CREATE INDEX password_resets_user ON password_resets (user_id)');
    await run(`CREATE TABLE rate_limit_hits (
                 key TEXT PRIMARY KEY,
                 hits INTEGER NOT NULL,
                 reset_at TIMESTAMPTZ NOT NULL)`);
    await run('CREATE INDEX rate_limit_hits_reset ON rate_limit_hits (reset_at)');
    await run('ALTER TABLE labs ADD COLUMN second_approval BOOLEAN');

    await run(`CREATE TABLE audit_log (
                 id BIGSERIAL PRIMARY KEY,
                 lab_id UUID,
                 at TIMESTAMPTZ NOT NULL DEFAULT clock_timestamp(),
                 actor_id TEXT,
                 kind TEXT NOT NULL,
                 action TEXT NOT NULL,
                 target_id TEXT,
                 target_label TEXT,
                 before JSONB,
                 after JSONB)`);
    await run('CREATE INDEX audit_log_lab_at ON audit_log (lab_id, at DESC, id DESC)');
    await run(`CREATE FUNCTION audit_log_refuse() RETURNS trigger LANGUAGE plpgsql AS $$
               BEGIN
                 RAISE EXCEPTION 'audit_log is append-only: % refused', TG_OP USING ERRCODE = 'insufficient_privilege';
               END $$`);
    await run('CREATE TRIGGER audit_log_no_update BEFORE UPDATE OR DELETE ON audit_log FOR EACH ROW EXECUTE FUNCTION audit_log_refuse()');
    await run('CREATE TRIGGER audit_log_no_truncate BEFORE TRUNCATE ON audit_log FOR EACH STATEMENT EXECUTE FUNCTION audit_log_refuse()');
    await run('REVOKE UPDATE, DELETE, TRUNCATE ON audit_log FROM PUBLIC');

    // A value kept in an entry: long ones (drafts, meshes, checklists) are named by their size only.
    await run(`CREATE FUNCTION audit_short(v JSONB) RETURNS JSONB LANGUAGE sql IMMUTABLE AS $$
                 SELECT CASE WHEN length(v::text) > 1000 THEN to_jsonb('(' || length(v::text) || ' characters, not kept)') ELSE v END $$`);
    await run(`CREATE FUNCTION audit_row_change() RETURNS trigger LANGUAGE plpgsql AS $$
               DECLARE
                 old_j JSONB := CASE WHEN TG_OP <> 'INSERT' THEN to_jsonb(OLD) END;
                 new_j JSONB := CASE WHEN TG_OP <> 'DELETE' THEN to_jsonb(NEW) END;
                 row_j JSONB := coalesce(new_j, old_j);
                 hidden TEXT[] := ARRAY['token_hash', 'password_hash', 'created_at', 'updated_at', 'version'];
                 before_j JSONB;
                 after_j JSONB;
                 actor TEXT := nullif(current_setting('sinterstack.actor', true), '');
                 target TEXT := row_j->>'id';
                 label TEXT := coalesce(row_j->>'name', row_j->>'title', row_j->>'email');
               BEGIN
                 IF TG_OP = 'UPDATE' THEN
                   SELECT jsonb_object_agg(n.key, audit_short(o.value)), jsonb_object_agg(n.key, audit_short(n.value))
                     INTO before_j, after_j
                     FROM jsonb_each(new_j) n JOIN jsonb_each(old_j) o ON o.key = n.key
                    WHERE n.value IS DISTINCT FROM o.value AND NOT (n.key = ANY (hidden));
                   IF before_j IS NULL THEN RETURN NULL; END IF;
                 ELSIF TG_OP = 'INSERT' THEN
                   SELECT jsonb_object_agg(key, audit_short(value)) INTO after_j FROM jsonb_each(new_j) WHERE NOT (key = ANY (hidden));
                   actor := coalesce(actor, row_j->>'created_by', row_j->>'uploaded_by', row_j->>'started_by', row_j->>'invited_by');
                 ELSE
                   SELECT jsonb_object_agg(key, audit_short(value)) INTO before_j FROM jsonb_each(old_j) WHERE NOT (key = ANY (hidden));
                 END IF;
                 IF TG_TABLE_NAME = 'memberships' THEN
                   target := row_j->>'user_id';
                   SELECT u.name INTO label FROM users u WHERE u.id = row_j->>'user_id';
                 END IF;
                 INSERT INTO audit_log (lab_id, actor_id, kind, action, target_id, target_label, before, after)
                 VALUES (CASE WHEN TG_TABLE_NAME = 'labs' THEN (row_j->>'id')::uuid ELSE (row_j->>'lab_id')::uuid END,
                         actor, TG_ARGV[0],
                         CASE TG_OP WHEN 'INSERT' THEN 'created' WHEN 'UPDATE' THEN 'changed' ELSE 'deleted' END,
                         target, label, before_j, after_j);
                 RETURN NULL;
               END $$`);
    for (const [table, kind] of AUDITED) {
      await run(`CREATE TRIGGER ${table}_audit AFTER INSERT OR UPDATE OR DELETE ON ${table}
                   FOR EACH ROW EXECUTE FUNCTION audit_row_change('${kind}')`);
    }
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    for (const [table] of AUDITED) await run(`DROP TRIGGER ${table}_audit ON ${table}`);
    await run('DROP FUNCTION audit_row_change()');
    await run('DROP FUNCTION audit_short(JSONB)');
    await run('DROP TABLE audit_log');
    await run('DROP FUNCTION audit_log_refuse()');
    await run('ALTER TABLE labs DROP COLUMN second_approval');
    await run('DROP TABLE rate_limit_hits');
    await run('DROP TABLE password_resets');
    await run(`ALTER TABLE user_sessions DROP COLUMN rotate, DROP COLUMN ip_address, DROP COLUMN user_agent,
                 DROP COLUMN last_seen_at, DROP COLUMN created_at`);
  });
}
