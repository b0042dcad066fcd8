/**
 * What the plan editor derives from the plan, its layouts and the planner's
 * edits, as plain functions (no React): which lines the plan holds, what a
 * packing run adds to them, which layout is shown, what re-packing and
 * filling may do, when a layout may be kept and a plan sent for review.
 * The editor's hooks call these; tests/unit/plans/editorModel.test.ts checks them.
 */
import {
  buildCountLowerBound,
  droppedPlacements,
  movedPlacements,
  parseInstance,
  inLiftOrder,
  placementsAtFault,
  shapeEditFaults,
  summariseLayout,
  turnedPlacements,
  validateLayout,
  type PackInstanceInput,
  type PackResult,
  type Placement,
} from '../../shared/packing';
import { layerCount } from '../../shared/estimate/layers';
import { meshShapeSeconds } from '../../shared/packing/shape/prepTime';
import type { LayoutSummaryView, OpenLineView, PlanLineView, PlanOrientationRule, PlanView } from '../../shared/schemas/plans';
import type { DraftLine, DraftOptions, PlanDraft } from '../stores/planEditor';
import { buildInstance, instanceAbove, mergeAbove, mergeLayouts, type InstanceLine, type MachineLike, type MaterialLike } from './instance';
import type { ShownNumbers } from './estimate';
import type { LayoutRow } from './LayoutsTable';
import type { EditorLine } from './LinesPane';

/** The id the layouts table and the shown-layout choice give the packing not kept yet. */
export const WORKING = 'working';

export type WorkMode = 'pack' | 'repack' | 'fill' | 'edit';

/** A layout being made in the editor and not kept yet. */
export interface Working {
  mode: WorkMode;
  /** The plan's full instance the result is checked against (all lines, their quantities). */
  instance: PackInstanceInput;
  /** Placements carried over unchanged (a locked layout, or what a fill keeps). */
  kept: Placement[];
  result: PackResult | null;
  /** The lines the instance was made from (for a fill: with what it added). */
  lines: DraftLine[];
  /** The lines before the run began: a fill adds to these, however often its best layout changes. */
  baseLines: DraftLine[];
  problem: string | null;
  /** Placements (by index) moved, turned or dropped by hand in a layout packed by shape: the ones its check looks at. */
  handMoved?: number[];
}

/** Everything the editor knows about a request line, whether saved in the plan or offered from the open lines. */
export type LineInfo = Omit<EditorLine, 'quantity' | 'rule' | 'ruleOverride' | 'placed' | 'colour' | 'added'> & { volumeMm3: number; watertight: boolean; triangles: number; partId: string };

// ---- lines -----------------------------------------------------------------

export function sameLines(a: readonly DraftLine[], b: readonly DraftLine[]): boolean {
  if (a.length !== b.length) return false;
  const m = new Map(b.map((l) => [l.requestLineId, l]));
  return a.every((l) => {
    const o = m.get(l.requestLineId);
    return !!o && o.quantity === l.quantity && (o.orientation ?? null) === (l.orientation ?? null);
  });
}

/** Only what the server compares: ids, quantities and allowed orientations of the parts. */
export function partsKey(instance: PackInstanceInput | null | undefined): string {
  if (!instance) return '';
  return instance.parts
    .map((p) => `${p.id}:${p.quantity}:${(p.orientations ?? []).join('')}`)
    .sort()
    .join('|');
}

export function savedLinesOf(plan: Pick<PlanView, 'lines'>): DraftLine[] {
  return plan.lines.map((l) => ({ requestLineId: l.requestLineId, quantity: l.quantity, orientation: l.orientationOverride ?? null }));
}

export function countById(placements: readonly Placement[]): Map<string, number> {
  const m = new Map<string, number>();
  for (const p of placements) m.set(p.id, (m.get(p.id) ?? 0) + 1);
  return m;
}

/** A draft differs from the stored plan when its name or its lines do (options alone are not a change to save). */
export function isDirty(draft: Pick<PlanDraft, 'name' | 'lines'> | null, planName: string, savedLines: readonly DraftLine[]): boolean {
  return !!draft && (draft.name !== planName || !sameLines(draft.lines, savedLines));
}

/**
 * The volume a layout by shape counts for a line's parts in its density: the part's own, or none (its box) when
 * its mesh is not closed, as the server's check against the meshes counts it (an open mesh has no inside).
 */
export function densityVolumeOf(lineInfo: ReadonlyMap<string, LineInfo>): (requestLineId: string) => number | undefined {
  return (requestLineId) => {
    const info = lineInfo.get(requestLineId);
    return info && info.watertight ? info.volumeMm3 : undefined;
  };
}

/** The plan's own lines win over the open lines offered for the same request line. */
export function lineInfoOf(planLines: readonly PlanLineView[], openLines: readonly OpenLineView[]): Map<string, LineInfo> {
  const m = new Map<string, LineInfo>();
  for (const o of openLines) {
    m.set(o.requestLineId, {
      requestLineId: o.requestLineId,
      partName: o.part.name,
      requestTitle: o.request.title,
      dueDate: o.request.dueDate,
      priority: o.request.priority,
      sizeMm: o.part.sizeMm,
      maxQuantity: o.remaining,
      partRule: o.part.orientation,
      volumeMm3: o.part.volumeMm3,
      watertight: o.part.watertight,
      triangles: o.part.triangles,
      partId: o.part.id,
    });
  }
  for (const l of planLines) {
    m.set(l.requestLineId, {
      requestLineId: l.requestLineId,
      partName: l.part.name,
      requestTitle: l.request.title,
      dueDate: l.request.dueDate,
      priority: l.request.priority,
      sizeMm: l.part.sizeMm,
      maxQuantity: l.lineQuantity - l.plannedElsewhere,
      partRule: l.part.orientation,
      volumeMm3: l.part.volumeMm3,
      watertight: l.part.watertight,
      triangles: l.part.triangles,
      partId: l.part.id,
    });
  }
  return m;
}

/** The lines the engine packs: a line's own rule, else its part's. Lines the editor knows nothing of are left out. */
export function instanceLinesOf(lines: readonly DraftLine[], info: ReadonlyMap<string, LineInfo>): InstanceLine[] {
  return lines
    .filter((l) => info.has(l.requestLineId))
    .map((l) => {
      const i = info.get(l.requestLineId)!;
      return { requestLineId: l.requestLineId, quantity: l.quantity, orientation: l.orientation ?? i.partRule, sizeMm: i.sizeMm };
    });
}

export function withQuantity(lines: readonly DraftLine[], id: string, quantity: number): DraftLine[] {
  return lines.map((l) => (l.requestLineId === id ? { ...l, quantity } : l));
}

export function withRule(lines: readonly DraftLine[], id: string, rule: PlanOrientationRule | null): DraftLine[] {
  return lines.map((l) => (l.requestLineId === id ? { ...l, orientation: rule } : l));
}

/** One rule for every line; a line whose part already has that rule keeps no override. */
export function withRuleForAll(lines: readonly DraftLine[], rule: PlanOrientationRule | null, info: ReadonlyMap<string, LineInfo>): DraftLine[] {
  return lines.map((l) => ({ ...l, orientation: rule === null || rule === info.get(l.requestLineId)?.partRule ? null : rule }));
}

export function withoutLine(lines: readonly DraftLine[], id: string): DraftLine[] {
  return lines.filter((l) => l.requestLineId !== id);
}

/** The rows of the lines pane, with what the shown layout placed of each. */
export function editorLinesOf(
  lines: readonly DraftLine[],
  info: ReadonlyMap<string, LineInfo>,
  placedByLine: ReadonlyMap<string, number> | null,
  colours: readonly string[],
  savedLineIds: ReadonlySet<string>,
): EditorLine[] {
  return lines.map((l, i) => {
    const li = info.get(l.requestLineId);
    return {
      requestLineId: l.requestLineId,
      partName: li?.partName ?? 'Unknown part',
      requestTitle: li?.requestTitle ?? '',
      dueDate: li?.dueDate ?? '',
      priority: li?.priority ?? 'normal',
      sizeMm: li?.sizeMm ?? [0, 0, 0],
      quantity: l.quantity,
      maxQuantity: Math.max(l.quantity, li?.maxQuantity ?? l.quantity),
      rule: l.orientation ?? li?.partRule ?? 'any',
      ruleOverride: l.orientation,
      partRule: li?.partRule ?? 'any',
      placed: placedByLine ? (placedByLine.get(l.requestLineId) ?? 0) : null,
      colour: colours[i],
      added: !savedLineIds.has(l.requestLineId),
    };
  });
}

// ---- packing runs ------------------------------------------------------------

/**
 * A packing's best layout so far, folded into the layout being made. A fill
 * makes the plan take what it placed: each line's quantity grows by its placed
 * count, and a line new to the plan comes in with exactly that many. With
 * `check`, kept and new placements are checked together against the plan's
 * full instance; a failure is the layout's problem, and the result shown stays.
 * `instanceOf` builds the plan's instance for a list of lines.
 */
export function foldBest(
  w: Working,
  best: PackResult,
  check: boolean,
  instanceOf: (lines: DraftLine[]) => PackInstanceInput,
  /** Each line's part volume (its mesh's), for a layout by shape's density. */
  volumeOf?: (requestLineId: string) => number | undefined,
): Working {
  if (w.mode === 'pack') return { ...w, result: best, problem: null };
  let instance = w.instance;
  let lines = w.lines;
  if (w.mode === 'fill') {
    const added = countById(best.placements);
    const next = w.baseLines.map((l) => ({ ...l, quantity: l.quantity + (added.get(l.requestLineId) ?? 0) }));
    for (const [id, n] of added) if (!next.some((l) => l.requestLineId === id)) next.push({ requestLineId: id, quantity: n, orientation: null });
    lines = next;
    instance = instanceOf(next);
  }
  if (!check) {
    const height = Math.max(best.height, ...w.kept.map((p) => p.position[2] + p.size[2]));
    return { ...w, instance, lines, result: { ...best, placements: [...w.kept, ...best.placements], height }, problem: null };
  }
  // Parts placed by shape may share box space: then only what joins the kept and the new is checked (mergeAbove).
  const byShape = isByShape({ placements: w.kept }) || isByShape(best);
  const merged = byShape ? mergeAbove(instance, w.kept, best.placements, best.elapsedMs, volumeOf) : mergeLayouts(instance, w.kept, best.placements, best.elapsedMs);
  return merged.ok ? { ...w, instance, lines, result: merged.result, problem: null } : { ...w, instance, lines, problem: merged.message };
}

/** A layout made from other lines than the plan's now cannot be kept: the server would refuse it. */
export function isStale(working: Working | null, fullInstance: PackInstanceInput): boolean {
  return !!working && partsKey(working.instance) !== partsKey(fullInstance);
}

/** A layout not kept yet may be kept once its run ended, for the lines as they are, with nothing at fault (`faults`: placements a hand edit left breaking the rules). */
export function canKeep(working: Working | null, opts: { editable: boolean; running: boolean; stale: boolean; faults?: number }): boolean {
  return opts.editable && !!working?.result && !working.problem && !opts.running && !opts.stale && !opts.faults && working.result.placements.length > 0;
}

/** What the planner does to the chosen placements by hand. */
export type HandEdit = { kind: 'move'; dxMm: number; dyMm: number } | { kind: 'turn' } | { kind: 'drop' };

/**
 * The layout after a hand edit of the chosen placements, summarised again (height, layers, density): moved
 * across the plate or turned a quarter turn about z at their height, or dropped to the lowest free height.
 * A move or turn may leave parts closer than the spacing: editFaults finds them. In a layout packed by shape
 * the changed parts are listed again where they can be lifted out in turn (inLiftOrder); `indexOf` then gives
 * each old index's new one.
 */
export function handEdited(
  instance: PackInstanceInput,
  result: PackResult,
  chosen: ReadonlySet<number>,
  edit: HandEdit,
): { ok: true; result: PackResult; indexOf?: number[] } | { ok: false; message: string } {
  const parsed = parseInstance(instance);
  if (!parsed.ok || chosen.size === 0) return { ok: false, message: 'Mark a part first.' };
  const inst = parsed.instance;
  let placements: Placement[];
  if (edit.kind === 'move') placements = movedPlacements(inst, result.placements, chosen, edit.dxMm, edit.dyMm);
  else if (edit.kind === 'drop') placements = droppedPlacements(inst, result.placements, chosen);
  else {
    const turned = turnedPlacements(inst, result.placements, chosen);
    if (!turned.ok) return turned;
    placements = turned.placements;
  }
  if (isByShape(result)) {
    const ordered = inLiftOrder(placements, chosen);
    return { ok: true, result: summariseLayout(inst, ordered.placements, result.elapsedMs), indexOf: ordered.indexOf };
  }
  return { ok: true, result: summariseLayout(inst, placements, result.elapsedMs) };
}

/**
 * A layout by shape after a drop worked out against the meshes (in the packing worker): its placements, listed
 * again in lift-out order, summarised (height, layers, density) as a hand edit is; null when the instance does not
 * read.
 */
export function droppedByShapeResult(instance: PackInstanceInput, result: PackResult, placements: Placement[]): PackResult | null {
  const parsed = parseInstance(instance);
  return parsed.ok ? summariseLayout(parsed.instance, placements, result.elapsedMs) : null;
}

/** Marked parts dragged across the plate, as the release would leave them (see dragPreview). */
export interface DragPreview {
  /** The layout in its own order: the marks and the view keep their indices while dragging. */
  result: PackResult;
  /** The parts at fault by the quick check (boxes, for a layout by shape), by their indices in `result`. */
  faults: Set<number>;
  /** The same layout as the release lists it (packed by shape: the moved parts listed again in lift-out order). */
  lifted: PackResult;
  /** The parts changed by hand, by their indices in `lifted`: what an exact check of the drag looks at. */
  liftedMoved: number[];
  /** Index in `result` of each index in `lifted`. */
  shownIndex: (lifted: number) => number;
}

/**
 * Marked parts dragged by (dxMm, dyMm), as the release would leave them: the layout in its own order (the marks
 * and the view keep their indices while dragging) and the parts at fault, checked as after the release (packed
 * by shape, the moved parts first listed again where they can be lifted out in turn), by their indices here.
 */
export function dragPreview(
  instance: PackInstanceInput,
  result: PackResult,
  chosen: ReadonlySet<number>,
  dxMm: number,
  dyMm: number,
  handMoved: readonly number[] = [],
): DragPreview | null {
  const out = handEdited(instance, result, chosen, { kind: 'move', dxMm, dyMm });
  if (!out.ok) return null;
  const moved = [...new Set([...handMoved, ...chosen])];
  const idx = out.indexOf;
  if (!idx) return { result: out.result, faults: editFaults(instance, out.result, moved), lifted: out.result, liftedMoved: moved, shownIndex: (n) => n };
  const back = new Array<number>(idx.length);
  idx.forEach((n, o) => (back[n] = o));
  const liftedMoved = moved.map((i) => idx[i]);
  const faults = editFaults(instance, out.result, liftedMoved);
  return {
    result: { ...out.result, placements: idx.map((n) => out.result.placements[n]) },
    faults: new Set([...faults].map((n) => back[n])),
    lifted: out.result,
    liftedMoved,
    shownIndex: (n) => back[n],
  };
}

/** The placements of a layout that break the rules (closer than the spacing, outside the usable region), by index. */
export function editFaults(instance: PackInstanceInput, result: PackResult, handMoved?: Iterable<number>): Set<number> {
  const parsed = parseInstance(instance);
  if (!parsed.ok) return new Set();
  // Packed by shape, parts may share box space: only what was changed by hand is checked (shapeEditFaults).
  if (isByShape(result)) return shapeEditFaults(parsed.instance, result.placements, handMoved ?? []);
  return placementsAtFault(validateLayout(parsed.instance, result));
}

/** The indices moved by hand after placements at `removed` are taken out: those left, renumbered. */
export function movedAfterRemoval(handMoved: readonly number[], removed: ReadonlySet<number>): number[] {
  const gone = [...removed].sort((a, b) => a - b);
  return handMoved.filter((i) => !removed.has(i)).map((i) => i - gone.filter((r) => r < i).length);
}

/** A layout packed by shape: its mesh parts carry their transforms (a layout of boxes never does). */
export function isByShape(result: Pick<PackResult, 'placements'> | null | undefined): boolean {
  return !!result && result.placements.some((p) => !!p.transform);
}

/** The label a kept layout gets: how it was made, the seed of a plain packing, and its layers. */
export function keptLabel(working: Working & { result: PackResult }): string {
  const how = working.mode === 'fill' ? 'Filled' : working.mode === 'repack' ? 'Re-packed' : working.mode === 'edit' ? 'Edited' : 'Seed';
  const byShape = isByShape(working.result) ? ' by shape' : '';
  return `${`${how} ${working.mode === 'pack' ? working.instance.seed : ''}`.trim()}${byShape} · ${working.result.layers} layers`;
}

export const PACKING_WHAT: Record<WorkMode, string> = {
  pack: 'Packing every line',
  repack: 'Packing what is new above the locked parts',
  fill: 'Filling the free space above',
  edit: 'Packing',
};

/**
 * Re-packing a locked layout keeps as many of its placements of each line as
 * the plan still asks for and packs the rest above them.
 */
export function repackOf(locked: Pick<PackResult, 'placements'>, full: PackInstanceInput): { kept: Placement[]; engine: PackInstanceInput } {
  const want = new Map(full.parts.map((p) => [p.id, p.quantity] as const));
  const taken = new Map<string, number>();
  const kept: Placement[] = [];
  for (const p of locked.placements) {
    const n = taken.get(p.id) ?? 0;
    if (n < (want.get(p.id) ?? 0)) {
      kept.push(p);
      taken.set(p.id, n + 1);
    }
  }
  const parts = full.parts.map((p) => ({ ...p, quantity: p.quantity - (taken.get(p.id) ?? 0) }));
  return { kept, engine: instanceAbove(full, kept, parts, 'min-height') };
}

export function repackAvailability(lockedInstance: PackInstanceInput | null, full: PackInstanceInput): { available: boolean; reason: string | null } {
  if (!lockedInstance) return { available: false, reason: 'Lock a kept layout, change the lines, then re-pack only what is new.' };
  if (partsKey(lockedInstance) === partsKey(full)) return { available: false, reason: 'The locked layout already holds these lines.' };
  return { available: true, reason: null };
}

export interface FillCandidate {
  line: OpenLineView;
  /** How many more the request line still needs. */
  extra: number;
}

/** Open request lines of the material that the plan does not hold yet, in the server's order (most urgent first). */
export function fillCandidatesOf(openLines: readonly OpenLineView[], lines: readonly DraftLine[]): FillCandidate[] {
  const inPlan = new Map(lines.map((l) => [l.requestLineId, l.quantity] as const));
  return openLines
    .map((o) => ({ line: o, extra: o.remaining - (inPlan.get(o.requestLineId) ?? 0) }))
    .filter((c) => c.extra > 0 && !inPlan.has(c.line.requestLineId));
}

export function fillReasonOf(shownResult: PackResult | null, shownInstance: PackInstanceInput | null, full: PackInstanceInput, available: number): string | null {
  if (!shownResult) return 'Pack first: the rest is filled around a layout.';
  if (partsKey(shownInstance) !== partsKey(full)) return 'The lines changed since this layout was packed: pack or re-pack first.';
  if (available === 0) return 'No other open request lines in this material.';
  return null;
}

/**
 * The instance a fill packs: the candidates in the slab above the shown
 * layout, as low as they go when they may all fit, else as much volume as
 * fits (more than one build's worth cannot all fit).
 */
export function fillInstanceOf(
  candidates: readonly FillCandidate[],
  full: PackInstanceInput,
  shown: readonly Placement[],
  machine: MachineLike,
  material: MaterialLike,
  options: DraftOptions,
): PackInstanceInput {
  const candidateLines: InstanceLine[] = candidates.map((c) => ({
    requestLineId: c.line.requestLineId,
    quantity: c.extra,
    orientation: c.line.part.orientation,
    sizeMm: c.line.part.sizeMm,
  }));
  const parts = buildInstance(candidateLines, machine, material, options).parts;
  const slab = instanceAbove(full, [...shown], parts, 'min-height');
  const parsed = parseInstance(slab);
  const crowded = parsed.ok && buildCountLowerBound(parsed.instance) > 1;
  return crowded ? { ...slab, objective: 'max-volume' as const } : slab;
}

// ---- the layout shown -----------------------------------------------------------

type LayoutRef = Pick<LayoutSummaryView, 'id' | 'createdAt'>;

/** The planner's choice, else the chosen layout, else the newest; the packing not kept only while there is one. */
export function shownLayoutId(choice: string | null, hasWorking: boolean, plan: { chosenLayoutId?: string | null; layouts: readonly LayoutRef[] }): string | null {
  const latest = plan.layouts.reduce<LayoutRef | null>((a, l) => (!a || l.createdAt > a.createdAt ? l : a), null);
  const fallback = plan.chosenLayoutId ?? latest?.id ?? null;
  if (choice === WORKING && !hasWorking) return fallback;
  return choice ?? fallback;
}

/** The id to fetch, when the shown layout is one of the plan's stored ones. */
export function storedLayoutId(shownId: string | null, layouts: readonly LayoutRef[]): string | null {
  return shownId && shownId !== WORKING && layouts.some((l) => l.id === shownId) ? shownId : null;
}

/** Colours and view order: the plan's lines first, then parts only the shown layout holds. */
export function colourOrderOf(lineOrder: readonly string[], shownInstance: Pick<PackInstanceInput, 'parts'> | null): string[] {
  const ids = [...lineOrder];
  for (const p of shownInstance?.parts ?? []) if (!ids.includes(p.id)) ids.push(p.id);
  return ids;
}

/**
 * The layers a build takes as the machine prints them, the one count the slider, the numbers, the chart and the
 * heat warnings all use (and the print time is computed from): from the chamber floor, so the powder under the
 * parts (the floor margin) counts, up to the top margin of powder over the highest part. Layer k is the k-th from
 * the floor, its top at k x the layer height.
 */
export interface BuildStack {
  layers: number;
  layerHeightMm: number;
  /** Top of the last layer: layers x layer height. */
  topMm: number;
  floorMarginMm: number;
  /** From the floor margin to the top of the highest part. */
  partsMm: number;
  topMarginMm: number;
}

export function buildStackOf(heightMm: number, margin: { bottom: number; top: number }, layerHeightMm: number): BuildStack {
  const any = heightMm > 0;
  const layers = any ? layerCount(heightMm, margin.top, layerHeightMm) : 0;
  return {
    layers,
    layerHeightMm,
    topMm: layers * layerHeightMm,
    floorMarginMm: any ? margin.bottom : 0,
    partsMm: any ? Math.max(0, heightMm - margin.bottom) : 0,
    topMarginMm: any ? margin.top : 0,
  };
}

/** One short line under a layer count: what it is made of. */
export function stackNote(s: BuildStack): string {
  if (s.layers === 0) return 'No layers: nothing is placed.';
  const f = (v: number) => `${Number(v.toFixed(2))} mm`;
  return `${s.layers} layers of ${s.layerHeightMm} mm as printed: ${f(s.floorMarginMm)} of powder under the parts (floor margin), ${f(s.partsMm)} of parts, ${f(s.topMarginMm)} over them.`;
}

/** The cut moved by whole layers, up to the top of the last layer printed; at the top it is no cut (null). */
export function movedCutMm(cutMm: number | null, stackTopMm: number, layerHeightMm: number, layers: number): number | null {
  const top = Math.max(stackTopMm, layerHeightMm);
  const current = cutMm ?? top;
  const next = Math.max(0, Math.min(top, Math.round(current / layerHeightMm + layers) * layerHeightMm));
  return next >= top ? null : next;
}

export function workingRow(working: Working & { result: PackResult }, running: boolean, numbers: ShownNumbers | null, stale: boolean): LayoutRow {
  return {
    id: WORKING,
    label: running ? 'Packing…' : 'Not kept yet',
    numbers,
    chosen: false,
    locked: false,
    matchesPlan: !stale,
    settings: `${working.instance.layerHeight} mm layers · seed ${working.instance.seed} · ${working.instance.spacing} mm gap`,
    working: true,
  };
}

export function shownLabelOf(a: {
  showingWorking: boolean;
  working: Working | null;
  running: boolean;
  stale: boolean;
  summary: Pick<LayoutSummaryView, 'label' | 'chosen' | 'locked'> | null;
  fetching: boolean;
}): string {
  if (a.showingWorking) {
    if (!a.working?.result) return a.running ? 'Packing: waiting for the first layout' : 'This packing gave no layout';
    if (a.running) return 'Packing: best layout so far';
    if (a.stale) return 'Not kept · the lines changed since, pack again';
    return `Not kept yet · ${a.working.mode === 'fill' ? 'filled' : a.working.mode === 'edit' ? 'edited' : 'packed'}`;
  }
  if (a.summary) return `${a.summary.label}${a.summary.chosen ? ' · chosen' : ''}${a.summary.locked ? ' · locked' : ''}`;
  return a.fetching ? 'Loading layout…' : 'No layout yet: pack the plan';
}

// ---- review ---------------------------------------------------------------------

/** Why the plan cannot be sent for review yet, or null when it can. */
export function submitBlockOf(layouts: readonly Pick<LayoutSummaryView, 'chosen' | 'matchesPlan'>[], dirty: boolean): string | null {
  const chosen = layouts.find((l) => l.chosen) ?? null;
  if (!chosen) return 'Choose a layout first.';
  if (!chosen.matchesPlan) return 'The chosen layout no longer matches the lines: pack and choose again.';
  if (dirty) return 'Save or undo your changes first.';
  return null;
}

/**
 * The time limit a packing by shape of `parts` parts is suggested, in seconds: 1 s per 50 parts, at least 4 s
 * (the editor's default). Measured with the packing benchmark (docs/benchmarks.md): the first layout by shape
 * takes about 1.5 ms a part and its check about 0.5 ms more, so 2,000 parts at 10 s get no further than it, while
 * 40 s leaves room for the search that nests them (and 10 s does for 500). And 3 s per million triangles of all the
 * copies (`placedTriangles`): every layout is settled, sliced and checked against them; 248 parts of 1,000 to
 * 49,000 triangles (3.1 million placed) got no further than the first layout at 5 and 6 s and nested at 8 and 10 s
 * (the packing command on STL files, docs/benchmarks.md).
 */
export function suggestedShapeSeconds(parts: number, placedTriangles = 0): number {
  return Math.max(4, Math.ceil(parts / 50), Math.ceil((3 * placedTriangles) / 1e6));
}

/** The parts among the lines that hold copies, each once (one part on several lines), in the lines' order. */
function partsWithCopies<T extends Pick<LineInfo, 'partId'>>(lines: readonly Pick<DraftLine, 'requestLineId' | 'quantity'>[], info: ReadonlyMap<string, T>): T[] {
  const parts = new Map<string, T>();
  for (const l of lines) {
    const i = info.get(l.requestLineId);
    if (i && l.quantity > 0) parts.set(i.partId, i);
  }
  return [...parts.values()];
}

/** Triangles of the distinct parts' meshes among the lines that hold copies (`info`: the lines' parts). */
export function meshTrianglesOf(lines: readonly Pick<DraftLine, 'requestLineId' | 'quantity'>[], info: ReadonlyMap<string, Pick<LineInfo, 'partId' | 'triangles'>>): number {
  return partsWithCopies(lines, info).reduce((n, p) => n + p.triangles, 0);
}

/** Triangles of all the copies the lines hold (`info`: the lines' parts). */
export function placedTrianglesOf(lines: readonly Pick<DraftLine, 'requestLineId' | 'quantity'>[], info: ReadonlyMap<string, Pick<LineInfo, 'triangles'>>): number {
  return lines.reduce((n, l) => n + Math.max(0, l.quantity) * (info.get(l.requestLineId)?.triangles ?? 0), 0);
}

/**
 * The distinct parts among the lines that hold copies whose mesh is not closed, by name, in the lines' order:
 * packing by shape packs them by their boxes (`info`: the lines' parts).
 */
export function openMeshPartsOf(lines: readonly Pick<DraftLine, 'requestLineId' | 'quantity'>[], info: ReadonlyMap<string, Pick<LineInfo, 'partId' | 'partName' | 'watertight'>>): string[] {
  return partsWithCopies(lines, info)
    .filter((p) => !p.watertight)
    .map((p) => p.partName);
}

/** Before packing by shape: which parts it will pack by their boxes, their meshes not being closed (null when none). */
export function openMeshNote(names: readonly string[]): string | null {
  if (names.length === 0) return null;
  const shown = names.length > 4 ? `${names.slice(0, 3).map((n) => `"${n}"`).join(', ')} and ${names.length - 3} more` : names.map((n) => `"${n}"`).join(names.length === 2 ? ' and ' : ', ');
  const one = names.length === 1;
  return `${shown} ${one ? 'has a mesh that is' : 'have meshes that are'} not closed: packing by shape packs ${one ? 'it by its box' : 'them by their boxes'}. Upload a closed mesh as a new revision of ${one ? 'the part' : 'each part'} to nest ${one ? 'it' : 'them'}.`;
}

/**
 * A note when packing by shape is given less time than its parts are suggested (null when the limit will do):
 * for heavy meshes (`triangles`: the distinct parts' meshes together) however few the parts, since the packing
 * then falls back to the parts' boxes; for many parts, from 200 on (below, a shorter limit was chosen on purpose);
 * for many triangles in all (`placedTriangles`: all the copies'), which every layout is checked against.
 */
export function shapeTimeNote(parts: number, timeLimitMs: number, triangles = 0, placedTriangles = 0): string | null {
  const heavy = meshShapeSeconds(triangles);
  if (parts > 0 && timeLimitMs < heavy * 1000) {
    const millions = (triangles / 1e6).toFixed(1);
    return `These parts' meshes hold ${millions} million triangles: packing by shape needs about ${heavy} s to prepare them, and with less it packs the parts by their boxes. Give it ${Math.max(heavy, suggestedShapeSeconds(parts, placedTriangles))} s or more.`;
  }
  const s = suggestedShapeSeconds(parts, placedTriangles);
  if (s <= 4 || timeLimitMs >= s * 1000) return null;
  if (s > suggestedShapeSeconds(parts)) {
    const millions = (placedTriangles / 1e6).toFixed(1);
    return `The ${parts} parts hold ${millions} million triangles in all: packing by shape settles and checks each layout against them, which takes seconds. Give it ${s} s or more to nest them lower.`;
  }
  const first = Math.max(1, Math.round((parts * 2) / 1000));
  return `With ${parts} parts, packing by shape spends about ${first} s on its first layout alone: give it ${s} s or more to nest them lower.`;
}
