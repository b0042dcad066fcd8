import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { estimateLayout, InvalidInputError } from '@/shared/estimate';
import { scheduleQueue, stageDurationsFromEstimate, type QueuedPlan } from '@/shared/schedule';

const H = 3600 * 1000;
const T0 = Date.UTC(2026, 11, 1, 8, 0, 0);

/** Hours for preheat, layers, in-machine cooling, outside cooling, breakout. */
function plan(planId: string, hours: [number, number, number, number, number], dueDatesMs: number[] = []): QueuedPlan {
  const [p, l, i, o, b] = hours.map((h) => h * 3600);
  return { planId, preheatSeconds: p, layersSeconds: l, inMachineCoolingSeconds: i, outsideCoolingSeconds: o, breakoutSeconds: b, dueDatesMs };
}

describe('a machine queue', () => {
  test('a build runs preheat, print, cooling in the machine, cooling outside and breakout back to back', () => {
    const s = scheduleQueue({ startMs: T0, machine: { chamberCount: 1 }, plans: [plan('a', [2, 20, 1, 12, 1])] });
    const a = s.plans[0];
    expect(a.startMs).toBe(T0);
    expect(a.printEndMs).toBe(T0 + 22 * H);
    expect(a.leavesMachineMs).toBe(T0 + 23 * H);
    expect(a.cooledMs).toBe(T0 + 35 * H);
    expect(a.breakoutDoneMs).toBe(T0 + 36 * H);
    expect(s.current).toBeNull();
  });

  test('a two-chamber machine starts the next build when the last chamber leaves, overlapping its outside cooling', () => {
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 2 },
      plans: [plan('a', [2, 20, 1, 12, 1]), plan('b', [2, 10, 1, 12, 1])],
    });
    const [a, b] = s.plans;
    expect(b.startMs).toBe(a.leavesMachineMs);
    expect(b.startMs).toBeLessThan(a.cooledMs);
    expect(b.chamberIndex).not.toBe(a.chamberIndex);
    expect(b.breakoutDoneMs).toBe(T0 + (23 + 26) * H);
  });

  test('a one-chamber machine waits until the last cake is cooled outside and broken out', () => {
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 1 },
      plans: [plan('a', [2, 20, 1, 12, 1]), plan('b', [2, 10, 1, 12, 1])],
    });
    const [a, b] = s.plans;
    expect(b.startMs).toBe(a.breakoutDoneMs);
    expect(b.startMs).toBeGreaterThanOrEqual(a.cooledMs);
    expect(b.chamberIndex).toBe(0);
  });

  test('with two chambers a third build waits for a chamber when outside cooling outlasts the next print', () => {
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 2 },
      plans: [plan('a', [1, 2, 1, 30, 1]), plan('b', [1, 2, 1, 30, 1]), plan('c', [1, 2, 1, 30, 1])],
    });
    const [a, b, c] = s.plans;
    expect(b.startMs).toBe(a.leavesMachineMs);
    expect(c.startMs).toBe(a.breakoutDoneMs);
    expect(c.chamberIndex).toBe(a.chamberIndex);
    expect(c.startMs).toBeGreaterThan(b.leavesMachineMs);
  });

  test('a plan whose parts come out after its earliest due date is flagged late, by how much', () => {
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 1 },
      plans: [plan('a', [2, 20, 1, 12, 1], [T0 + 100 * H]), plan('b', [2, 10, 1, 12, 1], [T0 + 200 * H, T0 + 50 * H])],
    });
    const [a, b] = s.plans;
    expect(a.late).toBe(false);
    expect(a.lateByMs).toBe(0);
    expect(b.earliestDueMs).toBe(T0 + 50 * H);
    expect(b.late).toBe(true);
    expect(b.lateByMs).toBe(b.breakoutDoneMs - (T0 + 50 * H));
  });

  test('a plan without due dates is never late', () => {
    const s = scheduleQueue({ startMs: T0, machine: { chamberCount: 1 }, plans: [plan('a', [2, 20, 1, 12, 1])] });
    expect(s.plans[0].earliestDueMs).toBeNull();
    expect(s.plans[0].late).toBe(false);
  });

  test('moving an urgent plan to the front makes it on time, and a one-chamber queue still ends when it did', () => {
    const long = plan('long', [2, 30, 1, 12, 1], [T0 + 200 * H]);
    const urgent = plan('urgent', [2, 5, 1, 12, 1], [T0 + 30 * H]);
    const before = scheduleQueue({ startMs: T0, machine: { chamberCount: 1 }, plans: [long, urgent] });
    const after = scheduleQueue({ startMs: T0, machine: { chamberCount: 1 }, plans: [urgent, long] });
    expect(before.plans[1].late).toBe(true);
    expect(after.plans[0].planId).toBe('urgent');
    expect(after.plans[0].late).toBe(false);
    expect(after.plans[0].startMs).toBe(T0);
    expect(after.plans[1].startMs).toBe(after.plans[0].breakoutDoneMs);
    expect(after.plans[1].breakoutDoneMs).toBe(before.plans[1].breakoutDoneMs);
  });

  test('a run printing now delays the queue until its chamber leaves the machine (two chambers)', () => {
    const running = plan('now', [2, 20, 1, 12, 1]);
    const startedPrint = T0 - 5 * H;
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 2 },
      plans: [plan('next', [2, 10, 1, 12, 1])],
      current: { plan: running, stage: 'printing', stageStartedAtMs: startedPrint },
    });
    expect(s.current!.startMs).toBe(startedPrint - 2 * H);
    expect(s.current!.printEndMs).toBe(startedPrint + 20 * H);
    expect(s.current!.leavesMachineMs).toBe(startedPrint + 21 * H);
    expect(s.plans[0].startMs).toBe(s.current!.leavesMachineMs);
    expect(s.plans[0].chamberIndex).toBe(1);
  });

  test('a run cooling outside frees a one-chamber machine only after its breakout', () => {
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 1 },
      plans: [plan('next', [2, 10, 1, 12, 1])],
      current: { plan: plan('now', [2, 20, 1, 12, 1]), stage: 'cooling_outside', stageStartedAtMs: T0 - 4 * H },
    });
    expect(s.current!.cooledMs).toBe(T0 + 8 * H);
    expect(s.plans[0].startMs).toBe(T0 + 9 * H);
  });

  test('a stage running longer than estimated is taken to end now at the earliest', () => {
    const s = scheduleQueue({
      startMs: T0,
      machine: { chamberCount: 1 },
      plans: [],
      current: { plan: plan('now', [2, 20, 1, 12, 1]), stage: 'cooling_in_machine', stageStartedAtMs: T0 - 3 * H },
    });
    expect(s.current!.leavesMachineMs).toBe(T0);
    expect(s.current!.cooledMs).toBe(T0 + 12 * H);
  });

  test('a build never starts before the queue\'s start time', () => {
    const s = scheduleQueue({ startMs: T0, machine: { chamberCount: 3 }, plans: [plan('a', [0, 1, 0, 0, 0])] });
    expect(s.plans[0].startMs).toBe(T0);
  });

  test('stage durations come straight from a layout estimate', () => {
    const [machine] = demoMachines;
    const e = estimateLayout({ layout: { placements: [{ position: [10, 10, 5], size: [50, 50, 40] }] }, machine, material: demoMaterials[0] });
    const d = stageDurationsFromEstimate(e, 1800);
    expect(d.preheatSeconds + d.layersSeconds).toBeCloseTo(e.print.printSeconds, 6);
    expect(d.inMachineCoolingSeconds + d.outsideCoolingSeconds).toBeCloseTo(e.cooling.coolingSeconds, 6);
    const s = scheduleQueue({ startMs: T0, machine, plans: [{ planId: 'p', dueDatesMs: [], ...d }] });
    expect(s.plans[0].printEndMs - T0).toBeCloseTo(e.print.printSeconds * 1000, 0);
  });

  test('bad input is refused with every problem named by its field', () => {
    let error: unknown;
    try {
      scheduleQueue({
        startMs: Number.NaN,
        machine: { chamberCount: 0 },
        plans: [{ ...plan('a', [1, 1, 1, 1, 1]), layersSeconds: -5 }, { ...plan('b', [1, 1, 1, 1, 1]), dueDatesMs: [Number.NaN] }],
      });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(InvalidInputError);
    expect((error as InvalidInputError).problems.map((p) => p.field)).toEqual([
      'startMs',
      'machine.chamberCount',
      'plans[0].layersSeconds',
      'plans[1].dueDatesMs[0]',
    ]);
  });
});
