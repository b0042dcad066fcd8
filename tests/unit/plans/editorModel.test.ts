import { RESULT_FORMAT, type PackResult, type Placement, type Vec3 } from '../../../shared/packing';
import type { OpenLineView, PlanLineView } from '../../../shared/schemas/plans';
import type { DraftLine } from '../../../components/stores/planEditor';
import {
  canKeep,
  fillCandidatesOf,
  fillInstanceOf,
  fillReasonOf,
  foldBest,
  instanceLinesOf,
  isDirty,
  isStale,
  keptLabel,
  lineInfoOf,
  densityVolumeOf,
  buildStackOf,
  dragPreview,
  editFaults,
  handEdited,
  movedAfterRemoval,
  movedCutMm,
  stackNote,
  repackAvailability,
  repackOf,
  shapeTimeNote,
  meshTrianglesOf,
  placedTrianglesOf,
  openMeshNote,
  openMeshPartsOf,
  shownLayoutId,
  submitBlockOf,
  withRuleForAll,
  WORKING,
  type Working,
} from '../../../components/plans/editorModel';
import { buildInstance } from '../../../components/plans/instance';
import { layerAtHeight } from '../../../components/viewer/math';

// An invented 300 x 300 x 300 mm chamber, 5 mm wall keep-out, 2 mm between parts, 0.1 mm layers.
const machine = { chamberMm: [300, 300, 300] as Vec3, layerHeightsMm: [0.1, 0.12] };
const material = { spacingMm: 2, marginXyMm: 5, marginBottomMm: 5, marginTopMm: 5, defaultLayerHeightMm: 0.1 };
const options = { seed: 3, spacingMm: 2, timeLimitMs: 1000, layerHeightMm: 0.1 };

const part = (id: string, sizeMm: Vec3, orientation: 'any' | 'keep_up' | 'fixed' = 'any') => ({ id: `part-${id}`, name: `Part ${id}`, sizeMm, volumeMm3: sizeMm[0] * sizeMm[1] * sizeMm[2], watertight: true, triangles: 12, orientation });
const planLine = (id: string, quantity: number, sizeMm: Vec3, extra: Partial<PlanLineView> = {}): PlanLineView => ({
  id: `pl-${id}`,
  requestLineId: id,
  quantity,
  orientation: 'any',
  orientationOverride: null,
  part: part(id, sizeMm),
  request: { id: `r-${id}`, title: `Request ${id}`, dueDate: '2027-01-15', priority: 'normal', status: 'open' },
  lineQuantity: quantity,
  plannedElsewhere: 0,
  printedCount: 0,
  ...extra,
});
const openLine = (id: string, remaining: number, sizeMm: Vec3, orientation: 'any' | 'keep_up' | 'fixed' = 'any'): OpenLineView => ({
  requestLineId: id,
  part: part(id, sizeMm, orientation),
  request: { id: `r-${id}`, title: `Request ${id}`, dueDate: '2027-02-01', priority: 'high', materialId: 'm1' },
  quantity: remaining,
  plannedCount: 0,
  remaining,
});
const line = (requestLineId: string, quantity: number): DraftLine => ({ requestLineId, quantity, orientation: null });
const box = (id: string, x: number, y: number, z: number, size: Vec3): Placement => ({ id, position: [x, y, z], size, orientation: 'xyz' });
const result = (placements: Placement[]): PackResult => ({
  format: RESULT_FORMAT,
  placements,
  unplaced: [],
  height: Math.max(0, ...placements.map((p) => p.position[2] + p.size[2])),
  layers: 0,
  utilization: 0,
  elapsedMs: 10,
});

const info = lineInfoOf([planLine('a', 2, [20, 20, 10]), planLine('b', 1, [30, 30, 30])], [openLine('c', 4, [10, 10, 10])]);
const instanceOf = (lines: DraftLine[]) => buildInstance(instanceLinesOf(lines, info), machine, material, options);

describe('the lines a plan holds', () => {
  it('a line already in the plan may grow only to what its request still needs besides other plans', () => {
    const m = lineInfoOf([planLine('a', 2, [20, 20, 10], { lineQuantity: 10, plannedElsewhere: 6 })], [openLine('a', 99, [20, 20, 10])]);
    expect(m.get('a')?.maxQuantity).toBe(4);
  });

  it('a changed name or line is an unsaved change; packing options alone are not', () => {
    const saved = [line('a', 2), line('b', 1)];
    expect(isDirty(null, 'Plan', saved)).toBe(false);
    expect(isDirty({ name: 'Plan', lines: [line('b', 1), line('a', 2)] }, 'Plan', saved)).toBe(false);
    expect(isDirty({ name: 'Plan', lines: [line('a', 3), line('b', 1)] }, 'Plan', saved)).toBe(true);
    expect(isDirty({ name: 'Plan', lines: [{ ...line('a', 2), orientation: 'fixed' }, line('b', 1)] }, 'Plan', saved)).toBe(true);
    expect(isDirty({ name: 'Plan B', lines: saved }, 'Plan', saved)).toBe(true);
  });

  it("one rule for all lines keeps no override on a line whose part has that rule already", () => {
    const m = lineInfoOf([planLine('a', 1, [10, 10, 10]), { ...planLine('b', 1, [10, 10, 10]), part: part('b', [10, 10, 10], 'keep_up') }], []);
    const next = withRuleForAll([line('a', 1), line('b', 1)], 'keep_up', m);
    expect(next.map((l) => l.orientation)).toEqual(['keep_up', null]);
    expect(withRuleForAll(next, null, m).map((l) => l.orientation)).toEqual([null, null]);
  });
});

describe('a fill', () => {
  const base: Working = { mode: 'fill', instance: instanceOf([line('a', 2)]), kept: [box('a', 5, 5, 5, [20, 20, 10]), box('a', 27, 5, 5, [20, 20, 10])], result: null, lines: [line('a', 2)], baseLines: [line('a', 2)], problem: null };

  it('makes the plan take what it placed: a line new to the plan comes in with exactly its placed count', () => {
    const best = result([box('c', 5, 5, 17, [10, 10, 10]), box('c', 17, 5, 17, [10, 10, 10]), box('c', 29, 5, 17, [10, 10, 10])]);
    const next = foldBest(base, best, true, instanceOf);
    expect(next.problem).toBeNull();
    expect(next.lines).toEqual([line('a', 2), line('c', 3)]);
    expect(next.result?.placements).toHaveLength(5);
    // The layout is checked against the plan with the added line, so it can be kept as it is.
    expect(next.instance.parts.find((p) => p.id === 'c')?.quantity).toBe(3);
  });

  it('counts from the lines before the run, however often its best layout changes', () => {
    const once = foldBest(base, result([box('c', 5, 5, 17, [10, 10, 10])]), false, instanceOf);
    const twice = foldBest(once, result([box('c', 5, 5, 17, [10, 10, 10]), box('c', 17, 5, 17, [10, 10, 10])]), false, instanceOf);
    expect(twice.lines).toEqual([line('a', 2), line('c', 2)]);
  });

  it('whose parts overlap the kept ones is refused with the reason, not shown as a layout to keep', () => {
    const clash = foldBest(base, result([box('c', 5, 5, 5, [10, 10, 10])]), true, instanceOf);
    expect(clash.problem).toMatch(/\S/);
    expect(canKeep(clash, { editable: true, running: false, stale: false })).toBe(false);
  });

  it('is offered only the open lines the plan does not hold yet, and says why when it cannot run', () => {
    const open = [openLine('a', 5, [20, 20, 10]), openLine('c', 4, [10, 10, 10]), openLine('d', 0, [10, 10, 10])];
    const candidates = fillCandidatesOf(open, [line('a', 2)]);
    expect(candidates.map((c) => [c.line.requestLineId, c.extra])).toEqual([['c', 4]]);
    const full = instanceOf([line('a', 2)]);
    expect(fillReasonOf(null, null, full, 4)).toMatch(/Pack first/);
    expect(fillReasonOf(result([]), instanceOf([line('a', 1)]), full, 4)).toMatch(/lines changed/);
    expect(fillReasonOf(result([]), full, full, 0)).toMatch(/No other open request lines/);
    expect(fillReasonOf(result([]), full, full, 4)).toBeNull();
  });

  it('packs as low as it goes when all may fit, and for the most volume when they cannot all fit', () => {
    const full = instanceOf([line('a', 2)]);
    const shown = base.kept;
    const few = fillInstanceOf([{ line: openLine('c', 4, [10, 10, 10]), extra: 4 }], full, shown, machine, material, options);
    expect(few.objective).toBe('min-height');
    // New parts go above the shown ones: their top (15 mm) plus the 2 mm spacing.
    expect(few.margin?.bottom).toBeCloseTo(17, 9);
    // 300 boxes of 100 mm cannot share one 290 mm chamber.
    const many = fillInstanceOf([{ line: openLine('c', 300, [100, 100, 100]), extra: 300 }], full, shown, machine, material, options);
    expect(many.objective).toBe('max-volume');
  });
});

describe('a fill or re-pack above a layout packed by shape', () => {
  // Two 20 x 20 x 10 parts of line a packed by shape: their boxes overlap by 5 mm (the shapes nest), which the
  // boxes' check would refuse. The transform is a plain translation to each box's corner.
  const shaped = (x: number, y: number, z: number): Placement => ({ ...box('a', x, y, z, [20, 20, 10]), transform: [1, 0, 0, 0, 1, 0, 0, 0, 1, x, y, z] });
  const kept = [shaped(5, 5, 5), shaped(20, 5, 5)];
  const base: Working = { mode: 'fill', instance: instanceOf([line('a', 2)]), kept, result: null, lines: [line('a', 2)], baseLines: [line('a', 2)], problem: null };

  it('adds the new parts in the slab above without checking the nested boxes below against each other', () => {
    // Kept top 15 mm plus the 2 mm spacing: the slab starts at 17 mm.
    const next = foldBest(base, result([box('c', 5, 5, 17, [10, 10, 10]), box('c', 17, 5, 17, [10, 10, 10])]), true, instanceOf);
    expect(next.problem).toBeNull();
    expect(next.result?.placements.map((p) => p.id)).toEqual(['a', 'a', 'c', 'c']);
    // Still a layout by shape: it is kept as one and checked against the meshes by the server.
    expect(next.result?.placements.filter((p) => p.transform)).toHaveLength(2);
    expect(next.lines).toEqual([line('a', 2), line('c', 2)]);
  });

  it("counts each part's own volume in the density, as the server's check of a layout by shape does", () => {
    const volumes = new Map([['a', 1500], ['c', 400]]);
    const next = foldBest(base, result([box('c', 5, 5, 17, [10, 10, 10]), box('c', 17, 5, 17, [10, 10, 10])]), true, instanceOf, (id) => volumes.get(id));
    // Usable plate 290 x 290 mm (300 less 5 mm each side), from the 5 mm floor margin to the top at 27 mm.
    expect(next.result?.utilization).toBeCloseTo((2 * 1500 + 2 * 400) / (290 * 290 * (27 - 5)), 12);
    // Without the volumes, the boxes'.
    const boxes = foldBest(base, result([box('c', 5, 5, 17, [10, 10, 10]), box('c', 17, 5, 17, [10, 10, 10])]), true, instanceOf);
    expect(boxes.result?.utilization).toBeCloseTo((2 * 4000 + 2 * 1000) / (290 * 290 * (27 - 5)), 12);
  });

  it('counts a part whose mesh is not closed as its box, as the server\'s check against the meshes does (an open mesh has no inside)', () => {
    const lines = lineInfoOf(
      [
        planLine('a', 2, [20, 20, 10], { part: { ...part('a', [20, 20, 10]), volumeMm3: 1500 } }),
        planLine('c', 2, [10, 10, 10], { part: { ...part('c', [10, 10, 10]), volumeMm3: 400, watertight: false } }),
      ],
      [],
    );
    const volumeOf = densityVolumeOf(lines);
    expect(volumeOf('a')).toBe(1500);
    expect(volumeOf('c')).toBeUndefined();
    const next = foldBest(base, result([box('c', 5, 5, 17, [10, 10, 10]), box('c', 17, 5, 17, [10, 10, 10])]), true, instanceOf, volumeOf);
    // The closed parts by their volume, the open ones by their 10 x 10 x 10 mm boxes.
    expect(next.result?.utilization).toBeCloseTo((2 * 1500 + 2 * 1000) / (290 * 290 * (27 - 5)), 12);
  });

  it('refuses a new part lower than the slab, naming it and by how much', () => {
    const low = foldBest(base, result([box('c', 5, 5, 16, [10, 10, 10])]), true, instanceOf);
    expect(low.problem).toMatch(/added\[0\] \("c"\) is 1\.00 mm too low/);
    expect(canKeep(low, { editable: true, running: false, stale: false })).toBe(false);
  });

  it('refuses a new part outside the usable region and more parts than a line asks for', () => {
    // The usable plate ends at 300 - 5 mm.
    const out = foldBest(base, result([box('c', 290, 5, 17, [10, 10, 10])]), true, instanceOf);
    expect(out.problem).toMatch(/outside the usable region/);
    const repack: Working = { ...base, mode: 'repack', instance: instanceOf([line('a', 2)]), lines: [line('a', 2)] };
    const extra = foldBest(repack, result([shaped(5, 5, 20)]), true, instanceOf);
    expect(extra.problem).toMatch(/"a" is placed 3 times where its line asks for 2/);
  });
});

describe('a layout packed by shape changed by hand', () => {
  const shaped = (id: string, x: number, y: number, z: number, size: Vec3): Placement => ({ ...box(id, x, y, z, size), transform: [1, 0, 0, 0, 1, 0, 0, 0, 1, x, y, z] });
  // A 20 x 20 x 10 part of line a holding one of line c in its hollow (their boxes overlap), another a beside.
  const layout = result([shaped('a', 5, 5, 5, [20, 20, 10]), shaped('c', 10, 10, 7, [10, 10, 6]), shaped('a', 40, 5, 5, [20, 20, 10])]);
  const full = instanceOf([line('a', 2), line('c', 1)]);

  it('checks only the parts moved by hand, by their boxes, and keeps the transforms with the moves', () => {
    expect(editFaults(full, layout, [])).toEqual(new Set());
    const moved = handEdited(full, layout, new Set([2]), { kind: 'move', dxMm: 20, dyMm: 0 });
    if (!moved.ok) throw new Error(moved.message);
    expect(moved.result.placements[2].transform?.slice(9)).toEqual([60, 5, 5]);
    expect(editFaults(full, moved.result, [2])).toEqual(new Set());
    // Back beside the first one, 1 mm from its box (less than the 2 mm spacing).
    const close = handEdited(full, layout, new Set([2]), { kind: 'move', dxMm: -14, dyMm: 0 });
    if (!close.ok) throw new Error(close.message);
    expect(editFaults(full, close.result, [2])).toEqual(new Set([2]));
  });

  it('checks a drag as the release will: a part dragged under one listed before it is listed again first, not at fault', () => {
    // A 60 x 60 x 3 mm plate at 20 mm listed before a 10 x 10 x 6 mm block beside it on the floor. Dragged 65 mm
    // towards -x the block stands under the plate (its top at 11 mm, 9 mm below the plate): it can be lifted
    // out once the plate is, so the release lists it first.
    const bridge = result([shaped('b', 5, 5, 20, [60, 60, 3]), shaped('c', 80, 20, 5, [10, 10, 6])]);
    const inst = instanceOf([line('b', 1), line('c', 1)]);
    const drag = dragPreview(inst, bridge, new Set([1]), -65, 0);
    if (!drag) throw new Error('no preview');
    // Shown in the order the marks read: the block is still index 1, moved.
    expect(drag.result.placements.map((p) => p.id)).toEqual(['b', 'c']);
    expect(drag.result.placements[1].position).toEqual([15, 20, 5]);
    expect(drag.faults).toEqual(new Set());
    // Left in the order it had, the block could not be lifted out past the plate above it.
    const unordered = { ...drag.result, placements: [...drag.result.placements] };
    expect(editFaults(inst, unordered, [1])).toEqual(new Set([1]));
    // Dragged onto another block under the plate instead, it is at fault, under its index here.
    const two = result([shaped('b', 5, 5, 20, [60, 60, 3]), shaped('c', 80, 20, 5, [10, 10, 6]), shaped('c', 40, 20, 5, [10, 10, 6])]);
    const onto = dragPreview(instanceOf([line('b', 1), line('c', 2)]), two, new Set([1]), -39, 0);
    expect(onto?.faults.has(1)).toBe(true);
  });

  it('renumbers the parts moved by hand when others are taken out', () => {
    expect(movedAfterRemoval([0, 3, 5], new Set([1, 3]))).toEqual([0, 3]);
  });
});

describe('re-packing above a locked layout', () => {
  const locked = result([box('a', 5, 5, 5, [20, 20, 10]), box('a', 27, 5, 5, [20, 20, 10]), box('b', 49, 5, 5, [30, 30, 30])]);

  it('keeps as many locked parts of each line as the plan still asks for and packs only the rest, above them', () => {
    const full = instanceOf([line('a', 1), line('b', 3)]);
    const { kept, engine } = repackOf(locked, full);
    expect(kept.map((p) => p.id)).toEqual(['a', 'b']);
    expect(engine.parts.map((p) => [p.id, p.quantity])).toEqual([['b', 2]]);
    // The kept parts reach 35 mm; 2 mm of spacing above them.
    expect(engine.margin?.bottom).toBeCloseTo(37, 9);
  });

  it('is offered only with a locked layout shown and lines that changed since', () => {
    const same = instanceOf([line('a', 2), line('b', 1)]);
    expect(repackAvailability(null, same)).toEqual({ available: false, reason: expect.stringMatching(/Lock a kept layout/) });
    expect(repackAvailability(same, instanceOf([line('b', 1), line('a', 2)]))).toEqual({ available: false, reason: expect.stringMatching(/already holds/) });
    expect(repackAvailability(same, instanceOf([line('a', 2), line('b', 2)]))).toEqual({ available: true, reason: null });
  });
});

describe('keeping a layout and sending the plan', () => {
  const full = instanceOf([line('a', 1)]);
  const packed: Working = { mode: 'pack', instance: full, kept: [], result: { ...result([box('a', 5, 5, 5, [20, 20, 10])]), layers: 150 }, lines: [line('a', 1)], baseLines: [line('a', 1)], problem: null };

  it('a packed layout can be kept once the run ended, while the lines are still the ones it was packed for', () => {
    expect(canKeep(packed, { editable: true, running: false, stale: false })).toBe(true);
    expect(canKeep(packed, { editable: true, running: true, stale: false })).toBe(false);
    expect(canKeep(packed, { editable: false, running: false, stale: false })).toBe(false);
    expect(isStale(packed, full)).toBe(false);
    expect(isStale(packed, instanceOf([line('a', 2)]))).toBe(true);
    expect(canKeep({ ...packed, result: result([]) }, { editable: true, running: false, stale: false })).toBe(false);
  });

  it('a kept layout is labelled by how it was made, with the seed of a plain packing and its layers', () => {
    expect(keptLabel({ ...packed, result: packed.result! })).toBe('Seed 3 · 150 layers');
    expect(keptLabel({ ...packed, mode: 'fill', result: packed.result! })).toBe('Filled · 150 layers');
    expect(keptLabel({ ...packed, mode: 'repack', result: packed.result! })).toBe('Re-packed · 150 layers');
  });

  it('a plan is sent for review only with a chosen layout that matches its lines and nothing unsaved', () => {
    expect(submitBlockOf([{ chosen: false, matchesPlan: true }], false)).toMatch(/Choose a layout first/);
    expect(submitBlockOf([{ chosen: true, matchesPlan: false }], false)).toMatch(/no longer matches/);
    expect(submitBlockOf([{ chosen: true, matchesPlan: true }], true)).toMatch(/Save or undo/);
    expect(submitBlockOf([{ chosen: true, matchesPlan: true }], false)).toBeNull();
  });
});

describe('the layout shown', () => {
  const plan = {
    chosenLayoutId: null as string | null,
    layouts: [
      { id: 'old', createdAt: '2026-11-30T10:00:00Z' },
      { id: 'new', createdAt: '2026-12-01T10:00:00Z' },
    ],
  };

  it("is the planner's pick, else the chosen layout, else the newest; the packing not kept only while there is one", () => {
    expect(shownLayoutId(null, false, plan)).toBe('new');
    expect(shownLayoutId(null, false, { ...plan, chosenLayoutId: 'old' })).toBe('old');
    expect(shownLayoutId('old', false, plan)).toBe('old');
    expect(shownLayoutId(WORKING, true, plan)).toBe(WORKING);
    expect(shownLayoutId(WORKING, false, plan)).toBe('new');
    expect(shownLayoutId(null, false, { chosenLayoutId: null, layouts: [] })).toBeNull();
  });

  it('the cut moves by whole layers within the layout, and past its top there is no cut', () => {
    // A 10 mm tall layout in 0.1 mm layers: the first step down from no cut is at 9.9 mm.
    expect(movedCutMm(null, 10, 0.1, -1)).toBeCloseTo(9.9, 9);
    expect(movedCutMm(null, 10, 0.1, -10)).toBeCloseTo(9, 9);
    expect(movedCutMm(0.2, 10, 0.1, -10)).toBe(0);
    expect(movedCutMm(9.95, 10, 0.1, 1)).toBeNull();
    expect(movedCutMm(5.04, 10, 0.1, 1)).toBeCloseTo(5.1, 9);
  });

  it('counts layers one way everywhere: from the floor, floor margin and top margin included, as the print time does', () => {
    // Parts 90 mm tall on a 5 mm floor margin (top at 95 mm from the floor), 5 mm of powder over them, 0.11 mm layers:
    // the machine spreads ceil((5 + 90 + 5) / 0.11) = ceil(909.09) = 910 layers (worked by hand).
    const stack = buildStackOf(95, { bottom: 5, top: 5 }, 0.11);
    expect(stack.layers).toBe(910);
    expect(stack.topMm).toBeCloseTo(100.1, 9);
    // The layer slider counts whole layers up to the height it is given: the stack's top gives the same 910,
    // where the parts' top alone (the count it used to show) would give 864.
    expect(layerAtHeight(stack.topMm, 0.11)).toBe(910);
    expect(layerAtHeight(95, 0.11)).toBe(864);
    expect(stackNote(stack)).toBe('910 layers of 0.11 mm as printed: 5 mm of powder under the parts (floor margin), 90 mm of parts, 5 mm over them.');
    // Stepping the cut up from one layer under the top reaches the top of the last printed layer, then no cut.
    expect(movedCutMm(909 * 0.11, stack.topMm, 0.11, 1)).toBeNull();
    expect(movedCutMm(null, stack.topMm, 0.11, -1)).toBeCloseTo(909 * 0.11, 9);
    expect(buildStackOf(0, { bottom: 5, top: 5 }, 0.11).layers).toBe(0);
  });
});

describe('editing a layout by hand', () => {
  // Two 'a' parts (20 x 20 x 10 mm) on the floor keep-out, 10 mm apart; the 'b' part (30 mm cube) further along.
  const full = instanceOf([line('a', 2), line('b', 1)]);
  const start = summarised([box('a', 5, 5, 5, [20, 20, 10]), box('a', 35, 5, 5, [20, 20, 10]), box('b', 100, 100, 5, [30, 30, 30])]);
  function summarised(ps: Placement[]): PackResult {
    const r = handEdited(full, result(ps), new Set([0]), { kind: 'move', dxMm: 0, dyMm: 0 });
    if (!r.ok) throw new Error(r.message);
    return r.result;
  }
  const edit = (r: PackResult, chosen: number[], e: Parameters<typeof handEdited>[3]) => {
    const out = handEdited(full, r, new Set(chosen), e);
    if (!out.ok) throw new Error(out.message);
    return out.result;
  };
  const asWorking = (r: PackResult): Working => ({ mode: 'edit', instance: full, kept: [], result: r, lines: [line('a', 2), line('b', 1)], baseLines: [], problem: null });

  it('a part moved within the spacing of another is at fault with it, and the layout cannot be kept until it is fixed', () => {
    expect(editFaults(full, start).size).toBe(0);
    // 9 mm to the left leaves 1 mm between the two 'a' parts, under the 2 mm spacing.
    const close = edit(start, [1], { kind: 'move', dxMm: -9, dyMm: 0 });
    expect(close.placements[1].position).toEqual([26, 5, 5]);
    const faults = editFaults(full, close);
    expect([...faults].sort()).toEqual([0, 1]);
    expect(canKeep(asWorking(close), { editable: true, running: false, stale: false, faults: faults.size })).toBe(false);
    // Dropping it to the lowest free height puts it over the other, 2 mm clear: nothing at fault, and the build is taller.
    const dropped = edit(close, [1], { kind: 'drop' });
    expect(dropped.placements[1].position).toEqual([26, 5, 17]);
    expect(editFaults(full, dropped).size).toBe(0);
    expect(dropped.height).toBe(35);
    expect(canKeep(asWorking(dropped), { editable: true, running: false, stale: false, faults: 0 })).toBe(true);
    // Moving it back and dropping again brings it down to the floor keep-out.
    const back = edit(edit(dropped, [1], { kind: 'move', dxMm: 9, dyMm: 0 }), [1], { kind: 'drop' });
    expect(back.placements[1].position).toEqual([35, 5, 5]);
  });

  it('a quarter turn about z turns the part in place; a part kept as stored is not turned', () => {
    const turned = edit(start, [1], { kind: 'turn' });
    expect(turned.placements[1]).toMatchObject({ position: [35, 5, 5], size: [20, 20, 10], orientation: 'yxz' });
    const fixed = { ...full, parts: full.parts.map((p) => ({ ...p, orientations: ['xyz' as const] })) };
    expect(handEdited(fixed, start, new Set([1]), { kind: 'turn' })).toEqual({ ok: false, message: expect.stringMatching(/may not be turned/) });
  });
});

describe('the time limit of a packing by shape', () => {
  // From the packing benchmark's measurements (docs/benchmarks.md): at 2,000 parts a 10 s limit gives only the
  // first layout (about 2 ms a part with its check), 40 s the nested one; 500 parts are searched within 10 s.
  test('2,000 parts at the default 4 s are told to take 40 s; at 40 s, or 500 parts at 10 s, nothing is said', () => {
    expect(shapeTimeNote(2000, 4000)).toBe('With 2000 parts, packing by shape spends about 4 s on its first layout alone: give it 40 s or more to nest them lower.');
    expect(shapeTimeNote(2000, 10_000)).toMatch(/40 s or more/);
    expect(shapeTimeNote(2000, 40_000)).toBeNull();
    expect(shapeTimeNote(500, 10_000)).toBeNull();
    expect(shapeTimeNote(500, 4000)).toMatch(/about 1 s on its first layout alone: give it 10 s or more/);
  });

  // Measured with the engine (docs/benchmarks.md, heavy meshes): two 1,000,000-triangle rings and a housing were packed
  // by their boxes at a 4 s limit and by shape from 5 s; one such ring by its box at 2.5 s and by shape at 3 s.
  test('heavy meshes are told the time they need, whatever the number of parts; light ones are not', () => {
    expect(shapeTimeNote(30, 2000, 2_008_028)).toBe(
      "These parts' meshes hold 2.0 million triangles: packing by shape needs about 6 s to prepare them, and with less it packs the parts by their boxes. Give it 6 s or more.",
    );
    expect(shapeTimeNote(30, 10_000, 2_008_028)).toBeNull();
    expect(shapeTimeNote(2, 500, 1_000_000)).toMatch(/about 3 s to prepare them/);
    expect(shapeTimeNote(2, 3000, 1_000_000)).toBeNull();
    expect(shapeTimeNote(2, 500, 200_000)).toBeNull();
    // Many parts with heavy meshes: the larger of the two suggestions.
    expect(shapeTimeNote(2000, 4000, 2_008_028)).toMatch(/needs about 6 s to prepare them.*Give it 40 s or more/);
  });

  // Measured with the packing command (docs/benchmarks.md, next to `--heavy`'s table of the same kinds of parts): 248
  // parts of 1,000 to 49,000 triangles, 3.1 million placed, got no further than the first layout by shape at 5 and 6 s
  // and nested at 8 and 10 s.
  test('many triangles in all are told the time that checking each layout against them needs', () => {
    expect(shapeTimeNote(248, 5000, 290_000, 3_090_928)).toBe(
      'The 248 parts hold 3.1 million triangles in all: packing by shape settles and checks each layout against them, which takes seconds. Give it 10 s or more to nest them lower.',
    );
    expect(shapeTimeNote(248, 10_000, 290_000, 3_090_928)).toBeNull();
    // Light meshes: the parts' count decides, as before.
    expect(shapeTimeNote(248, 5000, 20_000, 120_000)).toBeNull();
    expect(shapeTimeNote(2000, 10_000, 20_000, 1_000_000)).toMatch(/first layout alone: give it 40 s or more/);
  });

  test('the triangles counted are those of the distinct parts the lines hold', () => {
    const info = lineInfoOf([planLine('a', 2, [10, 10, 10], { part: { ...part('a', [10, 10, 10]), id: 'same', triangles: 600_000 } })], [
      { ...openLine('b', 3, [10, 10, 10]), part: { ...part('b', [10, 10, 10]), id: 'same', triangles: 600_000 } },
      { ...openLine('c', 3, [10, 10, 10]), part: { ...part('c', [10, 10, 10]), triangles: 50_000 } },
    ]);
    // One part on two lines counts once; a line with no copies counts nothing.
    expect(meshTrianglesOf([line('a', 2), line('b', 1)], info)).toBe(600_000);
    expect(meshTrianglesOf([line('a', 2), line('c', 1)], info)).toBe(650_000);
    expect(meshTrianglesOf([line('a', 0), line('c', 1)], info)).toBe(50_000);
    // All the copies, for the time every layout's check takes.
    expect(placedTrianglesOf([line('a', 2), line('b', 1)], info)).toBe(1_800_000);
    expect(placedTrianglesOf([line('a', 0), line('c', 3)], info)).toBe(150_000);
  });

  test('before packing by shape, the parts whose mesh is not closed are named: they will be packed by their boxes', () => {
    const open = (id: string) => ({ ...part(id, [10, 10, 10]), id: `open-${id}`, name: `Open ${id}`, watertight: false });
    const info = lineInfoOf([planLine('a', 2, [10, 10, 10], { part: open('a') }), planLine('b', 1, [10, 10, 10])], [
      { ...openLine('c', 3, [10, 10, 10]), part: open('a') },
      { ...openLine('d', 3, [10, 10, 10]), part: open('d') },
    ]);
    // One part on two lines is named once; a closed one and a line with no copies are not named.
    expect(openMeshPartsOf([line('a', 2), line('b', 1), line('c', 1), line('d', 0)], info)).toEqual(['Open a']);
    expect(openMeshPartsOf([line('b', 1)], info)).toEqual([]);
    expect(openMeshNote([])).toBeNull();
    expect(openMeshNote(['Open a'])).toBe('"Open a" has a mesh that is not closed: packing by shape packs it by its box. Upload a closed mesh as a new revision of the part to nest it.');
    expect(openMeshNote(['A', 'B'])).toMatch(/^"A" and "B" have meshes that are not closed: packing by shape packs them by their boxes\. .* of each part to nest them\.$/);
    expect(openMeshNote(['A', 'B', 'C', 'D', 'E', 'F'])).toMatch(/^"A", "B", "C" and 3 more have meshes/);
  });

  test('up to 200 parts nothing is said, whatever the limit (the default 4 s does)', () => {
    expect(shapeTimeNote(12, 2000)).toBeNull();
    expect(shapeTimeNote(200, 1000)).toBeNull();
    expect(shapeTimeNote(201, 4000)).toMatch(/give it 5 s or more/);
  });
});
