import type { QueryInterface } from 'sequelize';

/**
 * The packing density (parts' volume over the powder cake's) below which a
 * plan is flagged at review; 0 turns the flag off.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.query(
    'ALTER TABLE labs ADD COLUMN min_packing_density_percent REAL NOT NULL DEFAULT 8 CHECK (min_packing_density_percent >= 0 AND min_packing_density_percent <= 50)',
  );
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('ALTER TABLE labs DROP COLUMN min_packing_density_percent');
}
