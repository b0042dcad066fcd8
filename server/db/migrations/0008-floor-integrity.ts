import type { QueryInterface } from 'sequelize';

/**
 * The floor's integrity and its record:
 * - at most one build printing on a machine at a time (a partial unique index
 *   behind the machine-row lock the start takes);
 * - each temperature reading's check against the cooling model, and a lead's
 *   acceptance of a reading the model cannot explain, with the reason;
 * - the run's estimate split into per-layer and scan time (what calibration
 *   fits separately) and a lead's choice to leave a run out of calibration,
 *   or take it back in, with the reason.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`CREATE UNIQUE INDEX runs_one_printing_per_machine ON runs (machine_id)
                 WHERE print_ended_at IS NULL AND aborted_at IS NULL`);
    await run(`ALTER TABLE runs
                 ADD COLUMN estimated_preheat_hours DOUBLE PRECISION,
                 ADD COLUMN estimated_layer_hours DOUBLE PRECISION,
                 ADD COLUMN estimated_scan_hours DOUBLE PRECISION,
                 ADD COLUMN calibration_choice TEXT,
                 ADD COLUMN calibration_reason TEXT,
                 ADD COLUMN calibration_by TEXT REFERENCES users(id) ON DELETE SET NULL,
                 ADD COLUMN calibration_at TIMESTAMPTZ,
                 ADD CONSTRAINT runs_calibration_choice CHECK (calibration_choice IS NULL OR calibration_choice IN ('exclude', 'include')),
                 ADD CONSTRAINT runs_calibration_reason CHECK (calibration_choice IS NULL OR calibration_reason IS NOT NULL)`);
    await run(`ALTER TABLE run_readings
                 ADD COLUMN coolest_c DOUBLE PRECISION,
                 ADD COLUMN check_status TEXT NOT NULL DEFAULT 'explained',
                 ADD COLUMN confirmed_by_reading_id UUID REFERENCES run_readings(id) ON DELETE SET NULL,
                 ADD COLUMN accepted_by TEXT REFERENCES users(id) ON DELETE SET NULL,
                 ADD COLUMN accepted_reason TEXT,
                 ADD COLUMN accepted_at TIMESTAMPTZ,
                 ADD CONSTRAINT run_readings_check_status CHECK (check_status IN ('explained', 'unexplained', 'confirmed', 'accepted')),
                 ADD CONSTRAINT run_readings_accepted CHECK (check_status <> 'accepted' OR (accepted_by IS NOT NULL AND accepted_reason IS NOT NULL))`);
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const run = (sql: string) => q.sequelize.query(sql, { transaction });
    await run(`ALTER TABLE run_readings DROP COLUMN accepted_at, DROP COLUMN accepted_reason, DROP COLUMN accepted_by,
                 DROP COLUMN confirmed_by_reading_id, DROP COLUMN check_status, DROP COLUMN coolest_c`);
    await run(`ALTER TABLE runs DROP COLUMN calibration_at, DROP COLUMN calibration_by, DROP COLUMN calibration_reason,
                 DROP COLUMN calibration_choice, DROP COLUMN estimated_scan_hours, DROP COLUMN estimated_layer_hours, DROP COLUMN estimated_preheat_hours`);
    await run('DROP INDEX runs_one_printing_per_machine');
  });
}
