/**
 * Container solver: fills one box-shaped container with blocks of identical
 * boxes, working on a cover of maximal empty spaces.
 *
 * Everything here is in "inflated" coordinates: every box grows by the
 * spacing g along each axis and the container is the usable region grown by
 * g, so boxes that merely touch here keep a gap of at least g in the chamber.
 *
 * The method follows the block-building line of work on container loading:
 * blocks of n_x x n_y x n_z copies of one box type in one orientation, the
 * empty space nearest a container corner filled first, blocks scored by volume
 * less the slivers they leave unusable, and a beam search whose nodes are
 * ranked by a greedy completion (Zhu & Lim, "A beam search approach for the
 * container loading problem", 2012; Araya & Riff, "A beam search approach to
 * the container loading problem", Computers & OR 43, 2014).
 */

const EPS = 1e-9;

/** A group of parts with the same size and allowed orientations: interchangeable for the solver. */
export interface BoxType {
  /** Inflated extents, 3 per distinct placed orientation. */
  dims: Float64Array;
  /** Index into ORIENTATIONS for each entry of `dims`. */
  orientationCodes: Uint8Array;
  count: number;
  /** What one box is worth to the objective (its real volume, times a weight). */
  unitValue: number;
  /** Smallest inflated extent over the allowed orientations. */
  minDim: number;
}

export interface ContainerProblem {
  size: [number, number, number];
  types: BoxType[];
  /** Place blocks only at space corners on the floor side (z minimum): layouts grow upwards. */
  floorFirst: boolean;
  /** Weight of the sliver waste in a block's score. */
  wasteWeight: number;
  /** Look at no more than this many fitting box types per space (keeps thousands of distinct parts fast). */
  maxTypesPerSpace: number;
  /**
   * Keep at most about this many empty spaces, dropping the smallest: thousands of distinct
   * parts otherwise fragment the free volume into thousands of spaces and every step slows down.
   */
  maxSpaces: number;
}

export interface BlockNode {
  type: number;
  /** Index of the orientation within the type's `dims`. */
  orient: number;
  x: number;
  y: number;
  z: number;
  nx: number;
  ny: number;
  nz: number;
  prev: BlockNode | null;
}

export interface SolverState {
  /** Maximal empty spaces, 6 numbers each: x0 y0 z0 x1 y1 z1. */
  spaces: number[];
  remaining: Int32Array;
  blocks: BlockNode | null;
  value: number;
  boxesLeft: number;
  minDim: number;
}

interface Candidate {
  type: number;
  orient: number;
  nx: number;
  ny: number;
  nz: number;
  fitness: number;
}

const AXIS_ORDERS: ReadonlyArray<readonly [number, number, number]> = [
  [0, 1, 2],
  [0, 2, 1],
  [1, 0, 2],
  [1, 2, 0],
  [2, 0, 1],
  [2, 1, 0],
];

export function initialState(problem: ContainerProblem, obstacles: ReadonlyArray<readonly number[]> = []): SolverState {
  const remaining = new Int32Array(problem.types.length);
  let boxesLeft = 0;
  problem.types.forEach((t, i) => {
    remaining[i] = t.count;
    boxesLeft += t.count;
  });
  const [cx, cy, cz] = problem.size;
  const state: SolverState = {
    spaces: [0, 0, 0, cx, cy, cz],
    remaining,
    blocks: null,
    value: 0,
    boxesLeft,
    minDim: 0,
  };
  state.minDim = smallestRemainingDim(problem, remaining);
  for (const o of obstacles) carve(state, o[0], o[1], o[2], o[3], o[4], o[5]);
  return state;
}

export function cloneState(s: SolverState): SolverState {
  return {
    spaces: s.spaces.slice(),
    remaining: s.remaining.slice(),
    blocks: s.blocks,
    value: s.value,
    boxesLeft: s.boxesLeft,
    minDim: s.minDim,
  };
}

function smallestRemainingDim(problem: ContainerProblem, remaining: Int32Array): number {
  let m = Infinity;
  for (let i = 0; i < problem.types.length; i++) if (remaining[i] > 0) m = Math.min(m, problem.types[i].minDim);
  return m;
}

/** Index of the space to fill next and the container corner (bits x, y, z: 1 = maximum side) to fill it from. */
function selectSpace(problem: ContainerProblem, s: SolverState): { index: number; corner: number } {
  const sp = s.spaces;
  const [cx, cy, cz] = problem.size;
  let best = -1;
  let bestCorner = 0;
  let b0 = Infinity;
  let b1 = Infinity;
  let b2 = Infinity;
  let bVol = -1;
  const zCorners = problem.floorFirst ? 1 : 2;
  for (let i = 0; i < sp.length; i += 6) {
    const x0 = sp[i], y0 = sp[i + 1], z0 = sp[i + 2], x1 = sp[i + 3], y1 = sp[i + 4], z1 = sp[i + 5];
    const vol = (x1 - x0) * (y1 - y0) * (z1 - z0);
    for (let c = 0; c < 4 * zCorners; c++) {
      const dx = c & 1 ? cx - x1 : x0;
      const dy = c & 2 ? cy - y1 : y0;
      const dz = c & 4 ? cz - z1 : z0;
      // Sorted distances, compared lexicographically: the space hugging a corner most closely wins.
      let a = dx, b = dy, d = dz, t: number;
      if (a > b) { t = a; a = b; b = t; }
      if (b > d) { t = b; b = d; d = t; }
      if (a > b) { t = a; a = b; b = t; }
      if (problem.floorFirst) {
        // Growing upwards: lowest first, then nearest a side corner.
        const ab = Math.min(dx, dy);
        const bb = Math.max(dx, dy);
        a = dz; b = ab; d = bb;
      }
      if (
        a < b0 - EPS ||
        (a <= b0 + EPS && (b < b1 - EPS || (b <= b1 + EPS && (d < b2 - EPS || (d <= b2 + EPS && vol > bVol)))))
      ) {
        best = i;
        bestCorner = c;
        b0 = a;
        b1 = b;
        b2 = d;
        bVol = vol;
      }
    }
  }
  return { index: best, corner: bestCorner };
}

/** Up to `k` best blocks for a space, best first. */
function candidates(problem: ContainerProblem, s: SolverState, si: number, k: number): Candidate[] {
  const sp = s.spaces;
  const S0 = sp[si + 3] - sp[si], S1 = sp[si + 4] - sp[si + 1], S2 = sp[si + 5] - sp[si + 2];
  const out: Candidate[] = [];
  const minDim = s.minDim;
  const n = [0, 0, 0];
  const m = [0, 0, 0];
  const d = [0, 0, 0];
  let typesSeen = 0;
  for (let t = 0; t < problem.types.length; t++) {
    const q = s.remaining[t];
    if (q <= 0) continue;
    const type = problem.types[t];
    if (type.minDim > S0 + EPS && type.minDim > S1 + EPS && type.minDim > S2 + EPS) continue;
    let fitted = false;
    const orients = type.orientationCodes.length;
    for (let o = 0; o < orients; o++) {
      d[0] = type.dims[3 * o];
      d[1] = type.dims[3 * o + 1];
      d[2] = type.dims[3 * o + 2];
      if (d[0] > S0 + EPS || d[1] > S1 + EPS || d[2] > S2 + EPS) continue;
      fitted = true;
      m[0] = Math.floor((S0 + EPS) / d[0]);
      m[1] = Math.floor((S1 + EPS) / d[1]);
      m[2] = Math.floor((S2 + EPS) / d[2]);
      const orders = q === 1 ? 1 : AXIS_ORDERS.length;
      let lastKey = -1;
      for (let r = 0; r < orders; r++) {
        const [a0, a1, a2] = AXIS_ORDERS[r];
        n[a0] = Math.min(m[a0], q);
        n[a1] = Math.min(m[a1], Math.floor(q / n[a0]));
        n[a2] = Math.min(m[a2], Math.floor(q / (n[a0] * n[a1])));
        const key = (n[0] * 100003 + n[1]) * 100019 + n[2];
        if (key === lastKey) continue;
        lastKey = key;
        const B0 = n[0] * d[0], B1 = n[1] * d[1], B2 = n[2] * d[2];
        const volume = B0 * B1 * B2;
        // A leftover slab thinner than every remaining box is lost for good.
        const r0 = S0 - B0, r1 = S1 - B1, r2 = S2 - B2;
        let waste = 0;
        if (r0 > EPS && r0 < minDim) waste += r0 * B1 * B2;
        if (r1 > EPS && r1 < minDim) waste += r1 * B0 * B2;
        if (r2 > EPS && r2 < minDim) waste += r2 * B0 * B1;
        const count = n[0] * n[1] * n[2];
        const valueDensity = (count * type.unitValue) / volume;
        const fitness = (volume - problem.wasteWeight * waste) * (0.5 + 0.5 * valueDensity);
        insertCandidate(out, k, { type: t, orient: o, nx: n[0], ny: n[1], nz: n[2], fitness });
      }
    }
    if (fitted && ++typesSeen >= problem.maxTypesPerSpace) break;
  }
  return out;
}

function insertCandidate(out: Candidate[], k: number, c: Candidate): void {
  if (out.length >= k && c.fitness <= out[out.length - 1].fitness) return;
  let i = out.length;
  while (i > 0 && out[i - 1].fitness < c.fitness) i--;
  out.splice(i, 0, c);
  if (out.length > k) out.pop();
}

/** Scratch for the pieces of one carve; grown on demand, never shared between calls in flight. */
let scratch = new Float64Array(6 * 256);
let scratchDrop = new Uint8Array(256);
let touching = new Int32Array(1024);

/** Removes the box [x0, x1] x [y0, y1] x [z0, z1] from the cover of maximal spaces, in place. */
export function carve(s: SolverState, x0: number, y0: number, z0: number, x1: number, y1: number, z1: number): void {
  const sp = s.spaces;
  const minDim = s.minDim;
  let np = 0;
  let w = 0;
  let nt = 0;
  const push = (a: number, b: number, c: number, d: number, e: number, f: number) => {
    if (d - a + EPS < minDim || e - b + EPS < minDim || f - c + EPS < minDim) return;
    if (np + 6 > scratch.length) {
      const bigger = new Float64Array(scratch.length * 2);
      bigger.set(scratch);
      scratch = bigger;
    }
    scratch[np] = a;
    scratch[np + 1] = b;
    scratch[np + 2] = c;
    scratch[np + 3] = d;
    scratch[np + 4] = e;
    scratch[np + 5] = f;
    np += 6;
  };
  for (let i = 0; i < sp.length; i += 6) {
    const a0 = sp[i], b0 = sp[i + 1], c0 = sp[i + 2], a1 = sp[i + 3], b1 = sp[i + 4], c1 = sp[i + 5];
    if (x0 >= a1 - EPS || x1 <= a0 + EPS || y0 >= b1 - EPS || y1 <= b0 + EPS || z0 >= c1 - EPS || z1 <= c0 + EPS) {
      // Only a space touching the block can contain a new piece (every piece borders the block).
      if (!(x0 > a1 + EPS || x1 < a0 - EPS || y0 > b1 + EPS || y1 < b0 - EPS || z0 > c1 + EPS || z1 < c0 - EPS)) {
        if (nt >= touching.length) {
          const bigger = new Int32Array(touching.length * 2);
          bigger.set(touching);
          touching = bigger;
        }
        touching[nt++] = w;
      }
      if (w !== i) {
        sp[w] = a0;
        sp[w + 1] = b0;
        sp[w + 2] = c0;
        sp[w + 3] = a1;
        sp[w + 4] = b1;
        sp[w + 5] = c1;
      }
      w += 6;
      continue;
    }
    if (x0 > a0 + EPS) push(a0, b0, c0, x0, b1, c1);
    if (x1 < a1 - EPS) push(x1, b0, c0, a1, b1, c1);
    if (y0 > b0 + EPS) push(a0, b0, c0, a1, y0, c1);
    if (y1 < b1 - EPS) push(a0, y1, c0, a1, b1, c1);
    if (z0 > c0 + EPS) push(a0, b0, c0, a1, b1, z0);
    if (z1 < c1 - EPS) push(a0, b0, z1, a1, b1, c1);
  }
  sp.length = w;
  // A new piece lies inside one old space; an untouched old space was maximal, so it cannot lie
  // inside a piece. Only pieces need the containment test, and only against spaces touching the block.
  const pieces = scratch;
  const count = np / 6;
  if (scratchDrop.length < count) scratchDrop = new Uint8Array(2 * count);
  const drop = scratchDrop;
  drop.fill(0, 0, count);
  for (let i = 0; i < np; i += 6) {
    const a0 = pieces[i], b0 = pieces[i + 1], c0 = pieces[i + 2], a1 = pieces[i + 3], b1 = pieces[i + 4], c1 = pieces[i + 5];
    let inside = false;
    for (let t = 0; t < nt && !inside; t++) {
      const j = touching[t];
      inside =
        sp[j] <= a0 + EPS && sp[j + 1] <= b0 + EPS && sp[j + 2] <= c0 + EPS &&
        sp[j + 3] >= a1 - EPS && sp[j + 4] >= b1 - EPS && sp[j + 5] >= c1 - EPS;
    }
    for (let j = 0; j < np && !inside; j += 6) {
      if (j === i || drop[j / 6]) continue;
      const contains =
        pieces[j] <= a0 + EPS && pieces[j + 1] <= b0 + EPS && pieces[j + 2] <= c0 + EPS &&
        pieces[j + 3] >= a1 - EPS && pieces[j + 4] >= b1 - EPS && pieces[j + 5] >= c1 - EPS;
      // Of two equal pieces keep the first.
      if (contains) {
        const equal =
          Math.abs(pieces[j] - a0) <= EPS && Math.abs(pieces[j + 1] - b0) <= EPS && Math.abs(pieces[j + 2] - c0) <= EPS &&
          Math.abs(pieces[j + 3] - a1) <= EPS && Math.abs(pieces[j + 4] - b1) <= EPS && Math.abs(pieces[j + 5] - c1) <= EPS;
        inside = !equal || j < i;
      }
    }
    if (inside) drop[i / 6] = 1;
  }
  for (let i = 0; i < np; i += 6) {
    if (!drop[i / 6]) sp.push(pieces[i], pieces[i + 1], pieces[i + 2], pieces[i + 3], pieces[i + 4], pieces[i + 5]);
  }
}

function place(problem: ContainerProblem, s: SolverState, si: number, corner: number, c: Candidate): void {
  const type = problem.types[c.type];
  const sp = s.spaces;
  const B0 = c.nx * type.dims[3 * c.orient], B1 = c.ny * type.dims[3 * c.orient + 1], B2 = c.nz * type.dims[3 * c.orient + 2];
  const x = corner & 1 ? sp[si + 3] - B0 : sp[si];
  const y = corner & 2 ? sp[si + 4] - B1 : sp[si + 1];
  const z = corner & 4 ? sp[si + 5] - B2 : sp[si + 2];
  const count = c.nx * c.ny * c.nz;
  s.blocks = { type: c.type, orient: c.orient, x, y, z, nx: c.nx, ny: c.ny, nz: c.nz, prev: s.blocks };
  s.remaining[c.type] -= count;
  s.boxesLeft -= count;
  s.value += count * type.unitValue;
  if (s.remaining[c.type] === 0) s.minDim = smallestRemainingDim(problem, s.remaining);
  carve(s, x, y, z, x + B0, y + B1, z + B2);
  if (s.spaces.length > 9 * problem.maxSpaces) trimSpaces(s, problem.maxSpaces);
}

/** Drops the smallest spaces down to `keep`: less room to use, but the layout stays valid. */
function trimSpaces(s: SolverState, keep: number): void {
  const sp = s.spaces;
  const n = sp.length / 6;
  const volume = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const j = 6 * i;
    volume[i] = (sp[j + 3] - sp[j]) * (sp[j + 4] - sp[j + 1]) * (sp[j + 5] - sp[j + 2]);
  }
  const threshold = Float64Array.from(volume).sort()[n - keep];
  const kept: number[] = [];
  for (let i = 0; i < n && kept.length < 6 * keep; i++) {
    if (volume[i] >= threshold) kept.push(sp[6 * i], sp[6 * i + 1], sp[6 * i + 2], sp[6 * i + 3], sp[6 * i + 4], sp[6 * i + 5]);
  }
  s.spaces = kept;
}

function removeSpace(s: SolverState, si: number): void {
  s.spaces.splice(si, 6);
}

/**
 * The next decision of a state: the space to fill and up to `k` blocks for it.
 * Spaces that fit nothing are dropped on the way. Null when the state is complete.
 */
export function nextChoices(
  problem: ContainerProblem,
  s: SolverState,
  k: number,
): { space: number; corner: number; choices: Candidate[] } | null {
  while (s.boxesLeft > 0 && s.spaces.length > 0) {
    const { index, corner } = selectSpace(problem, s);
    const choices = candidates(problem, s, index, k);
    if (choices.length > 0) return { space: index, corner, choices };
    removeSpace(s, index);
  }
  return null;
}

export function applyChoice(problem: ContainerProblem, s: SolverState, space: number, corner: number, c: Candidate): void {
  place(problem, s, space, corner, c);
}

/** Completes a state greedily, in place: the best-scored block into the chosen space until nothing fits. */
export function complete(problem: ContainerProblem, s: SolverState, abort?: () => boolean): SolverState {
  for (let step = 1; ; step++) {
    // Checked every few steps: a fill of thousands of parts must not overrun the time budget.
    if (abort && (step & 15) === 0 && abort()) return s;
    const next = nextChoices(problem, s, 1);
    if (!next) return s;
    place(problem, s, next.space, next.corner, next.choices[0]);
  }
}

export type { Candidate };
