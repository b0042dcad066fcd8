import type { QueryInterface } from 'sequelize';

/** The currency a lab's rates and prices are in (an ISO 4217 code), shown beside every amount of money. */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.query("ALTER TABLE labs ADD COLUMN currency CHAR(3) NOT NULL DEFAULT 'EUR' CHECK (currency ~ '^[A-Z]{3}$')");
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.query('ALTER TABLE labs DROP COLUMN currency');
}
