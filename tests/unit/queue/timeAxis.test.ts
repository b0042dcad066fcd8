import { formatMoment, tickStep, timeTicks } from '../../../components/queue/timeAxis';

// Local times built with the Date constructor, so the checks hold in any time zone the tests run in.
const at = (d: number, h: number, m = 0) => new Date(2026, 11, d, h, m).getTime();

describe("the queue's time axis", () => {
  test('the step is the smallest round one that keeps the ticks within the room', () => {
    expect(tickStep(3 * 3_600_000, 8)).toBe(30 * 60_000);
    expect(tickStep(20 * 3_600_000, 8)).toBe(3 * 3_600_000);
    expect(tickStep(5 * 86_400_000, 8)).toBe(86_400_000);
    expect(tickStep(40 * 86_400_000, 8)).toBe(7 * 86_400_000);
  });

  test('ticks fall on round local times inside the span, the first one dated, a new day named at midnight', () => {
    const ticks = timeTicks(at(2, 6, 45), at(3, 2, 10), 8);
    expect(ticks.length).toBeLessThanOrEqual(8);
    expect(ticks[0]).toMatchObject({ atMs: at(2, 9), label: '2 Dec 09:00', day: false });
    expect(ticks.map((t) => t.label)).toEqual(['2 Dec 09:00', '12:00', '15:00', '18:00', '21:00', '3 Dec 00:00']);
    expect(ticks.at(-1)!.day).toBe(true);
    for (const t of ticks) expect(t.atMs).toBeGreaterThanOrEqual(at(2, 6, 45));
  });

  test('a span of days is ticked by days, each named with its weekday and month', () => {
    const ticks = timeTicks(at(1, 10), at(6, 10), 8);
    expect(ticks.map((t) => t.label)).toEqual(['Wed 2 Dec', 'Thu 3 Dec', 'Fri 4 Dec', 'Sat 5 Dec', 'Sun 6 Dec']);
  });

  test('moments read with the month named, never as an ambiguous 12-02', () => {
    expect(formatMoment(at(2, 6, 45))).toBe('2 Dec 06:45');
    expect(formatMoment(new Date(2027, 1, 12, 14, 5).toISOString())).toBe('12 Feb 14:05');
  });
});
