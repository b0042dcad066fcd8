// Over 450 lines: one anytime packing search (greedy start, beam search, compaction under a time budget) whose steps share the model and budget state.
import { lowerBound } from './bounds';
import { layerCount, orientationCode, orientedSize, usableRegion } from './geometry';
import { createRandom, type Random } from './prng';
import { shelfFill } from './shelf';
import {
  applyChoice,
  cloneState,
  complete,
  initialState,
  nextChoices,
  type BoxType,
  type ContainerProblem,
  type SolverState,
} from './solver';
import { RESULT_FORMAT, type Orientation, type PackInstance, type PackResult, type Placement, type Vec3 } from './types';
import { validateLayout } from './validate';

export type PackPhase = 'greedy' | 'search' | 'done';

export interface PackRunHooks {
  /** Called at most every `yieldMs` and on every improvement; `best` is null until the first layout. */
  onProgress?: (phase: PackPhase, shareDone: number, best: PackResult | null) => void;
  /** Polled between steps; true ends the run with the best layout so far. */
  shouldStop?: () => boolean;
}

export interface PackOptions {
  /** Milliseconds clock; defaults to globalThis.performance.now. Only the time budget reads it. */
  now?: () => number;
  /** How often the asynchronous run hands control back (ms). */
  yieldMs?: number;
  /**
   * Caps the work of the improvement phase in greedy completions. With a cap the
   * result no longer depends on the machine's speed (useful for reproducible tests).
   */
  maxCompletions?: number;
  /** Parts already in the chamber (real coordinates), kept clear of; used when topping up a build. */
  obstacles?: ReadonlyArray<{ position: Vec3; size: Vec3 }>;
  /**
   * Relative worth of one copy of each part (by part index, default 1): with room
   * for only some parts, the engine prefers the heavier ones. Used to favour urgent work.
   */
  partWeights?: readonly number[];
}

export interface Packing {
  run(hooks?: PackRunHooks): Promise<PackResult>;
  runSync(hooks?: PackRunHooks): PackResult;
  /** The same work as steps: it pauses (yields) every `yieldMs`, for a caller that drives it inside its own loop. */
  steps(hooks?: PackRunHooks): Generator<void, PackResult, void>;
}

interface TypeInfo {
  /** Part indices and how many of each this type holds, in instance order. */
  members: Array<{ part: number; count: number }>;
  /** Real placed size per entry of the solver type's dims. */
  realDims: Vec3[];
  orientations: Orientation[];
}

interface Model {
  inst: PackInstance;
  origin: Vec3;
  extent: Vec3;
  g: number;
  types: BoxType[];
  info: TypeInfo[];
  /** Boxes that fit in no allowed orientation, per part index. */
  neverFits: number[];
  totalBoxes: number;
}

function defaultClock(): () => number {
  const perf = (globalThis as { performance?: { now(): number } }).performance;
  if (perf && typeof perf.now === 'function') return () => perf.now();
  return () => Date.now();
}

function buildModel(inst: PackInstance, weights: readonly number[] = []): Model {
  const { min: origin, extent } = usableRegion(inst);
  const g = inst.spacing;
  const byKey = new Map<string, number>();
  const types: BoxType[] = [];
  const info: TypeInfo[] = [];
  const neverFits = new Array<number>(inst.parts.length).fill(0);
  let totalBoxes = 0;
  inst.parts.forEach((part, p) => {
    if (part.quantity <= 0) return;
    const realDims: Vec3[] = [];
    const orientations: Orientation[] = [];
    for (const o of part.orientations) {
      const d = orientedSize(part.size, o);
      if (d[0] > extent[0] + 1e-9 || d[1] > extent[1] + 1e-9 || d[2] > extent[2] + 1e-9) continue;
      if (realDims.some((r) => r[0] === d[0] && r[1] === d[1] && r[2] === d[2])) continue;
      realDims.push(d);
      orientations.push(o);
    }
    if (realDims.length === 0) {
      neverFits[p] = part.quantity;
      return;
    }
    totalBoxes += part.quantity;
    const weight = weights[p] !== undefined && Number.isFinite(weights[p]) && weights[p] > 0 ? weights[p] : 1;
    const key = `${part.size.join(',')}|${orientations.join(',')}|${weight}`;
    const existing = byKey.get(key);
    if (existing !== undefined) {
      types[existing].count += part.quantity;
      info[existing].members.push({ part: p, count: part.quantity });
      return;
    }
    const dims = new Float64Array(3 * realDims.length);
    realDims.forEach((d, k) => {
      dims[3 * k] = d[0] + g;
      dims[3 * k + 1] = d[1] + g;
      dims[3 * k + 2] = d[2] + g;
    });
    byKey.set(key, types.length);
    types.push({
      dims,
      orientationCodes: Uint8Array.from(orientations.map(orientationCode)),
      count: part.quantity,
      unitValue: part.size[0] * part.size[1] * part.size[2] * weight,
      minDim: Math.min(...dims),
    });
    info.push({ members: [{ part: p, count: part.quantity }], realDims, orientations });
  });
  // Larger boxes first: with many distinct types, the per-space type cap then keeps the big ones.
  const order = types.map((_, i) => i).sort((a, b) => types[b].unitValue - types[a].unitValue || a - b);
  return {
    inst,
    origin,
    extent,
    g,
    types: order.map((i) => types[i]),
    info: order.map((i) => info[i]),
    neverFits,
    totalBoxes,
  };
}

function problemFor(model: Model, usableHeight: number, floorFirst: boolean, wasteWeight: number): ContainerProblem {
  const g = model.g;
  return {
    size: [model.extent[0] + g, model.extent[1] + g, usableHeight + g],
    types: model.types,
    floorFirst,
    wasteWeight,
    maxTypesPerSpace: model.types.length > 48 ? 32 : 1000,
    maxSpaces: 1500,
  };
}

/** Blocks of a solver state turned into chamber placements, in the order they were placed. */
function expand(model: Model, state: SolverState): Placement[] {
  const blocks = [];
  for (let b = state.blocks; b; b = b.prev) blocks.push(b);
  blocks.reverse();
  const memberAt = new Int32Array(model.types.length);
  const usedOfMember = new Int32Array(model.types.length);
  const out: Placement[] = [];
  const { origin } = model;
  for (const b of blocks) {
    const type = model.types[b.type];
    const info = model.info[b.type];
    const d0 = type.dims[3 * b.orient], d1 = type.dims[3 * b.orient + 1], d2 = type.dims[3 * b.orient + 2];
    const real = info.realDims[b.orient];
    const orientation = info.orientations[b.orient];
    for (let i = 0; i < b.nx; i++)
      for (let j = 0; j < b.ny; j++)
        for (let k = 0; k < b.nz; k++) {
          while (usedOfMember[b.type] >= info.members[memberAt[b.type]].count) {
            memberAt[b.type]++;
            usedOfMember[b.type] = 0;
          }
          usedOfMember[b.type]++;
          const part = model.inst.parts[info.members[memberAt[b.type]].part];
          out.push({
            id: part.id,
            position: [origin[0] + b.x + i * d0, origin[1] + b.y + j * d1, origin[2] + b.z + k * d2],
            size: [real[0], real[1], real[2]],
            orientation,
          });
        }
  }
  return out;
}

/**
 * Lets every box fall as far as the floor margin and the spacing allow, lowest
 * first. A box only moves down past boxes it does not overlap in plan view, so
 * the layout stays valid and its height can only shrink.
 */
function compactDown(model: Model, placements: Placement[]): void {
  const n = placements.length;
  if (n === 0) return;
  const g = model.g;
  const tol = 1e-9;
  const order = placements.map((_, i) => i).sort((a, b) => placements[a].position[2] - placements[b].position[2] || a - b);
  const cells = Math.max(1, Math.min(64, Math.ceil(Math.sqrt(n / 2))));
  const cw = [model.extent[0] / cells, model.extent[1] / cells];
  // Per cell the boxes over it, exactly while few; past the cap only the cell's highest top is kept,
  // which may lift a box more than needed but never lets it sink into another.
  const CAP = 48;
  const buckets: number[][] = Array.from({ length: cells * cells }, () => []);
  const coarseTop = new Float64Array(cells * cells).fill(-Infinity);
  const cellOf = (v: number, a: number) => Math.min(cells - 1, Math.max(0, Math.floor((v - model.origin[a]) / cw[a])));
  const floor = model.origin[2];
  const stamp = new Int32Array(n).fill(-1);
  for (const i of order) {
    const p = placements[i];
    const x0 = p.position[0], y0 = p.position[1], x1 = x0 + p.size[0], y1 = y0 + p.size[1];
    const cx0 = cellOf(x0 - g, 0), cx1 = cellOf(x1 + g, 0), cy0 = cellOf(y0 - g, 1), cy1 = cellOf(y1 + g, 1);
    let z = floor;
    for (let cx = cx0; cx <= cx1; cx++)
      for (let cy = cy0; cy <= cy1; cy++) {
        const c = cx * cells + cy;
        if (coarseTop[c] > z) z = coarseTop[c];
        for (const j of buckets[c]) {
          if (stamp[j] === i) continue;
          stamp[j] = i;
          const q = placements[j];
          // Far enough apart in plan view: no need to stack.
          if (q.position[0] >= x1 + g - tol || x0 >= q.position[0] + q.size[0] + g - tol) continue;
          if (q.position[1] >= y1 + g - tol || y0 >= q.position[1] + q.size[1] + g - tol) continue;
          z = Math.max(z, q.position[2] + q.size[2] + g);
        }
      }
    if (z < p.position[2]) p.position[2] = z;
    const top = p.position[2] + p.size[2] + g;
    const hx0 = cellOf(x0, 0), hx1 = cellOf(x1, 0), hy0 = cellOf(y0, 1), hy1 = cellOf(y1, 1);
    for (let cx = hx0; cx <= hx1; cx++)
      for (let cy = hy0; cy <= hy1; cy++) {
        const c = cx * cells + cy;
        const list = buckets[c];
        if (list.length < CAP) list.push(i);
        else if (top > coarseTop[c]) coarseTop[c] = top;
      }
  }
}

function summarise(model: Model, placements: Placement[], elapsedMs: number): PackResult {
  const inst = model.inst;
  const placedOf = new Map<string, number>();
  let top = 0;
  let volume = 0;
  for (const p of placements) {
    placedOf.set(p.id, (placedOf.get(p.id) ?? 0) + 1);
    top = Math.max(top, p.position[2] + p.size[2]);
    volume += p.size[0] * p.size[1] * p.size[2];
  }
  const unplaced = [];
  for (const part of inst.parts) {
    const count = part.quantity - (placedOf.get(part.id) ?? 0);
    if (count > 0) unplaced.push({ id: part.id, count });
  }
  const any = placements.length > 0;
  const height = any ? top : 0;
  const { extent } = model;
  const denominator =
    inst.objective === 'min-height' ? extent[0] * extent[1] * (height - inst.margin.bottom) : extent[0] * extent[1] * extent[2];
  return {
    format: RESULT_FORMAT,
    placements,
    unplaced,
    height,
    layers: layerCount(height, inst.margin.top, inst.layerHeight),
    utilization: any && denominator > 0 ? volume / denominator : 0,
    elapsedMs: Math.round(elapsedMs * 10) / 10,
  };
}

interface Ctx {
  model: Model;
  now: () => number;
  start: number;
  deadline: number;
  yieldMs: number;
  lastYield: number;
  hooks: PackRunHooks;
  stopped: boolean;
  completionsLeft: number;
  best: PackResult | null;
  bestValue: number;
  phase: PackPhase;
  random: Random;
  obstacles: number[][];
}

/** True when the run must end now: time, the caller, or the work cap. */
function outOfBudget(ctx: Ctx): boolean {
  if (ctx.stopped) return true;
  if (ctx.hooks.shouldStop?.()) {
    ctx.stopped = true;
    return true;
  }
  if (ctx.completionsLeft <= 0) return true;
  return ctx.now() >= ctx.deadline;
}

function shouldYield(ctx: Ctx): boolean {
  const t = ctx.now();
  if (t - ctx.lastYield < ctx.yieldMs) return false;
  ctx.lastYield = t;
  ctx.hooks.onProgress?.(ctx.phase, shareDone(ctx, t), ctx.best);
  return true;
}

function shareDone(ctx: Ctx, t: number): number {
  const total = ctx.deadline - ctx.start;
  return total > 0 ? Math.min(1, Math.max(0, (t - ctx.start) / total)) : 1;
}

/**
 * Is layout (value, height) better than the best so far? More (weighted) placed
 * volume first; for min-height, among equal volumes the lower one.
 */
function better(ctx: Ctx, value: number, height: number): boolean {
  if (!ctx.best) return true;
  const relative = 1e-12 * Math.max(1, Math.abs(ctx.bestValue));
  if (value > ctx.bestValue + relative) return true;
  if (value < ctx.bestValue - relative) return false;
  return ctx.model.inst.objective === 'min-height' && height < ctx.best.height - 1e-9;
}

/** Keeps a layout if it is better and passes the validator. */
function offer(ctx: Ctx, placements: Placement[], value: number): PackResult | null {
  const model = ctx.model;
  // Obstacles are not known to the fall, so layouts around them stay where the solver put them.
  if (model.inst.objective === 'min-height' && ctx.obstacles.length === 0) compactDown(model, placements);
  const result = summarise(model, placements, ctx.now() - ctx.start);
  if (!better(ctx, value, result.height)) return null;
  if (validateLayout(model.inst, result).length > 0) return null;
  ctx.best = result;
  ctx.bestValue = value;
  ctx.hooks.onProgress?.(ctx.phase, shareDone(ctx, ctx.now()), result);
  return result;
}

function obstacleBoxes(model: Model, obstacles: PackOptions['obstacles']): number[][] {
  if (!obstacles) return [];
  const g = model.g;
  // An obstacle grown by g on its far sides, in solver coordinates, keeps the spacing to new boxes.
  return obstacles.map((o) => [
    o.position[0] - model.origin[0],
    o.position[1] - model.origin[1],
    o.position[2] - model.origin[2],
    o.position[0] - model.origin[0] + o.size[0] + g,
    o.position[1] - model.origin[1] + o.size[1] + g,
    o.position[2] - model.origin[2] + o.size[2] + g,
  ]);
}

/** A greedy fill; once a first layout exists it gives up (incomplete) when the budget runs out. */
function greedy(ctx: Ctx, problem: ContainerProblem): SolverState {
  ctx.completionsLeft--;
  const abort = ctx.best ? () => ctx.stopped || ctx.now() >= ctx.deadline || !!ctx.hooks.shouldStop?.() : undefined;
  return complete(problem, initialState(problem, ctx.obstacles), abort);
}

/**
 * Beam search with a greedy completion per node: every child is completed
 * greedily, the completions rank the children and the best `width` survive.
 * Every completion is a full layout, so the search is anytime.
 * Returns the best completed state, or null when stopped before any.
 */
function* beam(
  ctx: Ctx,
  problem: ContainerProblem,
  width: number,
  branching: number,
  done: (s: SolverState) => boolean,
): Generator<void, SolverState | null, void> {
  let level: SolverState[] = [initialState(problem, ctx.obstacles)];
  let best: SolverState | null = null;
  while (level.length > 0) {
    const children: Array<{ state: SolverState; score: number }> = [];
    for (const node of level) {
      const next = nextChoices(problem, node, branching);
      if (!next) continue;
      for (const c of next.choices) {
        if (outOfBudget(ctx)) return best;
        if (shouldYield(ctx)) yield;
        const child = cloneState(node);
        applyChoice(problem, child, next.space, next.corner, c);
        const finished = complete(problem, cloneState(child), () => ctx.now() >= ctx.deadline || ctx.stopped);
        ctx.completionsLeft--;
        if (!best || finished.value > best.value) {
          best = finished;
          if (done(finished)) return best;
        }
        children.push({ state: child, score: finished.value });
      }
    }
    children.sort((a, b) => b.score - a.score);
    level = children.slice(0, width).map((c) => c.state);
  }
  return best;
}

const SCHEDULE: ReadonlyArray<readonly [number, number]> = [
  [1, 2],
  [2, 3],
  [4, 4],
  [8, 4],
  [12, 6],
  [20, 8],
  [32, 10],
  [48, 12],
  [64, 16],
];

/**
 * Thousands of distinct parts: a layer-and-row fill first, so that a valid layout exists
 * within milliseconds whatever the block solver needs.
 */
function quickFirstLayout(ctx: Ctx): void {
  // Only for many distinct parts (few copies each): blocks of copies then cannot speed the solver up.
  if (ctx.best || ctx.model.totalBoxes < 1000 || ctx.model.types.length < 0.2 * ctx.model.totalBoxes) return;
  const s = shelfFill(problemFor(ctx.model, ctx.model.extent[2], true, 1));
  offer(ctx, expand(ctx.model, s), s.value);
}

function* maxVolume(ctx: Ctx): Generator<void, void, void> {
  const model = ctx.model;
  const h = model.extent[2];
  quickFirstLayout(ctx);
  const variants = [problemFor(model, h, false, 1), problemFor(model, h, false, 0), problemFor(model, h, true, 1)];
  ctx.phase = 'greedy';
  let bestValue = -1;
  for (const problem of variants) {
    const s = greedy(ctx, problem);
    if (s.value > bestValue) {
      bestValue = s.value;
      offer(ctx, expand(model, s), s.value);
    }
    if (s.boxesLeft === 0 || outOfBudget(ctx)) return;
    if (shouldYield(ctx)) yield;
  }
  ctx.phase = 'search';
  for (let round = 0; ; round++) {
    const [width, branching] = SCHEDULE[Math.min(round, SCHEDULE.length - 1)];
    const problem = variants[round % 2];
    const s = yield* beam(ctx, problem, width, branching, (x) => x.boxesLeft === 0);
    if (s && s.value > bestValue) {
      bestValue = s.value;
      offer(ctx, expand(model, s), s.value);
    }
    if ((s && s.boxesLeft === 0) || outOfBudget(ctx)) return;
    if (round >= SCHEDULE.length * 2 && ctx.completionsLeft === Infinity) {
      // The widest beam has run on both variants: carry on with jittered scoring.
      problem.wasteWeight = 0.5 + ctx.random();
    }
  }
}

/**
 * Lowest height: a search on the usable height with the container solver,
 * first greedily (bisection between the lower bound and the best found), then
 * with the beam search just under the best height until time runs out.
 */
function* minHeight(ctx: Ctx): Generator<void, void, void> {
  const model = ctx.model;
  const inst = model.inst;
  const bottom = inst.margin.bottom;
  const full = model.extent[2];
  ctx.phase = 'greedy';
  quickFirstLayout(ctx);
  // Guesses just above the lower bound first: a fill of the whole chamber stacks columns needlessly high.
  const bound0 = Math.max(0, lowerBound(inst) - bottom);
  let first: SolverState | null = null;
  for (const factor of [1.08, 1.2, 1.5]) {
    const h = bound0 * factor;
    if (h >= full) break;
    // The middle guess only when time allows; 1.5 x the bound nearly always fits, and beats a full-height fill.
    if (factor === 1.2 && ctx.now() - ctx.start > 0.25 * (ctx.deadline - ctx.start)) continue;
    const s = greedy(ctx, problemFor(model, h, true, 1));
    if (s.boxesLeft === 0) {
      first = s;
      break;
    }
  }
  if (!first) first = greedy(ctx, problemFor(model, full, true, 1));
  offer(ctx, expand(model, first), first.value);
  if (first.boxesLeft > 0 && outOfBudget(ctx)) return;
  if (first.boxesLeft > 0) {
    // Not everything fits: the most volume in the whole chamber, lowered afterwards.
    yield* maxVolume(ctx);
    return;
  }
  if (outOfBudget(ctx)) return;
  const usedHeight = () => (ctx.best ? ctx.best.height - bottom : full);
  let lo = Math.max(0, lowerBound(inst) - bottom);
  const step = () => Math.max(inst.layerHeight, 1e-3 * usedHeight());
  const tryHeight = function* (h: number, level: number): Generator<void, boolean, void> {
    for (const floorFirst of [true, false]) {
      for (const w of [1, 0.3]) {
        const jitter = level >= SCHEDULE.length ? 0.6 * ctx.random() : 0;
        const problem = problemFor(model, h, floorFirst, w + jitter);
        if (level < 0) {
          const s = greedy(ctx, problem);
          if (s.boxesLeft === 0) {
            offer(ctx, expand(model, s), s.value);
            return true;
          }
        } else {
          const [width, branching] = SCHEDULE[Math.min(level, SCHEDULE.length - 1)];
          const s = yield* beam(ctx, problem, width, branching, (x) => x.boxesLeft === 0);
          if (s && s.boxesLeft === 0) {
            offer(ctx, expand(model, s), s.value);
            return true;
          }
        }
        if (outOfBudget(ctx)) return false;
        if (shouldYield(ctx)) yield;
      }
    }
    return false;
  };
  // Bisection with greedy fills.
  let hi = usedHeight();
  while (hi - lo > step() && !outOfBudget(ctx)) {
    const mid = (lo + hi) / 2;
    if (yield* tryHeight(mid, -1)) hi = Math.min(mid, usedHeight());
    else lo = mid;
  }
  ctx.phase = 'search';
  // Beam searches under the best height, wider each time the gap closes without success.
  const bound = Math.max(0, lowerBound(inst) - bottom);
  let floorH = lo;
  let level = 0;
  while (!outOfBudget(ctx)) {
    hi = usedHeight();
    if (hi - bound <= step()) break;
    if (hi - floorH <= step()) {
      level++;
      floorH = bound;
    }
    const target = Math.max(floorH, hi - Math.max(step(), (hi - floorH) / 2));
    if (!(yield* tryHeight(target, level))) floorH = target;
  }
}

function* solve(ctx: Ctx): Generator<void, void, void> {
  if (ctx.model.totalBoxes === 0) {
    offer(ctx, [], 0);
    return;
  }
  if (ctx.model.inst.objective === 'max-volume') yield* maxVolume(ctx);
  else yield* minHeight(ctx);
}

/**
 * Prepares a packing of a parsed instance. `run` is asynchronous and hands
 * control back every `yieldMs` so progress and cancellation get through in a
 * worker; `runSync` does the same work without pausing.
 */
export function createPacking(instance: PackInstance, options: PackOptions = {}): Packing {
  const now = options.now ?? defaultClock();
  const makeCtx = (hooks: PackRunHooks): Ctx => {
    const model = buildModel(instance, options.partWeights);
    const start = now();
    const ctx: Ctx = {
      model,
      now,
      start,
      deadline: start + instance.timeLimitMs,
      yieldMs: options.yieldMs ?? 50,
      lastYield: start,
      hooks,
      stopped: false,
      completionsLeft: options.maxCompletions ?? Infinity,
      best: null,
      bestValue: -Infinity,
      phase: 'greedy',
      random: createRandom(instance.seed),
      obstacles: [],
    };
    ctx.obstacles = obstacleBoxes(model, options.obstacles);
    return ctx;
  };
  const finish = (ctx: Ctx): PackResult => {
    const best = ctx.best ?? summarise(ctx.model, [], 0);
    const result = { ...best, elapsedMs: Math.round((ctx.now() - ctx.start) * 10) / 10 };
    ctx.hooks.onProgress?.('done', 1, result);
    return result;
  };
  return {
    runSync(hooks = {}) {
      const ctx = makeCtx(hooks);
      const it = solve(ctx);
      while (!it.next().done);
      return finish(ctx);
    },
    async run(hooks = {}) {
      const ctx = makeCtx(hooks);
      const it = solve(ctx);
      while (!it.next().done) await macrotask();
      return finish(ctx);
    },
    *steps(hooks = {}) {
      const ctx = makeCtx(hooks);
      yield* solve(ctx);
      return finish(ctx);
    },
  };
}

/** Yields to the event loop so that queued messages (progress, cancel) are handled. */
function macrotask(): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, 0));
}

export function packSync(instance: PackInstance, options?: PackOptions): PackResult {
  return createPacking(instance, options).runSync();
}

export function pack(instance: PackInstance, options?: PackOptions): Promise<PackResult> {
  return createPacking(instance, options).run();
}


/** The result record (unplaced counts, height, layers, utilisation) for given placements of an instance. */
export function summariseLayout(instance: PackInstance, placements: Placement[], elapsedMs = 0): PackResult {
  const { extent } = usableRegion(instance);
  return summarise({ inst: instance, extent } as Model, placements, elapsedMs);
}
