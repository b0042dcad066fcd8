/**
 * Queries on one transaction share one database connection; node-postgres
 * queues a second query sent while the first runs, warns that its next major
 * version will refuse it, and the order of the results is then the driver's
 * business. This test watches every connection and fails when a query is
 * sent to a connection that is still busy, the driver's own condition for
 * the warning (pg/lib/client.js, `_queryQueue.length > 0`).
 */
import pg from 'pg';
import { startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { labWithCrew, queuedPlan, startBody } from './runs-fixtures';

jest.setTimeout(60_000);

let running: Running;
const overlaps: string[] = [];
const original = pg.Client.prototype.query;
beforeAll(async () => {
  running = await startTestApp();
  pg.Client.prototype.query = function (this: pg.Client & { _queryQueue: unknown[]; _activeQuery: unknown }, ...args: unknown[]) {
    if (this._activeQuery || this._queryQueue.length > 0) {
      const q = args[0] as string | { text?: string };
      overlaps.push(String(typeof q === 'string' ? q : q?.text).slice(0, 120));
    }
    return (original as (...a: unknown[]) => unknown).apply(this, args);
  } as typeof original;
});
afterAll(async () => {
  pg.Client.prototype.query = original;
  await running.close();
});

test('starting a run, and reading it back, sends one query at a time on each connection', async () => {
  const lab = await labWithCrew(running, 'serial');
  const { base, estimate } = await queuedPlan(running, lab, [{ name: 'Gear', sizeMm: [30, 30, 8], quantity: 4 }]);
  overlaps.length = 0;
  const started = await lab.operator.agent.post(`${base}/run/advance`).send(startBody(estimate));
  expect(started.status).toBe(200);
  const cooling = await lab.operator.agent.post(`${base}/run/advance`).send({ runId: started.body.id, to: 'cooling' });
  expect(cooling.status).toBe(200);
  expect(overlaps).toEqual([]);
});
