import { DataTypes, type QueryInterface } from 'sequelize';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};

/**
 * Build plans, their lines (request lines and how many of each), their
 * layouts (packings with compact placements and estimates) and the record of
 * every status change.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    await q.createTable(
      'plans',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
        name: { type: DataTypes.TEXT, allowNull: false },
        // NO ACTION rather than RESTRICT: deleting a machine or material that a
        // plan uses still fails, but deleting a whole lab (which cascades to
        // both plans and machines in one statement) does not.
        machine_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'machines', key: 'id' }, onDelete: 'NO ACTION' },
        material_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'materials', key: 'id' }, onDelete: 'NO ACTION' },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'draft' },
        // Optimistic concurrency: every save is UPDATE ... WHERE version = the one read.
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        chosen_layout_id: { type: DataTypes.UUID },
        // Place in its machine's queue once approved; null before and after.
        queue_position: { type: DataTypes.INTEGER },
        // The editor's unsaved work, so that it survives a reload on another device.
        draft: { type: DataTypes.JSONB },
        created_by: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        ...timestamps,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE plans
         ADD CONSTRAINT plans_status CHECK (status IN ('draft', 'in_review', 'changes_requested', 'approved', 'queued',
           'printing', 'cooling', 'breakout', 'finishing', 'done', 'cancelled', 'aborted')),
         ADD CONSTRAINT plans_version CHECK (version >= 1)`,
      { transaction },
    );
    await q.addIndex('plans', ['lab_id', 'status', 'updated_at'], { transaction });
    await q.addIndex('plans', ['machine_id', 'queue_position'], { transaction });
    await q.addIndex('plans', ['material_id'], { transaction });

    await q.createTable(
      'plan_lines',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        plan_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'plans', key: 'id' }, onDelete: 'CASCADE' },
        // A request line only goes while no active plan holds it (its planned
        // count keeps the request from being edited); a cancelled plan's line goes with it.
        request_line_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'request_lines', key: 'id' }, onDelete: 'CASCADE' },
        position: { type: DataTypes.INTEGER, allowNull: false },
        quantity: { type: DataTypes.INTEGER, allowNull: false },
        // Null: the part's own orientation rule.
        orientation: { type: DataTypes.TEXT },
        ...timestamps,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE plan_lines
         ADD CONSTRAINT plan_lines_quantity CHECK (quantity BETWEEN 1 AND 100000),
         ADD CONSTRAINT plan_lines_orientation CHECK (orientation IS NULL OR orientation IN ('any', 'keep_up', 'fixed'))`,
      { transaction },
    );
    await q.addIndex('plan_lines', ['plan_id', 'request_line_id'], { unique: true, transaction });
    await q.addIndex('plan_lines', ['request_line_id'], { transaction });

    await q.createTable(
      'layouts',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        plan_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'plans', key: 'id' }, onDelete: 'CASCADE' },
        label: { type: DataTypes.TEXT, allowNull: false },
        // Seed, spacing, layer height, time limit, objective, margins: what the planner varied.
        settings: { type: DataTypes.JSONB, allowNull: false },
        // The packing instance as the engine read it (defaults applied).
        instance: { type: DataTypes.JSONB, allowNull: false },
        // Which plan lines, quantities and orientation rules it was packed for, to tell when it went stale.
        lines_key: { type: DataTypes.TEXT, allowNull: false },
        result_format: { type: DataTypes.TEXT, allowNull: false },
        // Layout of the `placements` bytes; a reader keeps decoding every older one.
        placements_format: { type: DataTypes.INTEGER, allowNull: false },
        placement_count: { type: DataTypes.INTEGER, allowNull: false },
        // Part ids the placements' part indices point into.
        part_ids: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
        placements: { type: DataTypes.BLOB, allowNull: false },
        // Unplaced counts, height, layers, utilization, elapsed time.
        summary: { type: DataTypes.JSONB, allowNull: false },
        estimate: { type: DataTypes.JSONB, allowNull: false },
        locked: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        created_by: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { transaction },
    );
    await q.addIndex('layouts', ['plan_id', 'created_at'], { transaction });
    await q.sequelize.query(
      `ALTER TABLE plans ADD CONSTRAINT plans_chosen_layout FOREIGN KEY (chosen_layout_id) REFERENCES layouts (id) ON DELETE SET NULL`,
      { transaction },
    );

    await q.createTable(
      'plan_events',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        plan_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'plans', key: 'id' }, onDelete: 'CASCADE' },
        // Null for the plan's creation.
        from_status: { type: DataTypes.TEXT },
        to_status: { type: DataTypes.TEXT, allowNull: false },
        user_id: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        comment: { type: DataTypes.TEXT },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { transaction },
    );
    await q.addIndex('plan_events', ['plan_id', 'created_at'], { transaction });
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('ALTER TABLE plans DROP CONSTRAINT IF EXISTS plans_chosen_layout');
  for (const t of ['plan_events', 'layouts', 'plan_lines', 'plans']) await q.dropTable(t);
}
