// Over 450 lines: one algorithm (the height-map drop and its rotations search), read top to bottom as the paper states it.
/**
 * Packing by shape: parts are dropped straight down, one after another, into
 * a height map of the chamber (per plan cell, the top of what is already
 * there), each at the place and rotation where its top ends lowest, bottom-
 * left first (the bottom-left-lowest rule of Lamas-Fernandez, Bennell &
 * Martinez-Sykora, Oper. Res. 2023, on column profiles). Because each part
 * falls from above into the occupancy of the ones before it, it can be lifted
 * straight out again with them present: the packing order is a lift-out order
 * and no two parts interlock (the vertical-removal rule of Cui et al., ACM
 * TOG 42(4), 2023).
 *
 * The spacing is kept by geometry, not by the grid: the height map is dilated
 * by ceil(spacing / cell) cells and raised by the spacing, the part's column
 * profile holds every point of its triangles (clipped per cell), so any two
 * points of two parts are at least the spacing apart along some axis, hence
 * in space. Every layout offered is checked exactly against the meshes first.
 *
 * The first layout offered is the box engine's, packed for a share of the
 * time and then settled by shape (./settle.ts: each part lowered into the
 * hollows of the ones below it), so a packing by shape is never taller than
 * the boxes it started from. Then a fixed order (largest parts first) is
 * dropped into the height map; until the time limit, other orders and
 * rotation choices are tried and the lowest layout kept.
 */
import { composeRotations, placementTransform, ROTATION_CODES, rotatedExtent, rotationMatrix } from '../../geometry/rotations';
import { usableRegion } from '../geometry';
import { createRandom, type Random } from '../prng';
import type { PackInstance, PackInstanceV2, PackResult, PackResultV2, PackWarning, PlacementV2, Vec3 } from '../types';
import type { PlacedPart } from './area';
import { codeFor, finishResult } from './result';
import { shapeParts, type ShapePart } from './parts';
import { boxInstance, fillWeights, fromBoxResult, meshVolumeWeights, rotationForBox } from './boxfit';
import { createPacking, packSync, type PackOptions } from '../engine';
import { settleLayout, lowerTheTop, type SettleItem } from './settle';
import { bestDrop, drop, newGrid } from './grid';
import { columnProfile, type Profile } from './profile';
import { validateShapeLayout } from './validate';
import { bestPair, buildNests, isHolder, lidsMayHold, type Nest } from './nest';
import { meshShapeSeconds } from './prepTime';
import { copiesPerStack, foreseenHeight, stacksOf, stackTurn, type StackTurn } from './stack';

export type ShapePhase = 'greedy' | 'search' | 'done';

/** A quarter turn about +z: chamber (x, y) -> (-y, x). */
const QUARTER_Z = ROTATION_CODES.indexOf('-y+x+z');
/** Half a turn about +x: (x, y, z) -> (x, -y, -z), upside down. */
const HALF_X = ROTATION_CODES.indexOf('+x-y-z');
/** Box ids of nests in the box engine's instance (nests are not boxed when a part's id starts so). */
const NEST_ID = '\u0000nest:';

export interface ShapeRunHooks {
  onProgress?: (phase: ShapePhase, shareDone: number, best: PackResultV2 | null) => void;
  shouldStop?: () => boolean;
}

export interface ShapeOptions {
  now?: () => number;
  yieldMs?: number;
  /** Caps the number of full packings tried (reproducible tests). */
  maxRuns?: number;
  /** Plan cell size (mm); by default from the spacing and the chamber. */
  cellMm?: number;
  /** Share of the time limit the box engine searches for the layout that is settled by shape (default 0.8; 0: no box layout). */
  boxShare?: number;
  /** Fill the parts' hollows before packing (./nest.ts); true by default. */
  nest?: boolean;
  /** Share of the box search given to the nests' boxes when there are nests (default 0.4; the parts' own boxes get the rest, or a set of nests on a finer cell). */
  nestShare?: number;
  /** Two copies pair up when their box is at most this share of two boxes apart (./nest.ts bestPair; default 0.85). */
  pairGain?: number;
  /** Holder turns the second set of nests tries (./nest.ts buildNests `ways`; default 4; 1: one set only). */
  holderWays?: number;
  /** Let two copies of a holder face each other, the second upside down over what they hold (default true). */
  lids?: boolean;
  /** When the nests pay well, one more set of them filled on a finer plan cell, in the time of the parts' own boxes' search (default true). */
  fineNests?: boolean;
  /** Stack copies of a part that sink into each other (tapered cups, bowls, trays; ./stack.ts); true by default. */
  stacks?: boolean;
}

export interface ShapePacking {
  run(hooks?: ShapeRunHooks): Promise<PackResultV2>;
  runSync(hooks?: ShapeRunHooks): PackResultV2;
}

interface Kind {
  part: ShapePart;
  /** Candidate profiles, best (cheapest) first. */
  profiles: Profile[];
  /** Every allowed rotation's profile, for the search to draw other choices from. */
  allProfiles: Profile[];
  fits: boolean;
  /** The profile of a turn, turned upside down (half a turn about x), when the part allows it and it fits. */
  flip?: (p: Profile) => Profile | null;
}

/** Units the box search may pack as one box each, and how many copies of each kind they hold. */
interface NestSet {
  nests: Nest[];
  used: number[];
  /** The plan cell the nests were filled on (the run's when not given): their members' offsets are in its cells. */
  cell?: number;
  /** The same with stacks of other heights, where the box engine's first layout of those units came out lower. */
  otherStacks?: NestSet;
}

interface Placed {
  kind: number;
  profile: Profile;
  /** Minimum corner of the placed bounding box. */
  position: [number, number, number];
}

function defaultClock(): () => number {
  const perf = (globalThis as { performance?: { now(): number } }).performance;
  if (perf && typeof perf.now === 'function') return () => perf.now();
  return () => Date.now();
}

/** Which part axis (with sign) a rotation stands upright: 0..5. */
function upClass(rotation: number): number {
  const m = rotationMatrix(rotation);
  for (let c = 0; c < 3; c++) if (m[6 + c] !== 0) return 2 * c + (m[6 + c] > 0 ? 0 : 1);
  return 0;
}

export function defaultCell(instance: PackInstanceV2): number {
  const { extent } = usableRegion(instance);
  const g = instance.spacing;
  // Fine enough to follow the parts, coarse enough for a few hundred cells a side.
  const byChamber = Math.max(extent[0], extent[1]) / 220;
  const cell = Math.max(byChamber, 0.5);
  // A whole number of cells per spacing wastes least of it. A spacing under one cell leaves the cell as it is (the
  // height map grows by one cell for it, and the exact check keeps the spacing): shrunk to the spacing, 0.1 mm on a
  // 300 mm chamber drew 13 times finer profiles, and 100 parts took 11 s against a 5 s limit, 370 MB, only to be
  // packed by their boxes.
  return g >= cell ? g / Math.floor(g / cell) : cell;
}

/** A finer plan cell than `cell` for one more set of nests: a whole number of cells per spacing, one more; null when too fine to draw quickly. */
function fineCell(instance: PackInstanceV2, cell: number): number | null {
  const g = instance.spacing;
  const fine = g > 0 ? g / (Math.round(g / cell) + 1) : (2 * cell) / 3;
  return fine >= 0.5 ? fine : null;
}

/** What drawing the profiles may spend, when the run is timed (see solve): null when it need not watch the clock. */
interface ProfileBudget {
  now: () => number;
  /** The rotations' probes must be done by then, or the parts are packed by their boxes. */
  probesBy: number;
  /** Every turn of the best upright axes is drawn only until then; after it, one turn per axis. */
  turnsBy: number;
}

/** Parts of at most this many triangles are light: nested within the spacing of each other, they check about as fast as apart (see solve). */
const LIGHT_MESH = 20_000;
/**
 * With at least this many placements, the box engine's first layout stands for settling's and the check's cost
 * well enough to give up their stages for a longer box search (see solve). With a few, what that layout took is
 * mostly the clock's noise: a cup and four rings whose first layout reads 0.4 s (on a busy machine) take that
 * branch, 37.0 mm by box instead of 30.0 mm with the rings in the cup, though they settle and check in milliseconds.
 */
const MANY_PLACEMENTS = 1000;

/** Triangles of a part's mesh (its box's 12 when it has none). */
function triangles(part: ShapePart): number {
  return part.mesh.indices.length / 3;
}

/**
 * Each part's candidate profiles: one turn per upright axis first (the probes, to rank the axes), then every turn
 * about z of the best three. With a budget, the probes of all parts come first, and the parts are given up (null)
 * when the clock passes `probesBy` before they are done (the rate of a light mesh says little of a heavy one's, so
 * nothing is foretold); the further turns are drawn only while their time lasts (then one turn per axis).
 */
function prepareKinds(instance: PackInstanceV2, parts: ShapePart[], cell: number, warnings: PackWarning[], budget: ProfileBudget | null = null): Kind[] | null {
  const { extent } = usableRegion(instance);
  const g = instance.spacing;
  const fitsIn = (p: Profile) => p.extent[0] <= extent[0] + 1e-9 && p.extent[1] <= extent[1] + 1e-9 && p.extent[2] <= extent[2] + 1e-9;
  const asBoxOf = (part: ShapePart) => part.hasMesh && !part.watertight;
  const caches = parts.map(() => new Map<number, Profile>());
  const profileOf = (part: ShapePart, r: number) => {
    let p = caches[part.index].get(r);
    if (!p) {
      p = columnProfile(part, r, cell, g, asBoxOf(part));
      caches[part.index].set(r, p);
    }
    return p;
  };
  // Per upright axis, one turn probes the cost (turns about z cost about the same).
  const rankings: Array<Array<{ rots: number[]; probe: Profile }>> = [];
  for (const part of parts) {
    const classes = new Map<number, number[]>();
    for (const r of part.rotations) {
      // Rotations whose box cannot fit are dropped before any profile is drawn.
      const e = rotatedExtent(r, part.size);
      if (e[0] > extent[0] + 1e-9 || e[1] > extent[1] + 1e-9 || e[2] > extent[2] + 1e-9) continue;
      const k = upClass(r);
      if (!classes.has(k)) classes.set(k, []);
      classes.get(k)!.push(r);
    }
    const ranked: Array<{ rots: number[]; probe: Profile }> = [];
    for (const rots of classes.values()) {
      // The first turn may not fit where another does: the others only then.
      const first = profileOf(part, rots[0]);
      const probe = fitsIn(first) ? first : rots.slice(1).map((r) => profileOf(part, r)).find(fitsIn);
      if (probe) ranked.push({ rots, probe });
      // The clock is read after each probe: a heavy mesh takes the run at most one profile past its share.
      if (budget && part.quantity > 0 && budget.now() > budget.probesBy) return null;
    }
    ranked.sort((a, b) => a.probe.cost - b.probe.cost);
    rankings.push(ranked);
  }
  return parts.map((part, index) => {
    const asBox = asBoxOf(part);
    if (asBox && part.quantity > 0) {
      warnings.push({
        id: part.id,
        code: 'not-watertight',
        message: `"${part.id}": the mesh is not watertight (it has open or non-manifold edges), so it was packed by its bounding box`,
      });
    }
    const ranked = rankings[index];
    if (ranked.length === 0) return { part, profiles: [], allProfiles: [], fits: false };
    const chosen: Profile[] = [];
    const all: Profile[] = [];
    ranked.forEach(({ rots, probe }, i) => {
      const full = i < 3 && (!budget || budget.now() <= budget.turnsBy);
      for (const r of full ? rots : [probe.rotation]) {
        const p = profileOf(part, r);
        if (!fitsIn(p)) continue;
        all.push(p);
        if (i === 0 || (i <= 2 && ranked[i].probe.cost <= 1.6 * ranked[0].probe.cost)) chosen.push(p);
      }
    });
    chosen.sort((a, b) => a.cost - b.cost);
    const flip = (p: Profile) => {
      const r = composeRotations(p.rotation, HALF_X);
      if (!part.rotations.includes(r)) return null;
      const q = profileOf(part, r);
      return fitsIn(q) ? q : null;
    };
    return { part, profiles: chosen, allProfiles: all, fits: true, flip };
  });
}

/**
 * One full packing. Copies come in `order` (kind indices), but before each
 * one raises the top of the load, every part that can still drop in below
 * that top (into a housing, between brackets' legs, beside taller parts) is
 * dropped there first, larger kinds first: the hollows are filled before they
 * are covered.
 */
function packOnce(instance: PackInstanceV2, kinds: Kind[], nests: readonly Nest[], order: number[], choices: Profile[][], cell: number, abort: () => boolean): Placed[] | null {
  const G = newGrid(instance, cell);
  const placed: Placed[] = [];
  const count = kinds.length + nests.length;
  const left = new Array<number>(count).fill(0);
  for (const k of order) left[k]++;
  // Kinds in the order of their first copy.
  const fillOrder: number[] = [];
  for (const k of order) if (!fillOrder.includes(k)) fillOrder.push(k);
  /** The load's top when a kind last failed to drop in below it (it cannot fit under that top again). */
  const failedAt = new Array<number>(count).fill(-Infinity);
  let top = G.origin[2];
  let steps = 0;
  const place = (kind: number, bound: number): boolean => {
    let best: { u: number; v: number; z: number; score: number; p: Profile } | null = null;
    for (const p of choices[kind]) {
      const d = bestDrop(G, p, best ? best.score : bound);
      if (d) best = { u: d.u, v: d.v, z: d.z, score: d.score, p };
    }
    if (!best) return false;
    drop(G, best.p, best.u, best.v, best.z);
    if (kind < kinds.length) placed.push({ kind, profile: best.p, position: [G.origin[0] + best.u * cell, G.origin[1] + best.v * cell, best.z] });
    else {
      // A nest: its holder, then what it holds, each where it lies in the nest.
      for (const m of nests[kind - kinds.length].members) {
        placed.push({ kind: m.kind, profile: m.profile, position: [G.origin[0] + (best.u + m.du) * cell, G.origin[1] + (best.v + m.dv) * cell, best.z + m.dz] });
      }
    }
    left[kind]--;
    if (best.score > top) top = best.score;
    return true;
  };
  let next = 0;
  for (;;) {
    if ((steps++ & 7) === 0 && abort()) return null;
    // Fill below the current top.
    if (placed.length > 0) {
      for (const k of fillOrder) {
        while (left[k] > 0 && failedAt[k] < top) {
          // Many copies of one kind can fill below the top here: the clock is read between them too.
          if ((steps++ & 7) === 0 && abort()) return null;
          if (!place(k, top + 1e-9)) failedAt[k] = top;
        }
      }
    }
    while (next < order.length && left[order[next]] === 0) next++;
    if (next >= order.length) break;
    const kind = order[next];
    if (!place(kind, Infinity)) {
      // Fits nowhere any more: every copy left of this kind stays unplaced. A nest that no longer fits
      // whole gives its members a place each where they still fit.
      if (kind >= kinds.length) {
        for (; left[kind] > 0; left[kind]--) {
          for (const m of nests[kind - kinds.length].members) {
            left[m.kind]++;
            if (!place(m.kind, Infinity)) left[m.kind]--;
          }
        }
      }
      left[kind] = 0;
    }
  }
  return placed;
}

/** A kind's profile for a rotation (the search's own when it has it; drawn otherwise, only its extent is read). */
function profileFor(kinds: Kind[], kind: number, rotation: number, cell: number, spacing: number): Profile {
  const k = kinds[kind];
  return k.allProfiles.find((p) => p.rotation === rotation) ?? columnProfile(k.part, rotation, cell, spacing, k.part.hasMesh && !k.part.watertight);
}

function summarise(instance: PackInstanceV2, kinds: Kind[], placed: Placed[], elapsedMs: number, warnings: PackWarning[]): PackResultV2 {
  const placements: PlacementV2[] = [];
  const forArea: PlacedPart[] = [];
  const count = new Array<number>(kinds.length).fill(0);
  let top = 0;
  let volume = 0;
  for (const pl of placed) {
    const part = kinds[pl.kind].part;
    const rot = pl.profile.rotation;
    const transform = placementTransform(rot, part.min, part.max, pl.position);
    const size: [number, number, number] = [pl.profile.extent[0], pl.profile.extent[1], pl.profile.extent[2]];
    const out: PlacementV2 = { id: part.id, position: [...pl.position], size, orientation: codeFor(part, rot) };
    if (part.hasMesh) out.transform = [...transform];
    placements.push(out);
    forArea.push({ part, transform });
    count[pl.kind]++;
    top = Math.max(top, pl.position[2] + size[2]);
    volume += part.volume;
  }
  return finishResult(instance, kinds.map((k) => k.part), placements, forArea, count, top, volume, elapsedMs, warnings);
}

/**
 * Builds the trees the exact check needs (./bvh.ts), lightest mesh first, each only while the clock is short of
 * `by` and when it is foreseen to be done by `doneBy`: a tree is built whole, and a million triangles take over a
 * second. The time a tree will take is foretold from the trees built so far, per triangle: doubled for a mesh more
 * than four times the largest of them (a heavy mesh's tree costs about twice as much per triangle as a light
 * one's: 1.2-1.3 against 0.6-0.7 microseconds, measured on the benchmark's machine), else a quarter more; until
 * 50,000 triangles have been built (a few boxes' trees time the clock, not the work), at 1.3 microseconds per
 * triangle (that measure). False when one is left unbuilt: the meshes are too heavy to check in time.
 */
export function* treesInTime(parts: ShapePart[], now: () => number, by: number, doneBy: number): Generator<void, boolean, void> {
  let builtMs = 0;
  let builtTriangles = 0;
  let largest = 0;
  for (const part of parts.filter((p) => p.quantity > 0).sort((a, b) => triangles(a) - triangles(b))) {
    const n = triangles(part);
    const perTriangle = builtTriangles >= 50_000 ? ((n > 4 * largest ? 2 : 1.25) * builtMs) / builtTriangles : 1.3e-3;
    const t = now();
    if (t > by || t + perTriangle * n > doneBy) return false;
    part.bvh();
    builtMs += now() - t;
    builtTriangles += n;
    largest = n;
    yield;
  }
  return true;
}

/** The box engine's search, its pauses this run's: `paused` (progress) is called at each, and a stop gets through. */
function* boxSearch(boxes: PackInstance, options: PackOptions, stop: () => boolean, paused: () => void): Generator<void, PackResult, void> {
  const search = createPacking(boxes, options).steps({ shouldStop: stop });
  let step = search.next();
  while (!step.done) {
    paused();
    yield;
    step = search.next();
  }
  return step.value;
}

/**
 * The parts packed by their boxes, for a quarter of the time left (the area profile of the meshes comes after),
 * and said so: what a run whose meshes are too heavy for its limit returns. Boxes kept the spacing apart keep the
 * meshes in them as far apart, and listed bottom first they lift out (./boxfit.ts), so this layout needs no check.
 */
function* boxesInstead(
  instance: PackInstanceV2,
  parts: ShapePart[],
  now: () => number,
  deadline: number,
  hooks: ShapeRunHooks,
  stop: () => boolean,
): Generator<void, PackResultV2, void> {
  const ms = Math.max(0, Math.round((deadline - now()) / 4));
  const boxes = yield* boxSearch(boxInstance({ ...instance, timeLimitMs: ms }, parts), { now, partWeights: fillWeights(instance, parts) }, stop, () => hooks.onProgress?.('greedy', 0, null));
  const result = fromBoxResult(instance, parts, boxes);
  const used = parts.filter((p) => p.quantity > 0 && p.hasMesh);
  const heaviest = used.reduce<ShapePart | null>((h, p) => (!h || triangles(p) > triangles(h) ? p : h), null);
  const total = used.reduce((n, p) => n + triangles(p), 0);
  if (heaviest) {
    const count = (n: number) => n.toLocaleString('en-US');
    // What the meshes are measured to need, or on a slower machine than that measure, twice what was given.
    const more = Math.max(meshShapeSeconds(total), Math.ceil((2 * instance.timeLimitMs) / 1000));
    const what =
      used.length === 1
        ? `the mesh of "${heaviest.id}" (${count(total)} triangles) takes`
        : `their meshes (${count(total)} triangles; "${heaviest.id}" the largest with ${count(triangles(heaviest))}) take`;
    result.warnings = [
      {
        id: heaviest.id,
        code: 'packed-by-box',
        message: `Packed by the parts' boxes: ${what} longer to prepare for packing by shape than the ${instance.timeLimitMs / 1000} s limit allows; give it ${more} s or more to nest them`,
      },
    ];
  }
  hooks.onProgress?.('greedy', 1, result);
  return result;
}

/** What a run hands out: its best layout, and the box engine's first layout while that is it (not yet settled). */
interface RunOut {
  best: PackResultV2 | null;
  unsettled?: PackResultV2;
  /** The clock stopped a settling or a check. */
  outOfTime?: boolean;
}

function* solve(
  instance: PackInstanceV2,
  options: ShapeOptions,
  hooks: ShapeRunHooks,
  now: () => number,
  out: RunOut,
): Generator<void, void, void> {
  const start = now();
  const deadline = start + instance.timeLimitMs;
  const yieldMs = options.yieldMs ?? 50;
  let lastYield = start;
  const share = () => (instance.timeLimitMs > 0 ? Math.min(1, (now() - start) / instance.timeLimitMs) : 1);
  let stopped = false;
  const stop = () => {
    if (!stopped && hooks.shouldStop?.()) stopped = true;
    return stopped;
  };
  const parts = shapeParts(instance);
  const cell = options.cellMm ?? defaultCell(instance);
  const warnings: PackWarning[] = [];
  let phase: ShapePhase = 'greedy';
  // Timed, heavy meshes must not take the run past its limit: their probe profiles are drawn by half of it (the
  // clock read after each) and their trees for the exact check begun by three quarters and foreseen done by nine
  // tenths, or the parts are packed by their boxes (which keep the spacing between any two meshes they hold) in
  // what is left, saying so. Under a quarter of a second the clock tells more of a cold start than of the meshes,
  // so the shares are never shorter than that. With a cap on the runs nothing here watches the clock.
  const timed = options.maxRuns === undefined;
  const by = (share: number, floorMs: number) => start + Math.max(share * instance.timeLimitMs, floorMs);
  const prepStart = now();
  const prepared = prepareKinds(instance, parts, cell, warnings, timed ? { now, probesBy: by(0.5, 250), turnsBy: by(0.35, 150) } : null);
  const prepMs = now() - prepStart;
  if (!prepared || (timed && !(yield* treesInTime(parts, now, by(0.75, 400), by(0.9, 450))))) {
    out.best = yield* boxesInstead(instance, parts, now, deadline, hooks, stop);
    return;
  }
  const kinds = prepared;
  const random: Random = createRandom(instance.seed);

  let bestHeight = Infinity;
  // What a layout is worth before its height: its copies placed; filling the chamber (max-volume), its parts' volume
  // (the result's utilization), so four solid cubes beat one channel whose box is larger but whose mesh holds less.
  const fill = instance.objective === 'max-volume';
  const volumeById = new Map(parts.map((p) => [p.id, p.volume] as const));
  const worth = (placed: Placed[]) => (fill ? placed.reduce((v, p) => v + parts[p.kind].volume, 0) : placed.length);
  const worthOf = (result: PackResultV2) => (fill ? result.placements.reduce((v, p) => v + (volumeById.get(p.id) ?? 0), 0) : result.placements.length);
  /** -1: a worth less than b; 1: more; 0: the same (to a part in 10^9 of the volume). */
  const compareWorth = (a: number, b: number) => {
    const eps = 1e-9 * Math.max(1, Math.abs(b));
    return a > b + eps ? 1 : a < b - eps ? -1 : 0;
  };
  let bestWorth = -1;
  let runs = 0;
  const maxRuns = options.maxRuns ?? Infinity;

  // Time: each stage after the first layout gets what is left of the limit less what finishing it costs (settling
  // its layout and the exact check), as measured on the way; a layout with nests, whose parts lie within the
  // spacing of many others, takes longer to check than one without, so until one has been checked its check is
  // reckoned at a multiple of the other's: twice for light meshes (the check of repeated pairs done once, nested
  // layouts of the benchmark's mixes took 0.4 to 1.5 times as long as the plain one's at 300 to 2,000 parts).
  // The exact distances between two meshes nested within the spacing grow with their triangles: 30 parts (rings
  // of 10,000 triangles in an open housing) took 0.13 s to check nested; with rings of 40,000, 160,000 and
  // 1,000,000 triangles, 0.44, 1.6 and 9.7 s, against 0.06 s for the last kept apart. So for heavier meshes the
  // multiple grows with the square root of the heaviest one's triangles over LIGHT_MESH, up to 8 times (from
  // 320,000 triangles). It was 8 times for any mesh past LIGHT_MESH: then 248 parts of 1,000 to 49,000 triangles
  // never nested at 10 s and came out higher than by box (bench:pack --heavy: 152.9 against 141.1 mm; now 118.2),
  // where a nested layout's check took 2.3 times the plain one's (2.3 against 1.0 s); in the benchmark's finely
  // tessellated mixes (rings of 37,000 triangles) 2.2 to 3 times. With a cap on the runs (reproducible tests) the
  // stages run as capped, whatever the clock. 3 % of the limit is kept in hand for what the estimates miss.
  const heaviest = parts.reduce((n, p) => (p.quantity > 0 ? Math.max(n, triangles(p)) : n), 0);
  const light = heaviest <= LIGHT_MESH;
  const nestedTimes = light ? 2 : Math.min(8, 2 * Math.sqrt(heaviest / LIGHT_MESH));
  const checkMs = { plain: 0, nested: 0 };
  let settleMs = 0;
  const checkCost = (nested: boolean) => (nested ? checkMs.nested || nestedTimes * checkMs.plain : checkMs.plain);
  /** The nests' layout before the boxes' first layout is settled and checked (see settledBoxes). */
  let nestsFirst = false;
  /** What turning the box engine's first layout into placements took (fromBoxResult). */
  let turnMs = 0;
  /** Time left for a stage whose layout (with nests or not) still has to be settled and checked. */
  const leftFor = (nested: boolean) => deadline - now() - settleMs - checkCost(nested) - 0.03 * instance.timeLimitMs;
  /** A search's stop: timed, when only checking its layout would fit in what is left; capped, at the deadline. */
  const outOfTime = (nested: boolean) => (timed ? leftFor(nested) <= 0 : now() >= deadline) || stop();
  /** Timed and past the limit (noted: a settling or a check it stops leaves the boxes' layout standing, said so). */
  const pastLimit = () => timed && now() > deadline && (out.outOfTime = true);
  const offer = (placed: Placed[], nested = false) => {
    const height = heightOf(placed);
    // The boxes' layout as it stands gives way to the same parts settled and checked, even where none came lower.
    const asLow = out.best !== null && out.best === out.unsettled && height <= bestHeight + 1e-9;
    const w = compareWorth(worth(placed), bestWorth);
    const better = w > 0 || (w === 0 && (height < bestHeight - 1e-9 || asLow));
    if (!better) return;
    // No time left to check it: the layout checked before stands.
    if (timed && out.best && now() + checkCost(nested) > deadline) return;
    const t = now();
    const result = summarise(instance, kinds, placed, now() - start, warnings);
    // Never hand out a layout that fails the exact check (it would be a bug of the drop, so it is dropped too).
    // Timed, a check still going at the time limit is stopped, and its layout is not taken.
    const failed = validateShapeLayout(instance, result, parts, { stopped: pastLimit }).length > 0;
    const took = now() - t;
    if (nested) checkMs.nested = Math.max(checkMs.nested, took);
    else checkMs.plain = Math.max(checkMs.plain, took);
    if (failed) return;
    bestHeight = result.height;
    bestWorth = worth(placed);
    out.best = result;
    hooks.onProgress?.(phase, share(), result);
  };
  const heightOf = (placed: Placed[]) => placed.reduce((h, p) => Math.max(h, p.position[2] + p.profile.extent[2]), 0);
  /** A box engine's layout as version 2 placements, as it stands (unsettled; boxes the spacing apart need no check). */
  const unsettledOf = (boxes: PackResult): PackResultV2 => {
    const result = fromBoxResult(instance, parts, boxes);
    if (warnings.length > 0) result.warnings = [...warnings];
    return result;
  };
  /** Hands out a layout as it stands: the answer until one settled and checked comes (or, at the end, said so). */
  const handOutUnsettled = (result: PackResultV2) => {
    out.best = out.unsettled = result;
    bestHeight = result.height;
    bestWorth = worthOf(result);
    hooks.onProgress?.(phase, share(), result);
  };

  // The boxes' layout, settled by shape: never taller than the boxes'. First the box engine's first layout
  // (a layout to show at once), later its search for a share of the time, with the top brought down after.
  const boxShare = options.boxShare ?? 0.8;
  const byId = new Map(parts.map((p) => [p.id, p] as const));
  // The box engine's own pauses are this run's: progress and a stop get through while it searches.
  // With a nest set, each nest is one box, turned a quarter about z when all it holds may turn so, its members following it.
  /** The boxes the box engine packs for a set of nests: each nest one box, the copies left each their own. */
  const unitBoxes = (set: NestSet | null, ms: number): PackInstance => {
    const base = boxInstance({ ...instance, timeLimitMs: ms }, parts);
    if (!set || parts.some((p) => p.id.startsWith(NEST_ID))) return base;
    const turnable = set.nests.map((n) => n.members.every((m) => parts[m.kind].rotations.includes(composeRotations(m.profile.rotation, QUARTER_Z))));
    return {
      ...base,
      parts: [
        ...base.parts.map((p, i) => ({ ...p, quantity: p.quantity - set.used[i] })).filter((p) => p.quantity > 0),
        ...set.nests.map((n, j) => ({
          id: `${NEST_ID}${j}`,
          size: [n.profile.extent[0], n.profile.extent[1], n.profile.extent[2]] as Vec3,
          quantity: 1,
          orientations: turnable[j] ? ['xyz' as const, 'yxz' as const] : ['xyz' as const],
        })),
      ],
    };
  };
  /** Filling the chamber, what each unit box is worth to the box engine: the meshes' share of it (./boxfit.ts meshVolumeWeights). */
  const weightsOf = (boxes: PackInstance, set: NestSet | null): number[] | undefined => {
    if (!fill) return undefined;
    // A nest's unit holds its members' meshes.
    const volumeOf = (id: string) => volumeById.get(id) ?? set?.nests[Number(id.slice(NEST_ID.length))].members.reduce((v, m) => v + parts[m.kind].volume, 0) ?? 0;
    return meshVolumeWeights(boxes.parts.map((bp) => ({ size: bp.size, volume: volumeOf(bp.id) })));
  };
  const settledBoxes = function* (maxCompletions: number | undefined, ms: number, set: NestSet | null = null, first = false): Generator<void, Placed[], void> {
    const nests = set ? set.nests : [];
    const nestCell = set?.cell ?? cell;
    const boxStart = now();
    const boxed = unitBoxes(set, ms);
    const boxes = yield* boxSearch(boxed, { now, maxCompletions, yieldMs, partWeights: weightsOf(boxed, set) }, stop, () => hooks.onProgress?.(phase, share(), out.best));
    if (first && timed) {
      // Timed, the box engine's first layout is handed out as it stands until the same parts come settled and
      // checked: boxes kept the spacing apart keep their meshes as far apart, and listed bottom first they lift out
      // (./boxfit.ts), so it needs no check. With many thousands of parts, settling and checking them can take
      // longer than the limit (185,556 cubes: 9 s and 3 s), and then it is the layout (said so at the end).
      const turning = now();
      const unsettled = unsettledOf(boxes);
      turnMs = now() - turning;
      handOutUnsettled(unsettled);
      // Where some part has a hollow, the nests' layout comes next, before this one is settled and checked: the
      // nests bring such a mix far lower (1,000 parts at 2 s: 211 to 237 mm against 281 to 316 mm), and settling
      // the boxes' layout rarely does (2,000 parts: 636.1 mm, settled 635.7 mm) but takes as long as settling and
      // checking the nests' layout. This layout, shown at once, needs no check. It is settled and checked later
      // where the parts' own boxes are searched (few parts, little to hold); where time was too short for anything
      // more, it is handed out as it stands, said so (finish, below). Until measured, settling and checking are
      // each reckoned to take what this layout took (they took 1 to 4 times as long in the benchmark's mixes).
      // Heavier meshes keep the other order: their nests can take seconds to check (above), this layout's settled
      // copy far less.
      if (light && kinds.some((k) => k.fits && k.part.quantity > 0 && isHolder(k.profiles[0], cell))) {
        nestsFirst = out.outOfTime = true;
        settleMs = checkMs.plain = now() - boxStart;
        return [];
      }
    }
    // Timed and already past the limit (many thousands of parts: the box engine's first layout and turning it over
    // took it all), nothing is settled: the settling would be stopped at once, after its parts were listed (185,556
    // cubes: 0.3 s past the limit for nothing).
    if (pastLimit()) return [];
    const items: SettleItem[] = [];
    let groups = 0;
    // Bottom first, as the settling needs them; a nest's holder before what it holds.
    for (const pl of [...boxes.placements].sort((a, b) => a.position[2] - b.position[2])) {
      if (pl.id.startsWith(NEST_ID)) {
        const n = nests[Number(pl.id.slice(NEST_ID.length))];
        const turned = pl.orientation === 'yxz';
        // A stack's copies settle together, and onto a copy of their part straight under them, at their pitch (the
        // meshes', finer than the settling's grid).
        const group = n.stacked ? { group: groups++, pitch: n.members[1].dz - n.members[0].dz } : {};
        for (const m of n.members) {
          const [mx, my] = [m.du * nestCell, m.dv * nestCell];
          if (!turned) {
            items.push({ part: m.kind, rotation: m.profile.rotation, position: [pl.position[0] + mx, pl.position[1] + my, pl.position[2] + m.dz], ...group });
            continue;
          }
          // The whole nest a quarter turn about +z ((x, y) -> (-y, x)), its box's corner kept at the placed one.
          const ey = m.profile.extent[1];
          items.push({
            part: m.kind,
            rotation: composeRotations(m.profile.rotation, QUARTER_Z),
            position: [pl.position[0] + n.profile.extent[1] - my - ey, pl.position[1] + mx, pl.position[2] + m.dz],
            ...group,
          });
        }
        continue;
      }
      const part = byId.get(pl.id)!;
      items.push({ part: part.index, rotation: rotationForBox(part, pl.orientation), position: [pl.position[0], pl.position[1], pl.position[2]] });
    }
    const t = now();
    // Timed, settling still going at the time limit stops; what it left is then not checked, so not taken.
    const settled = settleLayout(instance, parts, items, { stopped: () => stop() || pastLimit() });
    settleMs = Math.max(settleMs, now() - t);
    // Stopped at the limit: what it left would not be checked, so it is not taken (nor turned over).
    if (pastLimit()) return [];
    // In the drop's own terms, so the search below can be compared with it.
    return settled.map((it) => ({ kind: it.part, profile: profileFor(kinds, it.part, it.rotation, cell, instance.spacing), position: it.position }));
  };
  // The first layout to show: the boxes', settled. It needs no nests, so it comes before they are built.
  const anyCopies = kinds.some((k) => k.fits && k.part.quantity > 0);
  if (boxShare > 0 && anyCopies) offer(yield* settledBoxes(0, instance.timeLimitMs, null, true));
  const firstHeight = out.best ? out.best.height : null;

  // Copies, largest first (by the room they cost), so the small ones fill the gaps and hollows left.
  // Hollows filled first: holders and what they hold pack as units (./nest.ts), the rest copy by copy.
  // Then copies of one kind that reach into each other's empty columns (two L brackets corner to corner) pair up.
  const plate = usableRegion(instance).extent;
  /** Nests and pairs, and how many copies of each kind they use; `ways`: holder turns tried (./nest.ts buildNests). */
  const nestKinds = (lids: boolean, of: Kind[] = kinds) => of.map((k) => ({ quantity: k.fits ? k.part.quantity : 0, profiles: k.profiles, inside: k.allProfiles, flip: lids ? k.flip : undefined }));
  /** Per plan cell and kind, the turn and pitch its copies stack at (null: they do not stack); the meshes are looked at once. */
  const stackTurns = new Map<string, StackTurn | null>();
  let stackSearchLeft = Math.max(300, 0.1 * instance.timeLimitMs);
  const g = instance.spacing;
  /** `of` and `on`: the kinds' profiles drawn on another plan cell, and that cell. */
  const nestSet = (ways: number, halt: () => boolean, lids = false, of: Kind[] = kinds, on = cell): NestSet => {
    if (options.nest === false) return { nests: [], used: kinds.map(() => 0) };
    const set: NestSet = buildNests(
      nestKinds(lids, of),
      on,
      instance.spacing,
      undefined,
      halt,
      ways,
    );
    // Copies that sink into each other (tapered cups, bowls, trays) stack, from what the nests left (./stack.ts).
    if (options.stacks !== false) {
      const turns = of.map((k, i) => {
        if (!k.fits || k.part.quantity - set.used[i] < 2 || halt()) return null;
        const key = `${on}:${i}`;
        if (!stackTurns.has(key)) {
          // Timed, the search of a kind's pitch on its mesh ends after 3 % of the limit, at least 250 ms (all kinds'
          // after a tenth, at least 300 ms: a first search on a cold start takes 150-200 ms for a 500-triangle cup)
          // with the lowest found so far; then the plan grid's pitch stands.
          const t = now();
          const by = t + Math.min(Math.max(250, 0.03 * instance.timeLimitMs), stackSearchLeft);
          stackTurns.set(key, stackTurn(k.part, k.allProfiles, on, g, options.pairGain, () => halt() || (timed && now() > by)));
          stackSearchLeft -= now() - t;
        }
        return stackTurns.get(key) ?? null;
      });
      if (turns.some((t) => t !== null)) {
        // The build's foreseen height over the floor (./stack.ts foreseenHeight): the stacks and the rest (the units'
        // and the copies' boxes, grown) on the plate.
        const grown = (e: readonly number[]) => (e[0] + g) * (e[1] + g) * (e[2] + g);
        let volume = set.nests.reduce((v, n) => v + grown(n.profile.extent), 0);
        const stackable: Array<{ quantity: number; turn: StackTurn }> = [];
        of.forEach((k, i) => {
          const left = k.fits ? k.part.quantity - set.used[i] : 0;
          const t = turns[i];
          if (left > 0 && t) stackable.push({ quantity: left, turn: t });
          else if (left > 0) volume += left * grown(k.profiles[0].extent);
        });
        // The first sets' stacks stand as tall as their places on the plate need; the sets that try other holder
        // turns take them only as tall as the build's volume over the plate: lower stacks beside more of the rest
        // (which of the two is lower depends on how much else there is; the box search of each set tells).
        const foreseen = foreseenHeight(stackable, volume, g, [plate[0], plate[1]], plate[2], ways === 1);
        const withStacks = (height: number): NestSet => {
          const out: NestSet = { nests: [...set.nests], used: [...set.used] };
          turns.forEach((t, i) => {
            if (!t) return;
            const left = of[i].part.quantity - set.used[i];
            for (const stack of stacksOf(i, left, t, copiesPerStack(left, t, g, [plate[0], plate[1]], plate[2], height), on, g)) {
              out.nests.push(stack);
              out.used[i] += stack.members.length;
            }
          });
          return out;
        };
        const stacked = withStacks(foreseen);
        // The foreseen height is a reckoning of the plate's room: where the stacks are few and tall, shorter ones,
        // beside each other or on others, can stand lower (deep bins: 0.8 of the height). So the heights at which
        // a kind's stacks take one copy fewer (the five nearest under it) are judged by the box engine's first
        // layout of the set's units (a few milliseconds each); the lowest, where it beats the foreseen one's, is
        // kept beside it as one more set for the box search. That first layout is a rough judge (with many tall
        // units it can come out at three times the searched height), so it only proposes.
        if (ways === 1 && on === cell && !halt()) {
          const heights = new Set<number>();
          for (const t of turns) {
            if (t) for (let j = 1; t.profile.extent[2] + j * t.pitch < foreseen; j++) heights.add(t.profile.extent[2] + j * t.pitch + 1e-6);
          }
          const firstHeight = (trial: NestSet) => packSync(unitBoxes(trial, instance.timeLimitMs), { maxCompletions: 0 }).height;
          const foreseenFirst = firstHeight(stacked);
          let other: { set: NestSet; height: number } | null = null;
          for (const h of [...heights].sort((a, b) => b - a).slice(0, 5)) {
            if (halt()) break;
            const trial = withStacks(h);
            if (trial.nests.length === stacked.nests.length) continue;
            const height = firstHeight(trial);
            if (height < foreseenFirst - 1e-9 && (!other || height < other.height - 1e-9)) other = { set: trial, height };
          }
          if (other) set.otherStacks = other.set;
        }
        set.nests = stacked.nests;
        set.used = stacked.used;
      }
    }
    // Pairs of what is left (of the kinds that neither nest nor stack), in the other stacks' set too.
    const pairs = new Map<number, Nest | null>();
    for (const into of set.otherStacks ? [set, set.otherStacks] : [set]) {
      of.forEach((k, i) => {
        if (!k.fits || k.part.quantity - into.used[i] < 2 || halt()) return;
        if (!pairs.has(i)) pairs.set(i, bestPair(i, k.profiles.slice(0, 3), k.allProfiles, on, instance.spacing, [plate[0], plate[1]], options.pairGain));
        const pair = pairs.get(i);
        for (; pair && k.part.quantity - into.used[i] >= 2; into.used[i] += 2) into.nests.push(pair);
      });
    }
    return on === cell ? set : { ...set, cell: on };
  };
  const lids = options.lids !== false && options.nest !== false && lidsMayHold(nestKinds(true), cell);
  // Timed, the first nests are filled only while a layout with nests could still be checked in time: past that no
  // stage could take them (5,000 parts: filling them took 2.5 s after the first layout, with a 2 s limit).
  const nestsInTime = () => stop() || (timed && leftFor(true) <= 0);
  const single = nestSet(1, nestsInTime);
  // When nothing nests in one holder, two copies facing each other may still hold what is too tall for one.
  const alone = single.nests.length === 0 && lids && !nestsInTime() ? nestSet(1, nestsInTime, true) : null;
  const primary = alone && alone.nests.some((n) => n.lidded) ? alone : single;
  const { nests, used } = primary;
  const copies: number[] = [];
  kinds.forEach((k, i) => {
    if (k.fits) for (let c = used[i]; c < k.part.quantity; c++) copies.push(i);
  });
  nests.forEach((_, n) => copies.push(kinds.length + n));
  const weight = [...kinds.map((k) => (k.fits ? k.profiles[0].cost : 0)), ...nests.map((n) => n.profile.cost)];
  const firstOrder = [...copies].sort((a, b) => weight[b] - weight[a] || a - b);
  // Timed, the search of the nests' boxes below starts from the first layout anyway.
  if (boxShare > 0 && nests.length > 0 && !timed) offer(yield* settledBoxes(0, instance.timeLimitMs, primary), true);

  const choices = [...kinds.map((k) => k.profiles), ...nests.map((n) => [n.profile])];
  // The drop packing in a fixed order (largest first, hollows filled before they are covered): the drop search
  // below starts from it; on a small plate it is often the lowest. Timed, it is tried here for a tenth of the
  // limit (a few hundred copies take longer: then it is dropped, and run again before the drop search with what
  // is left), so that the nests' box searches keep their time.
  const dropBy = now() + 0.1 * instance.timeLimitMs;
  // With the nests first, their box search comes before the drop packing (the drop search below takes what is left).
  let first = nestsFirst ? null : packOnce(instance, kinds, nests, firstOrder, choices, cell, () => (timed && (leftFor(nests.length > 0) <= 0 || now() > dropBy)) || stop());
  if (first) {
    runs++;
    offer(first, nests.length > 0);
  }
  if (copies.length === 0) {
    if (!out.best) offer([]);
    return;
  }
  if (boxShare > 0 && !stop()) {
    // With a cap on the runs, the box search is capped too (the same result on any machine).
    // With nests, their boxes get most of the box search; the parts' own boxes the rest, so where nesting
    // does not pay (few parts, little to hold) the settled box layout is still there to keep.
    const capped = options.maxRuns !== undefined ? Math.max(1, options.maxRuns) : undefined;
    const nestShare = nests.length > 0 ? (options.nestShare ?? 0.4) : 0;
    const better = (a: Placed[], b: Placed[]) => {
      const w = compareWorth(worth(a), worth(b));
      return w > 0 || (w === 0 && heightOf(a) < heightOf(b));
    };
    /** A stage's search time: its share, or timed, what is left for it (null: none left). */
    const budget = (shareMs: number, nested: boolean): number | null => {
      if (!timed) return Math.round(shareMs);
      const ms = Math.min(shareMs, leftFor(nested));
      return ms > 0 ? Math.round(ms) : null;
    };
    let searched: Placed[] = [];
    let searchedNested = false;
    /** The nests paid well enough that a finer set of them takes the time of the parts' own boxes' search. */
    let nestedWell = false;
    // The box engine's first layout still the answer as it stands: where settling and checking a searched layout
    // would leave its search less than half of what is left of the limit, the box search gets all of it instead,
    // and its layout is handed out as the first one was, unsettled (boxes the spacing apart need no check), said
    // so. Settling such a layout rarely brings it lower; searching longer does. 2,000 parts at 2 s: the first
    // layout 636.1 mm; its boxes searched 0.27 s and settled, 635.7 mm; the nests' layout, 630.1 mm once and
    // otherwise not checked in time; the parts' boxes searched 0.6 s (the packing by box's own), 625.6 mm.
    // Heavier meshes likewise when their first layout, settled and checked, still stands (their settling and check
    // take seconds, not the clock's noise), unless a layout with nests can still be settled and checked in time:
    // that stage runs as before, as it brings such parts far lower. 248 parts of 1,000 to 49,000 triangles: at 10 s
    // nested, 112.4 mm; at 5 s no stage had time and the first layout stood, 141.1 mm; now the box search of the
    // rest of the limit, 130.8 mm (the packing by box's own at 5 s: 127.8 mm).
    const manyFirst = out.unsettled !== undefined && out.best === out.unsettled && out.best.placements.length >= MANY_PLACEMENTS;
    const heavyFirst = out.best !== null && out.best !== out.unsettled && !light && firstHeight !== null && bestHeight >= firstHeight - 1e-9;
    let rest: number | null = null;
    if (timed && (manyFirst || heavyFirst) && !stop()) {
      const left = deadline - now() - turnMs - 0.03 * instance.timeLimitMs;
      const stageLeft = manyFirst ? leftFor(nests.length > 0) : nests.length > 0 && leftFor(true) > 0 ? Infinity : leftFor(false);
      if (left > 0 && stageLeft < left / 2) rest = Math.round(left);
    }
    if (rest !== null) {
      const restBoxes = unitBoxes(null, rest);
      const boxes = yield* boxSearch(restBoxes, { now, yieldMs, partWeights: weightsOf(restBoxes, null) }, stop, () => hooks.onProgress?.(phase, share(), out.best));
      const searchedBoxes = unsettledOf(boxes);
      const w = compareWorth(worthOf(searchedBoxes), bestWorth);
      if (w > 0 || (w === 0 && searchedBoxes.height < bestHeight - 1e-9)) handOutUnsettled(searchedBoxes);
      // Handed out as it stands: the limit is why (finish says so).
      out.outOfTime = true;
    }
    if (nestShare > 0 && rest === null) {
      // A second set of nests whose holders may stand other ways up (./nest.ts buildNests `ways`): the
      // box search of so few, large units is lumpy, and either set can come out lower. They share its time.
      const ways = options.holderWays ?? 4;
      // A third set lets two copies of a holder face each other, the second upside down as a lid over both
      // hollows (./nest.ts buildNests `flip`): tall units, lower where they take what no single holder can.
      const lidSet = lids && primary !== alone;
      const perSet = (instance.timeLimitMs * boxShare * nestShare) / ((ways > 1 ? 2 : 1) + (lidSet ? 1 : 0) + (primary.otherStacks ? 1 : 0));
      /** The box search of one set's nests for its share of the time; false when no time was left for it. */
      const searchSet = function* (set: NestSet): Generator<void, boolean, void> {
        const ms = stop() ? null : budget(perSet, true);
        if (ms === null) return false;
        const layout = yield* settledBoxes(capped, ms, set);
        offer(layout, true);
        if (better(layout, searched)) [searched, searchedNested] = [layout, true];
        return true;
      };
      const tooLate = () => stop() || (timed && leftFor(true) < perSet / 2);
      const primaryDone = yield* searchSet(primary);
      if (primaryDone && primary.otherStacks && !tooLate()) yield* searchSet(primary.otherStacks);
      // When the nests have already brought the layout well under the first one (the boxes', settled), the search
      // of the parts' own boxes cannot catch up (in the benchmark's mixes it brings the first layout down by about
      // a tenth); its time goes to one more set of nests, filled on a finer plan cell: a part's column profile
      // then takes less room beyond its surface, so more fits in a hollow (more blocks in a cup, for one). Its
      // profiles take about twice the first ones' time (2.25 times the cells), so it is begun only when that, and
      // two sets' searches, are left.
      const fine = fineCell(instance, cell);
      nestedWell = options.fineNests !== false && fine !== null && searchedNested && firstHeight !== null && heightOf(searched) < 0.85 * firstHeight;
      if (nestedWell && fine !== null && primaryDone && !tooLate() && (!timed || leftFor(true) > 3 * prepMs + 2 * perSet)) {
        const fineKinds = prepareKinds(instance, parts, fine, [], null);
        const set = fineKinds ? nestSet(1, tooLate, false, fineKinds, fine) : null;
        if (set && set.nests.length > 0 && !tooLate()) yield* searchSet(set);
      }
      if (primaryDone && ways > 1 && !tooLate()) {
        const other = nestSet(ways, tooLate);
        if (other.nests.length > 0) yield* searchSet(other);
      }
      if (lidSet && !tooLate()) {
        const lidded = nestSet(ways, tooLate, true);
        if (lidded.nests.some((n) => n.lidded)) yield* searchSet(lidded);
      }
    }
    const plainMs = rest === null && nestShare < 1 && !stop() && !nestedWell ? budget(instance.timeLimitMs * boxShare * (1 - nestShare), false) : null;
    if (plainMs !== null) {
      const plain = yield* settledBoxes(capped, plainMs);
      offer(plain);
      if (better(plain, searched)) [searched, searchedNested] = [plain, false];
    }
    // Then its highest parts dropped again where they end lower, while they can.
    if (searched.length > 0) {
      const lowered = lowerTheTop(instance, searched, kinds.map((k) => k.allProfiles), cell, () => outOfTime(searchedNested));
      offer(lowered, searchedNested);
    }
    runs++;
  }
  // Then the drop search, from the fixed order, until the time left is what checking takes.
  phase = 'search';
  if (!first) {
    first = packOnce(instance, kinds, nests, firstOrder, choices, cell, () => (timed && leftFor(nests.length > 0) <= 0) || stop());
    runs++;
    if (first) offer(first, nests.length > 0);
  }
  let order = firstOrder;
  let current = first ? heightOf(first) : Infinity;
  let currentWorth = first ? worth(first) : -1;
  let currentChoices = choices;
  while (runs < maxRuns && !outOfTime(nests.length > 0)) {
    // A neighbour: a few copies moved in the order, and now and then another set of rotations for one part.
    const nextOrder = [...order];
    const moves = 1 + Math.floor(random() * 4);
    for (let m = 0; m < moves; m++) {
      const i = Math.floor(random() * nextOrder.length);
      const j = Math.max(0, Math.min(nextOrder.length - 1, i + Math.floor((random() - 0.5) * Math.max(4, nextOrder.length / 8))));
      const [x] = nextOrder.splice(i, 1);
      nextOrder.splice(j, 0, x);
    }
    let nextChoices = currentChoices;
    if (random() < 0.3) {
      const k = Math.floor(random() * kinds.length);
      if (kinds[k].fits && kinds[k].allProfiles.length > 1) {
        nextChoices = [...currentChoices];
        const all = kinds[k].allProfiles;
        const pick = all[Math.floor(random() * all.length)];
        nextChoices[k] = random() < 0.5 ? [pick] : [...new Set([...kinds[k].profiles, pick])];
      }
    }
    const placed = packOnce(instance, kinds, nests, nextOrder, nextChoices, cell, () => outOfTime(nests.length > 0));
    runs++;
    if (placed) {
      const h = heightOf(placed);
      const w = compareWorth(worth(placed), currentWorth);
      if (w > 0 || (w === 0 && h <= current + 1e-9)) {
        order = nextOrder;
        currentChoices = nextChoices;
        current = h;
        currentWorth = worth(placed);
        offer(placed, nests.length > 0);
      }
    }
    if (now() - lastYield >= yieldMs) {
      lastYield = now();
      hooks.onProgress?.(phase, share(), out.best);
      yield;
    }
  }
}

/**
 * With no spacing asked, the search still keeps the parts NO_SPACING_CLEARANCE apart (on the plan cell the instance
 * itself would get): surfaces that meet exactly are where the settling's and the lift-out check's rounding decide,
 * and with none kept, every settled layout of a channel and a few cubes failed the exact check (a cube sunk 1e-7 mm
 * into another), so the boxes' layout stood, said to be for want of time. A gap of a hundredth of a millimetre is
 * no gap to any printer, and the layout keeps the spacing asked, 0.
 */
export const NO_SPACING_CLEARANCE = 0.01;

function withClearance(instance: PackInstanceV2, options: ShapeOptions): { work: PackInstanceV2; workOptions: ShapeOptions } {
  if (instance.spacing >= NO_SPACING_CLEARANCE) return { work: instance, workOptions: options };
  return { work: { ...instance, spacing: NO_SPACING_CLEARANCE }, workOptions: { ...options, cellMm: options.cellMm ?? defaultCell(instance) } };
}

/** Prepares a packing by shape of a version 2 instance whose meshes are attached. */
export function createShapePacking(instance: PackInstanceV2, options: ShapeOptions = {}): ShapePacking {
  const now = options.now ?? defaultClock();
  const { work, workOptions } = withClearance(instance, options);
  const finish = (out: RunOut, start: number, hooks: ShapeRunHooks): PackResultV2 => {
    // No layout passed the exact check (or the run was stopped before the first): the boxes, which always keep
    // apart, packed in what is left of the limit (not a whole limit more).
    const boxes = () => {
      const parts = shapeParts(instance);
      const left = Math.max(0, Math.round(instance.timeLimitMs - (now() - start)));
      return fromBoxResult(instance, parts, packSync(boxInstance({ ...instance, timeLimitMs: left }, parts), { now, partWeights: fillWeights(instance, parts) }));
    };
    const best = out.best ?? boxes();
    const result = { ...best, elapsedMs: Math.round((now() - start) * 10) / 10 };
    // Stopped by the caller (the planner's stop), the limit is not why the boxes' layout stands: nothing is said.
    if (best === out.unsettled && out.outOfTime && !hooks.shouldStop?.()) {
      const placed = best.placements.length.toLocaleString('en-US');
      result.warnings = [
        ...(best.warnings ?? []),
        {
          id: best.placements[0]?.id ?? instance.parts[0].id,
          code: 'packed-by-box',
          message: `Packed by the parts' boxes: settling the ${placed} placements by shape and checking them against the meshes takes longer than the ${instance.timeLimitMs / 1000} s limit allows; give it more time to nest them`,
        },
      ];
    }
    hooks.onProgress?.('done', 1, result);
    return result;
  };
  return {
    runSync(hooks = {}) {
      const out: RunOut = { best: null };
      const start = now();
      const it = solve(work, workOptions, hooks, now, out);
      while (!it.next().done);
      return finish(out, start, hooks);
    },
    async run(hooks = {}) {
      const out: RunOut = { best: null };
      const start = now();
      const it = solve(work, workOptions, hooks, now, out);
      while (!it.next().done) await new Promise((resolve) => setTimeout(resolve, 0));
      return finish(out, start, hooks);
    },
  };
}

