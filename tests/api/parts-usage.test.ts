import { startTestApp } from '../helpers/app';
import { createPlan, labWithProfiles, makeRequest } from '../helpers/plans';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

test('the library counts the builds a part is in, and forgets a cancelled one', async () => {
  const lab = await labWithProfiles(running, 'usage');
  const req = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [
    { name: 'clip', sizeMm: [20, 10, 5], quantity: 10 },
    { name: 'housing', sizeMm: [60, 40, 30], quantity: 2 },
  ]);
  const [clip, housing] = req.lines;
  const timesUsed = async () => {
    const res = await lab.agent.get(`/api/labs/${lab.labId}/parts?sort=name`);
    return Object.fromEntries(res.body.items.map((p: { name: string; timesUsed: number }) => [p.name, p.timesUsed]));
  };
  expect(await timesUsed()).toEqual({ clip: 0, housing: 0 });
  const first = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, [{ id: clip.id, quantity: 4 }]);
  await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, [{ id: clip.id, quantity: 3 }, { id: housing.id, quantity: 1 }]);
  expect(await timesUsed()).toEqual({ clip: 2, housing: 1 });
  expect((await lab.agent.post(`/api/labs/${lab.labId}/plans/${first.id}/cancel`).send({})).status).toBe(200);
  expect(await timesUsed()).toEqual({ clip: 1, housing: 1 });
  const sorted = await lab.agent.get(`/api/labs/${lab.labId}/parts?sort=-timesUsed`);
  expect(sorted.status).toBe(200);
});
