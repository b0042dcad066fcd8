import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * A plan's run on the machine: when each stage began, the pre-print and
 * finishing checklists, the powder loaded, the temperature readings while
 * cooling, the per-line counts of good and failed parts, and the actual
 * hours beside the estimated ones (what calibration fits).
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    await q.createTable(
      'runs',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        // One run a plan: a second start is refused by the plan's status and, failing that, by this key.
        plan_id: { type: DataTypes.UUID, allowNull: false, unique: true, references: { model: 'plans', key: 'id' }, onDelete: 'CASCADE' },
        lab_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
        machine_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'machines', key: 'id' }, onDelete: 'NO ACTION' },
        layout_id: { type: DataTypes.UUID, references: { model: 'layouts', key: 'id' }, onDelete: 'SET NULL' },
        checklist: { type: DataTypes.JSONB, allowNull: false },
        fresh_powder_loaded_kg: { type: DataTypes.DOUBLE, allowNull: false },
        reused_powder_loaded_kg: { type: DataTypes.DOUBLE, allowNull: false },
        started_at: { type: DataTypes.DATE, allowNull: false },
        started_by: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        print_ended_at: { type: DataTypes.DATE },
        left_machine_at: { type: DataTypes.DATE },
        breakout_at: { type: DataTypes.DATE },
        finishing_at: { type: DataTypes.DATE },
        done_at: { type: DataTypes.DATE },
        aborted_at: { type: DataTypes.DATE },
        abort_reason: { type: DataTypes.TEXT },
        finishing_checklist: { type: DataTypes.JSONB },
        // The estimate the run was started with, and the factors it was made with, so a fit never compounds them.
        estimated_print_hours: { type: DataTypes.DOUBLE, allowNull: false },
        estimated_cooling_hours: { type: DataTypes.DOUBLE, allowNull: false },
        print_time_scale_used: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
        cooling_scale_used: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
        actual_print_hours: { type: DataTypes.DOUBLE },
        actual_cooling_hours: { type: DataTypes.DOUBLE },
        powder_used_kg: { type: DataTypes.DOUBLE },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE runs
         ADD CONSTRAINT runs_powder CHECK (fresh_powder_loaded_kg >= 0 AND reused_powder_loaded_kg >= 0),
         ADD CONSTRAINT runs_hours CHECK ((actual_print_hours IS NULL OR actual_print_hours >= 0) AND (actual_cooling_hours IS NULL OR actual_cooling_hours >= 0))`,
      { transaction },
    );
    await q.addIndex('runs', ['machine_id', 'done_at'], { transaction });
    await q.addIndex('runs', ['lab_id'], { transaction });

    await q.createTable(
      'run_readings',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        run_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'runs', key: 'id' }, onDelete: 'CASCADE' },
        temp_c: { type: DataTypes.DOUBLE, allowNull: false },
        place: { type: DataTypes.TEXT, allowNull: false },
        taken_at: { type: DataTypes.DATE, allowNull: false },
        user_id: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE run_readings
         ADD CONSTRAINT run_readings_temp CHECK (temp_c BETWEEN -50 AND 400),
         ADD CONSTRAINT run_readings_place CHECK (place IN ('machine', 'outside'))`,
      { transaction },
    );
    await q.addIndex('run_readings', ['run_id', 'taken_at'], { transaction });

    await q.createTable(
      'run_lines',
      {
        run_id: { type: DataTypes.UUID, primaryKey: true, references: { model: 'runs', key: 'id' }, onDelete: 'CASCADE' },
        plan_line_id: { type: DataTypes.UUID, primaryKey: true, references: { model: 'plan_lines', key: 'id' }, onDelete: 'CASCADE' },
        request_line_id: { type: DataTypes.UUID, allowNull: false },
        // What the plan held; the parts not counted good went back to the request as open quantity.
        planned_count: { type: DataTypes.INTEGER, allowNull: false },
        good_count: { type: DataTypes.INTEGER, allowNull: false },
        failed_count: { type: DataTypes.INTEGER, allowNull: false },
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE run_lines ADD CONSTRAINT run_lines_counts
         CHECK (good_count >= 0 AND failed_count >= 0 AND good_count + failed_count <= planned_count)`,
      { transaction },
    );
  });
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['run_lines', 'run_readings', 'runs']) await q.dropTable(t);
}
