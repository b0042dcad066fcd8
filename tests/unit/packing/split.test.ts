import { generatePowderBed, splitIntoBuilds, validateLayout, type BuildLine } from '@/shared/packing';

const settings = { chamber: [260, 260, 150] as [number, number, number], margin: { xy: 8, bottom: 5, top: 5 }, spacing: 3, timeLimitMs: 60_000 };

describe('splitting request lines into builds', () => {
  const demand = generatePowderBed({ parts: 900, seed: 11 });
  const lines: BuildLine[] = demand.parts.map((p, i) => ({
    id: p.id,
    size: p.size,
    quantity: p.quantity,
    orientations: p.orientations,
    priority: i % 2 === 0 ? 2 : 1,
    dueDate: `2027-02-${String(1 + (i % 27)).padStart(2, '0')}`,
  }));
  const outcome = splitIntoBuilds(lines, settings, { maxCompletions: 20 });

  test('every build is a valid layout and all parts are placed exactly once', () => {
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    expect(outcome.unplaceable).toEqual([]);
    const placed = new Map<string, number>();
    for (const b of outcome.builds) {
      expect(validateLayout(b.instance, b.result)).toEqual([]);
      expect(b.result.unplaced).toEqual([]);
      for (const p of b.result.placements) placed.set(p.id, (placed.get(p.id) ?? 0) + 1);
    }
    for (const l of lines) expect(placed.get(l.id)).toBe(l.quantity);
  });

  test('needs at most one build more than the volume lower bound (Martello, Pisinger & Vigo 2000)', () => {
    if (!outcome.ok) throw new Error('split failed');
    expect(outcome.builds.length).toBeGreaterThan(1);
    expect(outcome.builds.length).toBeLessThanOrEqual(outcome.buildsLowerBound + 1);
  });

  test('urgent lines go into the first builds and the least urgent ones fill the last', () => {
    if (!outcome.ok) throw new Error('split failed');
    expect(outcome.builds.length).toBeGreaterThanOrEqual(3);
    const priorityOf = new Map(lines.map((l) => [l.id, l.priority] as const));
    const count = (k: number, priority: number) => outcome.builds[k].result.placements.filter((p) => priorityOf.get(p.id) === priority).length;
    const urgentTotal = lines.filter((l) => l.priority === 1).reduce((s, l) => s + l.quantity, 0);
    // The urgent parts take less than one chamber: nearly all of them go into the first build.
    expect(count(0, 1)).toBeGreaterThanOrEqual(0.95 * urgentTotal);
    expect(count(0, 1) + count(1, 1)).toBe(urgentTotal);
    expect(count(outcome.builds.length - 1, 1)).toBe(0);
  });

  test('a line that fits no chamber is reported, not packed', () => {
    const out = splitIntoBuilds([{ id: 'beam', size: [900, 10, 10], quantity: 2, priority: 1 }], settings);
    expect(out.ok && out.unplaceable).toEqual([{ id: 'beam', count: 2 }]);
  });

  test('bad lines are reported with their field', () => {
    const out = splitIntoBuilds([{ id: 'x', size: [10, 0, 10], quantity: 1, priority: Number.NaN }], settings);
    expect(out.ok).toBe(false);
    if (out.ok) return;
    expect(out.problems.map((p) => p.field)).toEqual(expect.arrayContaining(['lines[0].size[1]', 'lines[0].priority']));
  });
});
