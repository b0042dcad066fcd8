import { DataTypes, type QueryInterface } from 'sequelize';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};

/**
 * Stored files (content-addressed by SHA-256, shared by every part made from
 * the same bytes), parts, requests and their lines.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    await q.createTable(
      'files',
      {
        key: { type: DataTypes.TEXT, primaryKey: true },
        size_bytes: { type: DataTypes.BIGINT, allowNull: false },
        // Where the bytes are: here (`data`) or in the object store under `key`.
        location: { type: DataTypes.TEXT, allowNull: false },
        data: { type: DataTypes.BLOB },
        // Parts that point at this file; the row (and its object) goes when it reaches 0.
        ref_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE files
         ADD CONSTRAINT files_key_sha256 CHECK (key ~ '^[0-9a-f]{64}$'),
         ADD CONSTRAINT files_location CHECK (location IN ('postgres', 's3')),
         ADD CONSTRAINT files_data_here CHECK ((location = 'postgres') = (data IS NOT NULL)),
         ADD CONSTRAINT files_ref_count CHECK (ref_count >= 0)`,
      { transaction },
    );

    await q.createTable(
      'parts',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
        name: { type: DataTypes.TEXT, allowNull: false },
        tags: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        file_key: { type: DataTypes.TEXT, allowNull: false, references: { model: 'files', key: 'key' }, onDelete: 'RESTRICT' },
        file_name: { type: DataTypes.TEXT, allowNull: false },
        file_format: { type: DataTypes.TEXT, allowNull: false },
        // How the file was read, so a viewer can read it the same way.
        file_unit: { type: DataTypes.TEXT, allowNull: false },
        file_split: { type: DataTypes.BOOLEAN, allowNull: false },
        file_part_index: { type: DataTypes.INTEGER, allowNull: false },
        // Size as uploaded and after the stored rotation (quarter turns about x, then y, then z).
        uploaded_size_mm: { type: DataTypes.ARRAY(DataTypes.DOUBLE), allowNull: false },
        rotation_deg: { type: DataTypes.ARRAY(DataTypes.INTEGER), allowNull: false, defaultValue: [0, 0, 0] },
        size_x_mm: { type: DataTypes.DOUBLE, allowNull: false },
        size_y_mm: { type: DataTypes.DOUBLE, allowNull: false },
        size_z_mm: { type: DataTypes.DOUBLE, allowNull: false },
        volume_mm3: { type: DataTypes.DOUBLE, allowNull: false },
        area_mm2: { type: DataTypes.DOUBLE, allowNull: false },
        triangles: { type: DataTypes.INTEGER, allowNull: false },
        watertight: { type: DataTypes.BOOLEAN, allowNull: false },
        metrics: { type: DataTypes.JSONB, allowNull: false },
        warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        orientation: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'any' },
        default_material_id: { type: DataTypes.UUID, references: { model: 'materials', key: 'id' }, onDelete: 'SET NULL' },
        uploaded_by: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        ...timestamps,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE parts
         ADD CONSTRAINT parts_orientation CHECK (orientation IN ('any', 'keep_up', 'fixed')),
         ADD CONSTRAINT parts_format CHECK (file_format IN ('stl', 'obj', '3mf'))`,
      { transaction },
    );
    await q.addIndex('parts', ['lab_id', 'created_at'], { transaction });
    await q.addIndex('parts', ['file_key'], { transaction });

    await q.createTable(
      'requests',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
        title: { type: DataTypes.TEXT, allowNull: false },
        // Null only when a lead later deleted the material.
        material_id: { type: DataTypes.UUID, references: { model: 'materials', key: 'id' }, onDelete: 'SET NULL' },
        due_date: { type: DataTypes.DATEONLY, allowNull: false },
        priority: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'normal' },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'open' },
        created_by: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        ...timestamps,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE requests
         ADD CONSTRAINT requests_priority CHECK (priority IN ('low', 'normal', 'high', 'urgent')),
         ADD CONSTRAINT requests_status CHECK (status IN ('open', 'cancelled', 'done'))`,
      { transaction },
    );
    await q.addIndex('requests', ['lab_id', 'status', 'due_date'], { transaction });

    await q.createTable(
      'request_lines',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        request_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'requests', key: 'id' }, onDelete: 'CASCADE' },
        part_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'parts', key: 'id' }, onDelete: 'RESTRICT' },
        position: { type: DataTypes.INTEGER, allowNull: false },
        quantity: { type: DataTypes.INTEGER, allowNull: false },
        // Filled in by build plans and finished builds.
        planned_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        printed_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        ...timestamps,
      },
      { transaction },
    );
    await q.sequelize.query(
      `ALTER TABLE request_lines
         ADD CONSTRAINT request_lines_quantity CHECK (quantity BETWEEN 1 AND 100000),
         ADD CONSTRAINT request_lines_counts CHECK (planned_count >= 0 AND printed_count >= 0)`,
      { transaction },
    );
    await q.addIndex('request_lines', ['request_id', 'position'], { unique: true, transaction });
    await q.addIndex('request_lines', ['part_id'], { transaction });
  });
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['request_lines', 'requests', 'parts', 'files']) await q.dropTable(t);
}
