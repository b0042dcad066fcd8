import { startTestApp } from '../helpers/app';
import { GEAR } from '../helpers/plans';
import { backdateApproval, labWithCrew, queuedPlan, runIdOf, startBody } from './runs-fixtures';
import { planFlagsViewSchema, type PlanFlagKind } from '../../shared/schemas/review';
import { labSettingsViewSchema } from '../../shared/schemas/auth';
import { demoMaterials } from '../../shared/demo/profiles';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

type Lab = Awaited<ReturnType<typeof labWithCrew>>;

async function flagsOf(lab: Lab, planId: string, kind?: PlanFlagKind) {
  const res = await lab.agent.get(`/api/labs/${lab.labId}/plans/${planId}/flags`);
  expect(res.status).toBe(200);
  const view = planFlagsViewSchema.parse(res.body);
  return kind ? view.flags.filter((f) => f.kind === kind) : view.flags;
}

/** The lab with a second powder, and a copy of the lab that plans in it. */
async function inOtherMaterial(lab: Lab) {
  const material = { ...demoMaterials[1], name: `Other powder of ${lab.labId.slice(0, 6)}` };
  const res = await lab.agent.post(`/api/labs/${lab.labId}/materials`).send(material);
  expect(res.status).toBe(201);
  return { ...lab, materialId: res.body.id as string, material };
}

describe('review flags', () => {
  test("low packing density is flagged against the lab's minimum, which a lead sets and the server checks", async () => {
    const lab = await labWithCrew(running, 'flags-density');
    const settingsUrl = `/api/labs/${lab.labId}/settings`;
    expect(labSettingsViewSchema.parse((await lab.agent.get(settingsUrl)).body).minPackingDensityPercent).toBe(8);

    // Five small gears on a whole chamber floor: a sparse build.
    const sparse = await queuedPlan(running, lab, [{ ...GEAR, quantity: 5 }], { approve: false });
    const [flag] = await flagsOf(lab, sparse.planId, 'low_density');
    expect(flag.message).toMatch(/fills \d+\.\d % of the powder cake with parts, below this lab's minimum of 8\.0 %/);
    const density = flag.details.density as number;
    expect(density).toBeGreaterThan(0);
    expect(density).toBeLessThan(0.08);
    // The figure is the one the numbers show for the chosen layout.
    expect(density).toBeCloseTo(sparse.estimate.powder.packingDensity, 6);

    // A minimum below the plan's density raises nothing; 0 turns the flag off.
    const lower = Math.floor(density * 1000) / 10;
    expect((await lab.agent.patch(settingsUrl).send({ minPackingDensityPercent: lower })).body.minPackingDensityPercent).toBeCloseTo(lower, 5);
    expect(await flagsOf(lab, sparse.planId, 'low_density')).toEqual([]);
    await lab.agent.patch(settingsUrl).send({ minPackingDensityPercent: 0 });
    expect(await flagsOf(lab, sparse.planId, 'low_density')).toEqual([]);

    for (const bad of [-1, 51, '10', null]) {
      const res = await lab.agent.patch(settingsUrl).send({ minPackingDensityPercent: bad });
      expect(res.status).toBe(400);
      expect(res.body.error.field).toBe('minPackingDensityPercent');
    }
    expect((await lab.operator.agent.patch(settingsUrl).send({ minPackingDensityPercent: 20 })).status).toBe(403);
    expect((await lab.agent.get(settingsUrl)).body.minPackingDensityPercent).toBe(0);
  });

  test('a build in another material than the one before it on the machine is flagged; the same material is not', async () => {
    const lab = await labWithCrew(running, 'flags-material');
    const first = await queuedPlan(running, lab, [GEAR], { name: 'Nylon first' });
    const same = await queuedPlan(running, lab, [GEAR], { name: 'Same powder', approve: false });
    expect(await flagsOf(lab, same.planId, 'material_change')).toEqual([]);

    const other = await queuedPlan(running, await inOtherMaterial(lab), [GEAR], { name: 'Other powder', approve: false });
    const [flag] = await flagsOf(lab, other.planId, 'material_change');
    expect(flag.details).toMatchObject({ previousPlanId: first.planId, previousPlanName: 'Nylon first' });
    expect(flag.message).toContain('"Nylon first"');
    expect(flag.message).toMatch(/powder must be changed/);
    // Once queued, the build before it is the one ahead of it in the queue (the same-powder plan was never approved).
    await lab.agent.post(`${other.base}/review`).send({ decision: 'approve' });
    expect((await flagsOf(lab, other.planId, 'material_change'))[0].details.previousPlanId).toBe(first.planId);
  });

  test("with nothing queued before the plan, the machine's last run is the build before it: its material counts, and the latest run's, not an older one's", async () => {
    const lab = await labWithCrew(running, 'flags-last-run', { chamberCount: 1 });
    const other = await inOtherMaterial(lab);
    const HOUR = 3_600_000;
    const iso = (ms: number) => new Date(ms).toISOString();
    const op = lab.operator.agent;
    const advance = async (base: string, body: object) => {
      const res = await op.post(`${base}/run/advance`).send(body);
      if (res.status !== 200) throw new Error(`advance failed: ${res.status} ${JSON.stringify(res.body)}`);
    };

    // An older build in the lab's first powder, run to the end hours ago; the queue is empty afterwards.
    const older = await queuedPlan(running, lab, [GEAR], { name: 'Older nylon run' });
    const printEnd = older.estimate.print.printSeconds * 1000;
    const cooled = printEnd + older.estimate.cooling.coolingSeconds * 1000;
    const t0 = Date.now() - cooled - 3 * HOUR;
    await backdateApproval(running, older.planId, Date.now() - t0 + HOUR);
    await advance(older.base, startBody(older.estimate, iso(t0)));
    const runId = await runIdOf(op, older.base);
    await advance(older.base, { runId, to: 'cooling', at: iso(t0 + printEnd) });
    await advance(older.base, { runId, to: 'breakout', at: iso(t0 + cooled) });
    const counts = older.request.lines.map((l) => ({ requestLineId: l.id, good: 1, failed: 0 }));
    await advance(older.base, { runId, to: 'finishing', at: iso(t0 + cooled + HOUR), counts });
    await advance(older.base, { runId, to: 'done', at: iso(t0 + cooled + 2 * HOUR), finishingChecklist: { powderRemoved: true, blasted: true, inspected: true } });

    const inOther = await queuedPlan(running, other, [GEAR], { name: 'Other waiting', approve: false });
    const afterOlder = await flagsOf(lab, inOther.planId, 'material_change');
    expect(afterOlder).toHaveLength(1);
    expect(afterOlder[0].details).toMatchObject({ previousPlanId: older.planId, previousPlanName: 'Older nylon run', previousMaterial: lab.material.name });
    const sameAsOlder = await queuedPlan(running, lab, [GEAR], { name: 'Nylon waiting', approve: false });
    expect(await flagsOf(lab, sameAsOlder.planId, 'material_change')).toEqual([]);

    // A newer run in the other powder, printing now: it is the last run, so the powders compare with it.
    const newer = await queuedPlan(running, other, [GEAR], { name: 'Newer other run' });
    await advance(newer.base, startBody(newer.estimate));
    expect(await flagsOf(lab, inOther.planId, 'material_change')).toEqual([]);
    const [flag] = await flagsOf(lab, sameAsOlder.planId, 'material_change');
    expect(flag.details).toMatchObject({ previousPlanId: newer.planId, previousPlanName: 'Newer other run', previousMaterial: other.material.name });
    expect(flag.message).toContain('"Newer other run"');
  });

  test("a request due before the queue has the build out of the powder is flagged; one due later is not", async () => {
    const lab = await labWithCrew(running, 'flags-due');
    const late = await queuedPlan(running, lab, [GEAR], { name: 'Overdue', dueDate: '2026-01-05', approve: false });
    const [flag] = await flagsOf(lab, late.planId, 'late_due_date');
    expect(flag.details).toMatchObject({ requestId: late.request.requestId, dueDate: '2026-01-05' });
    expect(Date.parse(flag.details.readyAt as string)).toBeGreaterThan(Date.parse('2026-01-05T23:59:59.999Z'));
    expect(flag.message).toMatch(/is due 2026-01-05, but from the queue of .* this build is expected out of the powder on \d+ \w{3} \d\d:\d\d UTC/);

    const relaxed = await queuedPlan(running, lab, [GEAR], { name: 'Relaxed', dueDate: '2099-12-31' });
    expect(await flagsOf(lab, relaxed.planId, 'late_due_date')).toEqual([]);
  });

  test('a part whose measured mesh has open edges is flagged by name; closed parts are not', async () => {
    const lab = await labWithCrew(running, 'flags-mesh');
    const plan = await queuedPlan(running, lab, [GEAR, { name: 'Bracket', sizeMm: [20, 10, 5], quantity: 2 }], { approve: false });
    expect(await flagsOf(lab, plan.planId, 'not_watertight')).toEqual([]);

    const bracket = plan.request.lines.find((l) => l.name === 'Bracket')!;
    await running.db.sequelize.query(`UPDATE parts SET watertight = false, metrics = metrics || '{"openEdges": 6}'::jsonb WHERE id = $1`, { bind: [bracket.partId] });
    const flags = await flagsOf(lab, plan.planId, 'not_watertight');
    expect(flags).toHaveLength(1);
    expect(flags[0].details).toMatchObject({ partId: bracket.partId, partName: 'Bracket', openEdges: 6 });
    expect(flags[0].message).toMatch(/"Bracket" is not closed \(6 open edges\)/);
  });

  test("another lab's plan is not found, and a malformed id answers 404", async () => {
    const lab = await labWithCrew(running, 'flags-scope');
    const plan = await queuedPlan(running, lab, [GEAR], { approve: false });
    const other = await labWithCrew(running, 'flags-scope-other');
    expect((await other.agent.get(`/api/labs/${other.labId}/plans/${plan.planId}/flags`)).status).toBe(404);
    expect((await lab.agent.get(`/api/labs/${lab.labId}/plans/not-a-plan/flags`)).status).toBe(404);
  });
});
