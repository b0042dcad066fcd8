import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Powder stock: per material a row of the lab's powder rules (also the row a
 * movement locks, so two movements on one material queue up), fresh lots,
 * the ledger of movements (the stock is their sum), melt-flow checks of the
 * reused powder with the lead's release, and the shortage notices that make
 * the reorder e-mail go once per shortage.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    const user = { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' } as const;
    const lab = { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' } as const;
    const material = { type: DataTypes.UUID, allowNull: false, references: { model: 'materials', key: 'id' }, onDelete: 'CASCADE' } as const;
    const stamp = { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW } as const;

    await q.createTable(
      'powder_materials',
      {
        material_id: { ...material, primaryKey: true },
        lab_id: lab,
        max_mean_age_builds: { type: DataTypes.DOUBLE, allowNull: false },
        min_refresh_ratio: { type: DataTypes.DOUBLE, allowNull: false },
        min_mvr_cm3_per_10min: { type: DataTypes.DOUBLE },
        reorder_level_kg: { type: DataTypes.DOUBLE, allowNull: false },
        lead_time_days: { type: DataTypes.INTEGER, allowNull: false },
        updated_by: user,
        created_at: stamp,
        updated_at: stamp,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE powder_materials ADD CONSTRAINT powder_materials_rules CHECK (
         max_mean_age_builds > 0 AND min_refresh_ratio BETWEEN 0 AND 1 AND (min_mvr_cm3_per_10min IS NULL OR min_mvr_cm3_per_10min > 0)
         AND reorder_level_kg >= 0 AND lead_time_days BETWEEN 0 AND 365)`,
      { transaction },
    );

    await q.createTable(
      'powder_lots',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: lab,
        material_id: material,
        code: { type: DataTypes.TEXT, allowNull: false },
        maker_lot: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        received_on: { type: DataTypes.DATEONLY, allowNull: false },
        expires_on: { type: DataTypes.DATEONLY },
        note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        created_by: user,
        created_at: stamp,
      },
      { transaction },
    );
    // A lot code names one lot of a material; the same code for another material is another lot.
    await q.addIndex('powder_lots', ['material_id', 'code'], { unique: true, name: 'powder_lots_code', transaction });

    await q.createTable(
      'powder_movements',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        // The order of bookkeeping (the mean age is a running mix): `at` may be backdated, this never is.
        seq: { type: DataTypes.BIGINT, autoIncrement: true, allowNull: false, unique: true },
        lab_id: lab,
        material_id: material,
        // The fresh lot moved; null for the reused pool.
        lot_id: { type: DataTypes.UUID, references: { model: 'powder_lots', key: 'id' }, onDelete: 'CASCADE' },
        kind: { type: DataTypes.TEXT, allowNull: false },
        delta_kg: { type: DataTypes.DOUBLE, allowNull: false },
        run_id: { type: DataTypes.UUID, references: { model: 'runs', key: 'id' }, onDelete: 'SET NULL' },
        plan_id: { type: DataTypes.UUID, references: { model: 'plans', key: 'id' }, onDelete: 'SET NULL' },
        // A count: what was on the shelf; the movement is the difference from the book.
        counted_kg: { type: DataTypes.DOUBLE },
        // At breakout: cake powder thrown away rather than sieved back (it never re-entered the stock).
        cake_discarded_kg: { type: DataTypes.DOUBLE },
        reason: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        // The reused pool's mean age (builds) after this movement, and for a load the fill's mean age.
        pool_age_after: { type: DataTypes.DOUBLE },
        fill_age_builds: { type: DataTypes.DOUBLE },
        at: { type: DataTypes.DATE, allowNull: false },
        by_user: user,
        created_at: stamp,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE powder_movements
         ADD CONSTRAINT powder_movements_kind CHECK (kind IN ('received', 'loaded', 'recovered', 'discarded', 'adjusted')),
         ADD CONSTRAINT powder_movements_sign CHECK (
           (kind = 'received' AND delta_kg > 0 AND lot_id IS NOT NULL) OR
           (kind = 'loaded' AND delta_kg < 0) OR
           (kind = 'recovered' AND delta_kg >= 0 AND lot_id IS NULL) OR
           (kind = 'discarded' AND delta_kg < 0) OR
           (kind = 'adjusted' AND counted_kg >= 0)),
         ADD CONSTRAINT powder_movements_cake CHECK (cake_discarded_kg IS NULL OR cake_discarded_kg >= 0)`,
      { transaction },
    );
    await q.addIndex('powder_movements', ['material_id', 'at'], { transaction });
    await q.addIndex('powder_movements', ['lot_id'], { transaction });
    await q.addIndex('powder_movements', ['run_id'], { transaction });
    // One breakout record a run.
    await q.sequelize.query(`CREATE UNIQUE INDEX powder_movements_one_recovery ON powder_movements (run_id) WHERE kind = 'recovered'`, { transaction });

    await q.createTable(
      'powder_checks',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: lab,
        material_id: material,
        mvr_cm3_per_10min: { type: DataTypes.DOUBLE, allowNull: false },
        test_temp_c: { type: DataTypes.DOUBLE },
        test_load_kg: { type: DataTypes.DOUBLE },
        // The threshold in force when measured, and the verdict against it.
        threshold_cm3_per_10min: { type: DataTypes.DOUBLE },
        passed: { type: DataTypes.BOOLEAN, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        measured_at: { type: DataTypes.DATE, allowNull: false },
        measured_by: user,
        released_at: { type: DataTypes.DATE },
        released_by: user,
        release_reason: { type: DataTypes.TEXT },
        created_at: stamp,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE powder_checks ADD CONSTRAINT powder_checks_mvr CHECK (mvr_cm3_per_10min > 0),
         ADD CONSTRAINT powder_checks_release CHECK ((released_at IS NULL) = (release_reason IS NULL))`,
      { transaction },
    );
    await q.addIndex('powder_checks', ['material_id', 'measured_at'], { transaction });

    await q.createTable(
      'powder_shortages',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: lab,
        material_id: material,
        below_at: { type: DataTypes.DATE, allowNull: false },
        needed_kg: { type: DataTypes.DOUBLE, allowNull: false },
        opened_at: stamp,
        mailed_at: { type: DataTypes.DATE },
        closed_at: { type: DataTypes.DATE },
      },
      { transaction },
    );
    // At most one open shortage a material: the e-mail goes when it opens, not on every look.
    await q.sequelize.query(`CREATE UNIQUE INDEX powder_shortages_open ON powder_shortages (material_id) WHERE closed_at IS NULL`, { transaction });
  });
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['powder_shortages', 'powder_checks', 'powder_movements', 'powder_lots', 'powder_materials']) await q.dropTable(t);
}
