import { addMember, signUp, startTestApp } from '../helpers/app';
import { labSettingsViewSchema } from '../../shared/schemas/auth';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

test("a lab's currency is an ISO 4217 code a lead sets, every member reads, and that leaves the other settings as they are", async () => {
  const owner = await signUp(running, 'currency');
  const url = `/api/labs/${owner.labId}/settings`;
  const before = labSettingsViewSchema.parse((await owner.agent.get(url)).body);
  expect(before.currency).toBe('EUR');

  // Lower case is read as the code; the approval rule is not touched.
  const set = await owner.agent.patch(url).send({ currency: 'chf' });
  expect(set.status).toBe(200);
  expect(set.body).toMatchObject({ currency: 'CHF', secondApproval: before.secondApproval, secondApprovalSet: before.secondApprovalSet });
  const rule = await owner.agent.patch(url).send({ secondApproval: true });
  expect(rule.body).toMatchObject({ currency: 'CHF', secondApproval: true });

  // ISO 4217 (through the runtime's ICU list): three letters that name no currency, or not three letters, are refused by field.
  for (const currency of ['XQQ', 'EU', 'EURO', '€', 12]) {
    const res = await owner.agent.patch(url).send({ currency });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('currency');
  }
  expect((await owner.agent.patch(url).send({})).status).toBe(400);
  expect((await owner.agent.get(url)).body.currency).toBe('CHF');

  // Every member reads it; only a lead changes it.
  const planner = await addMember(running, owner.agent, owner.labId, ['planner'], 'currency-planner');
  expect((await planner.agent.get(url)).body.currency).toBe('CHF');
  expect((await planner.agent.patch(url).send({ currency: 'USD' })).status).toBe(403);

  // Another lab keeps its own.
  const other = await signUp(running, 'currency-other');
  expect((await other.agent.get(`/api/labs/${other.labId}/settings`)).body.currency).toBe('EUR');
  expect((await other.agent.patch(url).send({ currency: 'USD' })).status).toBe(404);
});
