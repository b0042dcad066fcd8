import { boot, type Running } from '../../server/boot';
import { loadConfig } from '../../server/config';
import { connectDatabase, migrate } from '../../server/db';
import { DEMO_LAB_NAME, seedDemoIfEmpty } from '../../server/db/seeders/demo';
import { dropDatabase, ensureCluster, ensureDatabase, type Cluster } from '../../scripts/lib/postgres';
import { parseInstance, validateLayout } from '../../shared/packing';
import { planListQuerySchema } from '../../shared/schemas/plans';

jest.setTimeout(120_000);

// `npm start`'s first start, on a database of its own: the demo lab with a plan waiting for review.
const name = `sinterstack_seed_${process.pid}`;
let cluster: Cluster;
let running: Running;
beforeAll(async () => {
  cluster = await ensureCluster(() => {});
  const url = await ensureDatabase(cluster, name, { fresh: true });
  const db = connectDatabase(url);
  await migrate(db.sequelize);
  await db.close();
  running = await boot(loadConfig({ ...process.env, DATABASE_URL: url, NODE_ENV: 'test' }), () => {});
});
afterAll(async () => {
  await running?.close();
  if (cluster) await dropDatabase(cluster, name);
});

test('the first start seeds the demo lab once, with the urgent request packed and waiting for the lead', async () => {
  expect(await seedDemoIfEmpty(running.db, running.services, { planInReview: true })).toBe(true);
  expect(await seedDemoIfEmpty(running.db, running.services, { planInReview: true })).toBe(false);
  const lab: any = await running.db.models.Lab.findOne({ where: { name: DEMO_LAB_NAME }, raw: true });
  const plans = await running.services.plans.list(lab.id, planListQuerySchema.parse({ status: 'in_review' }));
  expect(plans).toHaveLength(1);
  const plan = await running.services.plans.get(lab.id, plans[0].id);
  expect(plan.lines.every((l) => l.request.priority === 'urgent')).toBe(true);
  expect(plan.chosenLayoutId).toEqual(expect.any(String));
  const layout: any = await running.services.layouts.get(lab.id, plan.id, plan.chosenLayoutId!);
  const parsed = parseInstance(layout.instance);
  if (!parsed.ok) throw new Error('stored instance does not parse');
  expect(validateLayout(parsed.instance, layout.result)).toEqual([]);
  expect(layout.result.unplaced).toEqual([]);
  expect(plan.events.map((e) => e.to)).toEqual(['draft', 'in_review']);
});
