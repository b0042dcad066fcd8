import { isOrientation, layerCount, orientedSize, TOLERANCE_MM, usableRegion } from './geometry';
import { RESULT_FORMAT, type FieldProblem, type PackInstance, type PackResult } from './types';

/** At most this many pairwise-gap problems are listed; one more line gives the total. */
const MAX_GAP_REPORTS = 20;

/** At most this many pairs too close are looked for: a layout with more is wrong, and how wrong no longer matters. */
const MAX_GAP_PAIRS = 10_000;
/**
 * At most this many pairs sharing a cell are looked at (about 0.4 s). The grid keeps a packed layout far under it
 * (200,000 boxes of a powder bed: about 50 a box); only boxes heaped in a few cells pass it, tens of thousands of
 * specks in one corner, and such a layout is refused rather than checked pair by pair.
 */
const MAX_PAIRS_LOOKED = 20_000_000;

/**
 * What a layout's counts say before any geometry is looked at: placements of parts the instance does not have, and
 * parts placed more often than their quantity. Cheap (one pass), so a layout with thousands of copies too many is
 * refused at once instead of having every pair of them checked (20,000 copies of a part of quantity 2, all in one
 * spot: 40 s of pairs before). Empty when the geometry is worth checking.
 */
export function excessProblems(parts: ReadonlyArray<{ id: string; quantity: number }>, placements: unknown): FieldProblem[] {
  if (!Array.isArray(placements)) return [];
  const index = new Map(parts.map((p, i) => [p.id, i] as const));
  const placed = new Array<number>(parts.length).fill(0);
  const problems: FieldProblem[] = [];
  placements.forEach((p: { id?: unknown } | null, i) => {
    const k = typeof p?.id === 'string' ? index.get(p.id) : undefined;
    if (k === undefined) {
      if (problems.length < MAX_GAP_REPORTS) problems.push({ field: `placements[${i}].id`, message: `must name a part of the instance (${JSON.stringify(p?.id)} is unknown)` });
    } else placed[k]++;
  });
  parts.forEach((part, k) => {
    if (placed[k] > part.quantity) problems.push({ field: `parts[${k}].quantity`, message: `is ${part.quantity} but "${part.id}" has ${placed[k]} placed` });
  });
  return problems;
}

/**
 * Checks a layout against the rules every layout must satisfy: inside the
 * usable region, at least `spacing` apart along some axis for every pair,
 * an allowed orientation with the matching size, and counts that add up.
 * Returns every problem found (empty when the layout is valid).
 */
export function validateLayout(instance: PackInstance, result: PackResult): FieldProblem[] {
  const problems: FieldProblem[] = [];
  const bad = (field: string, message: string) => problems.push({ field, message });
  const tol = TOLERANCE_MM;
  const g = instance.spacing;
  const U = usableRegion(instance);
  const partIndex = new Map(instance.parts.map((p, i) => [p.id, i] as const));
  const placedCount = new Array<number>(instance.parts.length).fill(0);

  if (result.format !== RESULT_FORMAT) bad('format', `must be "${RESULT_FORMAT}"`);
  const excess = excessProblems(instance.parts, result.placements);
  if (excess.length > 0) return [...problems, ...excess];
  const placements = Array.isArray(result.placements) ? result.placements : [];
  if (!Array.isArray(result.placements)) bad('placements', 'must be an array');

  const n = placements.length;
  const lo = new Float64Array(3 * n);
  const hi = new Float64Array(3 * n);
  const usable = new Uint8Array(n);
  let top = -Infinity;
  let volume = 0;

  placements.forEach((p, i) => {
    const at = `placements[${i}]`;
    const k = partIndex.get(p.id);
    if (k === undefined) {
      bad(`${at}.id`, `must name a part of the instance ("${p.id}" is unknown)`);
      return;
    }
    placedCount[k]++;
    const part = instance.parts[k];
    const finite = (v: unknown): v is [number, number, number] =>
      Array.isArray(v) && v.length === 3 && v.every((c) => typeof c === 'number' && Number.isFinite(c));
    if (!finite(p.position)) {
      bad(`${at}.position`, 'must be 3 finite numbers');
      return;
    }
    if (!finite(p.size)) {
      bad(`${at}.size`, 'must be 3 finite numbers');
      return;
    }
    if (!isOrientation(p.orientation)) bad(`${at}.orientation`, `"${p.orientation}" is not an orientation`);
    else {
      if (!part.orientations.includes(p.orientation)) {
        bad(`${at}.orientation`, `"${p.orientation}" is not allowed for part "${p.id}"`);
      }
      const expected = orientedSize(part.size, p.orientation);
      for (let a = 0; a < 3; a++) {
        if (Math.abs(expected[a] - p.size[a]) > tol) {
          bad(`${at}.size[${a}]`, `must be ${expected[a]} (the part's size in orientation ${p.orientation}), not ${p.size[a]}`);
        }
      }
    }
    for (let a = 0; a < 3; a++) {
      const min = p.position[a];
      const max = p.position[a] + p.size[a];
      if (min < U.min[a] - tol || max > U.max[a] + tol) {
        bad(`${at}.position[${a}]`, `puts the box [${min}, ${max}] outside the usable region [${U.min[a]}, ${U.max[a]}]`);
      }
      lo[3 * i + a] = min;
      hi[3 * i + a] = max;
    }
    usable[i] = 1;
    top = Math.max(top, p.position[2] + p.size[2]);
    volume += p.size[0] * p.size[1] * p.size[2];
  });

  checkGaps(n, lo, hi, usable, g, U.min, U.extent, bad);

  const unplacedCount = new Array<number>(instance.parts.length).fill(0);
  const unplaced = Array.isArray(result.unplaced) ? result.unplaced : [];
  if (!Array.isArray(result.unplaced)) bad('unplaced', 'must be an array');
  const listed = new Set<string>();
  unplaced.forEach((u, i) => {
    const k = partIndex.get(u.id);
    if (k === undefined) bad(`unplaced[${i}].id`, `must name a part of the instance ("${u.id}" is unknown)`);
    else if (listed.has(u.id)) bad(`unplaced[${i}].id`, `"${u.id}" is listed twice`);
    else if (!Number.isInteger(u.count) || u.count <= 0) bad(`unplaced[${i}].count`, 'must be a positive integer');
    else unplacedCount[k] = u.count;
    listed.add(u.id);
  });
  instance.parts.forEach((part, k) => {
    if (placedCount[k] + unplacedCount[k] !== part.quantity) {
      bad(
        `parts[${k}].quantity`,
        `is ${part.quantity} but "${part.id}" has ${placedCount[k]} placed and ${unplacedCount[k]} unplaced`,
      );
    }
  });

  const anyPlaced = n > 0;
  const height = anyPlaced ? top : 0;
  if (typeof result.height !== 'number' || Math.abs(result.height - height) > tol) {
    bad('height', `must be the top of the highest placed part, ${height}, not ${result.height}`);
  }
  const layers = layerCount(height, instance.margin.top, instance.layerHeight);
  if (result.layers !== layers) bad('layers', `must be ${layers}, not ${result.layers}`);
  const denominator =
    instance.objective === 'min-height'
      ? U.extent[0] * U.extent[1] * (height - instance.margin.bottom)
      : U.extent[0] * U.extent[1] * U.extent[2];
  const utilization = anyPlaced && denominator > 0 ? volume / denominator : 0;
  if (typeof result.utilization !== 'number' || Math.abs(result.utilization - utilization) > 1e-9 * Math.max(1, utilization)) {
    bad('utilization', `must be ${utilization}, not ${result.utilization}`);
  }
  return problems;
}

/**
 * Pairs closer than the spacing on every axis. A uniform grid over the usable
 * region keeps this near linear: only boxes sharing a cell (after growing each
 * by half the spacing) can be too close.
 */
function checkGaps(
  n: number,
  lo: Float64Array,
  hi: Float64Array,
  usable: Uint8Array,
  g: number,
  origin: readonly number[],
  extent: readonly number[],
  bad: (field: string, message: string) => void,
): void {
  if (n < 2) return;
  const cellsPerAxis = Math.max(1, Math.min(64, Math.ceil(Math.cbrt(n))));
  const cell = extent.map((e) => Math.max(e / cellsPerAxis, 1e-9));
  const G = cellsPerAxis;
  const cellOf = (v: number, a: number) => Math.min(G - 1, Math.max(0, Math.floor((v - origin[a]) / cell[a])));
  const buckets: number[][] = Array.from({ length: G * G * G }, () => []);
  const range = new Int32Array(6 * n);
  for (let i = 0; i < n; i++) {
    if (!usable[i]) continue;
    for (let a = 0; a < 3; a++) {
      range[6 * i + a] = cellOf(lo[3 * i + a] - g / 2, a);
      range[6 * i + 3 + a] = cellOf(hi[3 * i + a] + g / 2, a);
    }
    for (let x = range[6 * i]; x <= range[6 * i + 3]; x++)
      for (let y = range[6 * i + 1]; y <= range[6 * i + 4]; y++)
        for (let z = range[6 * i + 2]; z <= range[6 * i + 5]; z++) buckets[(x * G + y) * G + z].push(i);
  }
  const seenBy = new Int32Array(n).fill(-1);
  let reported = 0;
  let total = 0;
  let looked = 0;
  scan: for (let i = 0; i < n; i++) {
    if (!usable[i]) continue;
    for (let x = range[6 * i]; x <= range[6 * i + 3]; x++)
      for (let y = range[6 * i + 1]; y <= range[6 * i + 4]; y++)
        for (let z = range[6 * i + 2]; z <= range[6 * i + 5]; z++) {
          for (const j of buckets[(x * G + y) * G + z]) {
            if (j <= i || seenBy[j] === i) continue;
            seenBy[j] = i;
            if (++looked > MAX_PAIRS_LOOKED) {
              bad('placements', `crowd too many boxes together to be checked (more than ${MAX_PAIRS_LOOKED.toLocaleString('en-US')} pairs within the spacing's reach of each other's cells)`);
              break scan;
            }
            let separated = false;
            let worst = -Infinity;
            for (let a = 0; a < 3; a++) {
              const gap = Math.max(lo[3 * j + a] - hi[3 * i + a], lo[3 * i + a] - hi[3 * j + a]);
              worst = Math.max(worst, gap);
              if (gap >= g - TOLERANCE_MM) {
                separated = true;
                break;
              }
            }
            if (separated) continue;
            if (++total >= MAX_GAP_PAIRS) break scan;
            if (reported < MAX_GAP_REPORTS) {
              reported++;
              bad(`placements[${j}]`, `is ${worst < 0 ? 'overlapping' : `only ${worst} mm from`} placements[${i}]: the gap must be at least ${g} mm along some axis`);
            }
          }
        }
  }
  if (total > reported) bad('placements', `${total >= MAX_GAP_PAIRS ? 'at least ' : ''}${total - reported} more pairs are closer than the spacing`);
}
