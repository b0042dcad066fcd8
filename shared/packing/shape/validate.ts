/**
 * Checks a "pack-result/2" against the meshes themselves: every placed mesh
 * inside the usable region; for any two, the smallest distance between their
 * surfaces at least the spacing and neither inside the other; rotations the
 * part allows and transforms that match position and size; counts that add
 * up; and the lift-out order (in reverse, each part lifts straight up clear of
 * the ones listed before it). Distances are exact triangle–triangle distances
 * (see tri.ts), found through a box tree per part; nothing here samples.
 */
import { extentCode, rotationIndex, rotationOfTransform, rotatedBox, ROTATION_CODES } from '../../geometry/rotations';
import { layerCount, TOLERANCE_MM, usableRegion } from '../geometry';
import { RESULT_FORMAT_V2, type FieldProblem, type PackInstanceV2, type PackResultV2 } from '../types';
import { excessProblems } from '../validate';
import { blocksLift, containsPoint, PlacedBvh, surfaceDistance } from './bvh';
import { shapeParts, type ShapePart } from './parts';

/** By default at most this many problems of one kind are listed; one more line gives the rest's count. */
const MAX_REPORTS = 20;

interface Placed {
  at: number;
  part: ShapePart;
  rotation: number;
  placed: PlacedBvh;
}

export interface ShapeCheckOptions {
  /**
   * Placement indices: the check of gaps and of the lift-out order looks only at the pairs that hold one of them
   * (after a hand change of a layout that passed, only they can be at fault).
   */
  focus?: ReadonlySet<number>;
  /** Problems listed of each kind before one line gives the rest's count (default 20; the editor names them all). */
  maxReports?: number;
  /** Polled as the check goes (a run out of time): true ends it, and a problem says the layout was not checked. */
  stopped?: () => boolean;
}

/**
 * The quarter turn (0-23) a placement's 3MF transform makes, or what is wrong with it: not 12 finite numbers, or a
 * rotation that is not one of the 24 (a mirror image, a scaling, a tilt).
 */
export function transformTurn(t: unknown): { rotation: number } | { problem: string } {
  if (!(Array.isArray(t) && t.length === 12 && t.every((v) => typeof v === 'number' && Number.isFinite(v)))) return { problem: 'must be the 12 numbers of a 3MF transform' };
  const rotation = rotationOfTransform(t);
  return rotation < 0 ? { problem: 'must turn the part by one of the 24 quarter-turn rotations (no mirror images, no scaling)' } : { rotation };
}

/** The check stops once this many pairs are found too close or in each other's way up. */
const MAX_FAULT_PAIRS = 10_000;

/** How far a result's `utilization` may be from the one worked out from the meshes, as a share of it. */
const UTILIZATION_SHARE = 1e-6;

export function validateShapeLayout(instance: PackInstanceV2, result: PackResultV2, prepared?: ShapePart[], options: ShapeCheckOptions = {}): FieldProblem[] {
  const problems: FieldProblem[] = [];
  const bad = (field: string, message: string) => problems.push({ field, message });
  const tol = TOLERANCE_MM;
  const g = instance.spacing;
  const U = usableRegion(instance);
  const parts = prepared ?? shapeParts(instance);
  const byId = new Map(parts.map((p) => [p.id, p] as const));
  const placedCount = new Array<number>(parts.length).fill(0);

  if (result.format !== RESULT_FORMAT_V2) bad('format', `must be "${RESULT_FORMAT_V2}"`);
  // Copies too many are refused before any mesh is placed (./validate.ts excessProblems).
  const excess = excessProblems(parts, result.placements);
  if (excess.length > 0) return [...problems, ...excess];
  const list = Array.isArray(result.placements) ? result.placements : [];
  if (!Array.isArray(result.placements)) bad('placements', 'must be an array');
  const finite = (v: unknown, n: number): v is number[] => Array.isArray(v) && v.length === n && v.every((c) => typeof c === 'number' && Number.isFinite(c));

  const placed: Placed[] = [];
  let top = -Infinity;
  let volume = 0;
  const stopped = options.stopped ?? (() => false);
  let halted = false;
  list.forEach((p, i) => {
    if (halted || (i % 64 === 63 && (halted = stopped()))) return;
    const at = `placements[${i}]`;
    const part = byId.get(p.id);
    if (!part) {
      bad(`${at}.id`, `must name a part of the instance ("${p.id}" is unknown)`);
      return;
    }
    placedCount[part.index]++;
    if (!finite(p.position, 3)) return bad(`${at}.position`, 'must be 3 finite numbers');
    if (!finite(p.size, 3)) return bad(`${at}.size`, 'must be 3 finite numbers');
    let rotation: number;
    let translation: number[];
    if (part.hasMesh) {
      const turn = transformTurn(p.transform);
      if ('problem' in turn) return bad(`${at}.transform`, turn.problem);
      rotation = turn.rotation;
      const t = p.transform as number[];
      translation = [t[9], t[10], t[11]];
      if (p.orientation !== undefined) {
        const k = typeof p.orientation === 'string' ? rotationIndex(p.orientation) : -1;
        const agrees = k === rotation || (k >= 0 && k < 6 && p.orientation === extentCode(rotation));
        if (!agrees) bad(`${at}.orientation`, `"${p.orientation}" does not agree with the transform (${ROTATION_CODES[rotation]})`);
      }
    } else {
      rotation = typeof p.orientation === 'string' ? rotationIndex(p.orientation) : -1;
      if (rotation < 0) return bad(`${at}.orientation`, `"${p.orientation}" is not a rotation code`);
      translation = translationOf(part, rotation, p);
    }
    if (!part.rotations.includes(rotation) && !(!part.hasMesh && part.rotations.some((k) => extentCode(k) === extentCode(rotation)))) {
      bad(`${at}.orientation`, `${ROTATION_CODES[rotation]} is not a rotation part "${p.id}" allows`);
    }
    // The placed mesh's bounding box: the rotated box of the part's, moved.
    const box = rotatedBox(rotation, part.min, part.max);
    for (let a = 0; a < 3; a++) {
      const min = box.min[a] + translation[a];
      const max = box.max[a] + translation[a];
      if (Math.abs(min - p.position[a]) > tol) bad(`${at}.position[${a}]`, `must be ${min}, the placed part's lowest ${'xyz'[a]}, not ${p.position[a]}`);
      if (Math.abs(max - min - p.size[a]) > tol) bad(`${at}.size[${a}]`, `must be ${max - min}, the placed part's extent along ${'xyz'[a]}, not ${p.size[a]}`);
      if (min < U.min[a] - tol || max > U.max[a] + tol) {
        bad(`${at}.position[${a}]`, `puts the part [${min}, ${max}] outside the usable region [${U.min[a]}, ${U.max[a]}] along ${'xyz'[a]}`);
      }
    }
    top = Math.max(top, box.max[2] + translation[2]);
    volume += part.volume;
    placed.push({ at: i, part, rotation, placed: new PlacedBvh(part.bvh(), rotation, translation) });
  });

  if (halted || !checkGapsAndLift(placed, g, tol, U.min, U.extent, bad, options.focus, options.maxReports ?? MAX_REPORTS, stopped)) {
    bad('placements', 'were not all checked: the check was stopped');
    return problems;
  }

  const unplacedCount = new Array<number>(parts.length).fill(0);
  const unplaced = Array.isArray(result.unplaced) ? result.unplaced : [];
  if (!Array.isArray(result.unplaced)) bad('unplaced', 'must be an array');
  const listed = new Set<string>();
  unplaced.forEach((u, i) => {
    const part = byId.get(u.id);
    if (!part) bad(`unplaced[${i}].id`, `must name a part of the instance ("${u.id}" is unknown)`);
    else if (listed.has(u.id)) bad(`unplaced[${i}].id`, `"${u.id}" is listed twice`);
    else if (!Number.isInteger(u.count) || u.count <= 0) bad(`unplaced[${i}].count`, 'must be a positive integer');
    else unplacedCount[part.index] = u.count;
    listed.add(u.id);
  });
  parts.forEach((part, k) => {
    if (placedCount[k] + unplacedCount[k] !== part.quantity) {
      bad(`parts[${k}].quantity`, `is ${part.quantity} but "${part.id}" has ${placedCount[k]} placed and ${unplacedCount[k]} unplaced`);
    }
  });

  const any = placed.length > 0;
  const height = any ? top : 0;
  if (typeof result.height !== 'number' || Math.abs(result.height - height) > tol) bad('height', `must be the top of the highest placed part, ${height}, not ${result.height}`);
  const layers = layerCount(height, instance.margin.top, instance.layerHeight);
  if (result.layers !== layers) bad('layers', `must be ${layers}, not ${result.layers}`);
  const denominator =
    instance.objective === 'min-height' ? U.extent[0] * U.extent[1] * (height - instance.margin.bottom) : U.extent[0] * U.extent[1] * U.extent[2];
  const utilization = any && denominator > 0 ? volume / denominator : 0;
  // The same share to 1 in 10^6: a mesh read from a file of 32-bit coordinates and the same mesh in 64-bit ones
  // differ in volume by parts in 10^9 or more (a 1,000,000-triangle torus: 4 in 10^9, which was refused).
  if (typeof result.utilization !== 'number' || Math.abs(result.utilization - utilization) > UTILIZATION_SHARE * Math.max(1e-3, utilization)) {
    bad('utilization', `must be ${utilization} (placed parts' volume over the denominator), not ${result.utilization}`);
  }
  const expectedLayers = any ? Math.ceil(height / instance.layerHeight - 1e-9) : 0;
  if (!Array.isArray(result.areaProfile) || result.areaProfile.length !== expectedLayers) {
    bad('areaProfile', `must hold ceil(height / layerHeight) = ${expectedLayers} numbers`);
  } else if (any) {
    const sum = result.areaProfile.reduce((s, a) => s + a, 0) * instance.layerHeight;
    // Mid-layer sampling errs by at most about one layer's slab of the parts' outline; 10 % catches a wrong profile.
    if (!(Math.abs(sum - volume) <= 0.1 * volume)) bad('areaProfile', `sums to ${sum.toFixed(1)} mm^3 times the layer height, far from the placed volume ${volume.toFixed(1)} mm^3`);
  }
  return problems;
}

/** The translation that places a part turned by `rotation`: its transform's, or for a part known by its box, from where its box lies. */
export function translationOf(part: ShapePart, rotation: number, p: { position: readonly number[]; transform?: readonly number[] }): number[] {
  if (part.hasMesh && p.transform) return [p.transform[9], p.transform[10], p.transform[11]];
  const box = rotatedBox(rotation, part.min, part.max);
  return [0, 1, 2].map((a) => p.position[a] - box.min[a]);
}

function checkGapsAndLift(
  placed: Placed[],
  g: number,
  tol: number,
  origin: readonly number[],
  extent: readonly number[],
  bad: (field: string, message: string) => void,
  focus: ReadonlySet<number> | undefined,
  maxReports: number,
  stopped: () => boolean,
): boolean {
  const n = placed.length;
  if (n < 2) return true;
  // Broad phase: a plan-view grid of cells (boxes grown by the spacing). The placements are taken in list order, each
  // against the ones before it that share a cell and reach above its bottom less the spacing: only they can be too
  // close to it or in its way up. Each cell keeps those before, highest top first, so the look stops at the first
  // wholly below: a column of parts stacked high (listed bottom first) is not looked through again for each part
  // (185,556 cubes of 5 mm: 136 million pairs looked at before, 11 s).
  const G = Math.max(1, Math.min(128, Math.ceil(Math.sqrt(n))));
  const cell = [Math.max(extent[0] / G, 1e-9), Math.max(extent[1] / G, 1e-9)];
  const cellOf = (v: number, a: number) => Math.min(G - 1, Math.max(0, Math.floor((v - origin[a]) / cell[a])));
  const byTop: number[][] = Array.from({ length: G * G }, () => []);
  const topOf = (k: number) => placed[k].placed.max[2];
  const range = new Int32Array(4);
  const inFocus = (k: number) => !focus || focus.has(placed[k].at);
  const seenBy = new Int32Array(n).fill(-1);
  let gapReports = 0, gapTotal = 0, liftReports = 0, liftTotal = 0;
  // Two pairs of the same parts in the same turns, the second part moved from the first by the same vector (to the
  // last bit), are the same question: copies stacked or nested alike ask it many times, and a pair of meshes
  // nested within the spacing over their whole surfaces takes long to answer.
  const relation = (a: Placed, b: Placed) => {
    const ta = a.placed.t, tb = b.placed.t;
    return `${a.part.index}:${a.rotation}:${b.part.index}:${b.rotation}:${tb[0] - ta[0]}:${tb[1] - ta[1]}:${tb[2] - ta[2]}`;
  };
  /** A pair's lift or distance search was stopped (see liftCheck, gapCheck): the layout is not all checked. */
  let halted = false;
  const lifts = new Map<string, boolean>();
  const gaps = new Map<string, number | 'inside' | null>();
  // Lift-out: `earlier`, listed before `later`, must not block its way up.
  const liftCheck = (later: number, earlier: number) => {
    if (halted) return;
    // Nothing of a part wholly below the other's bottom, or beside it in plan, is in its way up (blocksLift's own
    // first test, before the pair's key is made: a column of parts stacked high shares its plan cells with each).
    const A = placed[later].placed, B = placed[earlier].placed;
    if (B.max[2] <= A.min[2] + tol || B.min[0] >= A.max[0] - tol || A.min[0] >= B.max[0] - tol || B.min[1] >= A.max[1] - tol || A.min[1] >= B.max[1] - tol) return;
    const key = relation(placed[later], placed[earlier]);
    let blocked = lifts.get(key);
    if (blocked === undefined) {
      // As slow as the distances for finely tessellated meshes nested in each other: the stop is asked on the way.
      const answer = blocksLift(placed[later].placed, placed[earlier].placed, tol, stopped);
      if (answer === null) {
        halted = true;
        return;
      }
      lifts.set(key, (blocked = answer));
    }
    if (!blocked) return;
    liftTotal++;
    if (liftReports++ < maxReports) {
      bad(`placements[${placed[later].at}]`, `cannot be lifted straight up: placements[${placed[earlier].at}], listed before it, is above it`);
    }
  };
  const gapCheck = (i: number, j: number) => {
    if (halted) return;
    const A = placed[i].placed, B = placed[j].placed;
    let boxGap2 = 0;
    for (let a = 0; a < 3; a++) {
      const d = Math.max(B.min[a] - A.max[a], A.min[a] - B.max[a], 0);
      boxGap2 += d * d;
    }
    let overlap = true;
    for (let a = 0; a < 3; a++) if (B.min[a] >= A.max[a] - tol || A.min[a] >= B.max[a] - tol) overlap = false;
    // With no spacing, parts whose boxes only touch are apart; otherwise their surfaces must not meet.
    if (g > tol ? Math.sqrt(boxGap2) >= g - tol : !overlap) return;
    const key = relation(placed[i], placed[j]);
    let gap = gaps.get(key);
    if (gap === undefined) {
      // Two finely tessellated meshes nested within the spacing can take seconds: the stop is asked on the way too.
      gap = pairGap(A, B, g, tol, stopped);
      if (typeof gap === 'number' && Number.isNaN(gap)) {
        halted = true;
        return;
      }
      gaps.set(key, gap);
    }
    let problem: string | null = null;
    if (gap === 'inside') problem = 'lies inside (or holds inside it)';
    else if (gap !== null) problem = `is only ${gap.toFixed(6)} mm from`;
    if (problem) {
      gapTotal++;
      if (gapReports++ < maxReports) bad(`placements[${placed[j].at}]`, `${problem} placements[${placed[i].at}]: the surfaces must be at least ${g} mm apart`);
    }
  };
  let enough = false;
  for (let i = 0; i < n; i++) {
    if (halted || (i % 32 === 31 && stopped())) return false;
    // A layout with this many faults is wrong; how wrong no longer matters (20,000 copies heaped in one spot took a
    // mesh worker two minutes pair by pair).
    if (gapTotal + liftTotal >= MAX_FAULT_PAIRS) {
      enough = true;
      break;
    }
    const A = placed[i].placed;
    range[0] = cellOf(A.min[0] - g, 0);
    range[1] = cellOf(A.min[1] - g, 1);
    range[2] = cellOf(A.max[0] + g, 0);
    range[3] = cellOf(A.max[1] + g, 1);
    const floor = A.min[2] - g - tol;
    for (let x = range[0]; x <= range[2]; x++)
      for (let y = range[1]; y <= range[3]; y++) {
        const before = byTop[x * G + y];
        for (let k = 0; k < before.length && topOf(before[k]) > floor; k++) {
          const j = before[k];
          if (seenBy[j] === i) continue;
          seenBy[j] = i;
          // Each pair once, from the later one's side; with a focus, only pairs holding a placement in it.
          if (!inFocus(i) && !inFocus(j)) continue;
          liftCheck(i, j);
          gapCheck(j, i);
        }
      }
    // Then it joins its cells, after every one with a higher top.
    const top = A.max[2];
    for (let x = range[0]; x <= range[2]; x++)
      for (let y = range[1]; y <= range[3]; y++) {
        const before = byTop[x * G + y];
        let lo = 0, hi = before.length;
        while (lo < hi) {
          const mid = (lo + hi) >> 1;
          if (topOf(before[mid]) >= top) lo = mid + 1;
          else hi = mid;
        }
        before.splice(lo, 0, i);
      }
  }
  if (halted) return false;
  const atLeast = enough ? 'at least ' : '';
  if (gapTotal > maxReports) bad('placements', `${atLeast}${gapTotal - maxReports} more pairs are closer than the spacing`);
  if (liftTotal > maxReports) bad('placements', `${atLeast}${liftTotal - maxReports} more parts are blocked on their way up`);
  return true;
}

/**
 * What keeps two placed meshes from being the spacing `g` apart: their surface distance when it is less, "inside"
 * when one lies inside the other, null when they are apart (with no spacing, surfaces that only touch are apart).
 * With `halt` (asked as surfaceDistance asks it): NaN when it stopped the search, the answer unknown.
 */
export function pairGap(A: PlacedBvh, B: PlacedBvh, g: number, tol: number, halt?: () => boolean): number | 'inside' | null {
  const need = g > tol ? g : 2 * tol;
  const d = surfaceDistance(A, B, need, need - tol, halt);
  if (Number.isNaN(d)) return d;
  if (d < need - tol) return d;
  return inside(A, B) || inside(B, A) ? 'inside' : null;
}

/** Does B lie inside A? Only possible when A's box holds B's; then one vertex of B decides (their surfaces are apart). */
function inside(A: PlacedBvh, B: PlacedBvh): boolean {
  for (let a = 0; a < 3; a++) if (B.min[a] < A.min[a] || B.max[a] > A.max[a]) return false;
  const v = new Float64Array(9);
  B.triangle(0, v, 0);
  return containsPoint(A, [v[0], v[1], v[2]]);
}
