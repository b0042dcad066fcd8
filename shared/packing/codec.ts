import { ORIENTATIONS, RESULT_FORMAT, type FieldProblem, type PackResult, type Placement } from './types';

/**
 * A layout as typed arrays, to cross a thread boundary as transferables
 * instead of an array of objects. Positions and sizes stay 64-bit so a decoded
 * layout still meets the 1e-6 mm tolerance of the layout rules.
 */
export interface EncodedLayout {
  format: typeof RESULT_FORMAT;
  /** Distinct part ids; `partIndex` points into it. */
  ids: string[];
  partIndex: Uint32Array;
  /** x, y, z of each placement's minimum corner. */
  positions: Float64Array;
  /** Placed extent along x, y, z of each placement. */
  sizes: Float64Array;
  /** Index into the six orientations xyz, xzy, yxz, yzx, zxy, zyx. */
  orientations: Uint8Array;
  unplacedIndex: Uint32Array;
  unplacedCounts: Uint32Array;
  height: number;
  layers: number;
  utilization: number;
  elapsedMs: number;
}

export function encodeLayout(r: PackResult): EncodedLayout {
  const n = r.placements.length;
  const idIndex = new Map<string, number>();
  const ids: string[] = [];
  const indexOf = (id: string) => {
    let k = idIndex.get(id);
    if (k === undefined) {
      k = ids.length;
      ids.push(id);
      idIndex.set(id, k);
    }
    return k;
  };
  const partIndex = new Uint32Array(n);
  const positions = new Float64Array(3 * n);
  const sizes = new Float64Array(3 * n);
  const orientations = new Uint8Array(n);
  r.placements.forEach((p, i) => {
    partIndex[i] = indexOf(p.id);
    positions.set(p.position, 3 * i);
    sizes.set(p.size, 3 * i);
    orientations[i] = ORIENTATIONS.indexOf(p.orientation);
  });
  const unplacedIndex = Uint32Array.from(r.unplaced.map((u) => indexOf(u.id)));
  const unplacedCounts = Uint32Array.from(r.unplaced.map((u) => u.count));
  return {
    format: RESULT_FORMAT,
    ids,
    partIndex,
    positions,
    sizes,
    orientations,
    unplacedIndex,
    unplacedCounts,
    height: r.height,
    layers: r.layers,
    utilization: r.utilization,
    elapsedMs: r.elapsedMs,
  };
}

/** The buffers to hand to postMessage / Comlink.transfer; the layout is unusable on the sending side afterwards. */
export function layoutTransferables(e: EncodedLayout): ArrayBuffer[] {
  return [e.partIndex, e.positions, e.sizes, e.orientations, e.unplacedIndex, e.unplacedCounts].map((a) => a.buffer as ArrayBuffer);
}

/** Checks a layout received from another thread and rebuilds the plain result. */
/** Realm-independent: arrays from another thread or context fail instanceof. */
function isTyped(v: unknown, name: string): boolean {
  return Object.prototype.toString.call(v) === `[object ${name}]`;
}

export function decodeLayout(e: EncodedLayout): { ok: true; result: PackResult } | { ok: false; problems: FieldProblem[] } {
  const problems: FieldProblem[] = [];
  const n = e?.partIndex?.length ?? 0;
  if (!e || e.format !== RESULT_FORMAT) problems.push({ field: 'format', message: `must be "${RESULT_FORMAT}"` });
  else {
    if (!isTyped(e.partIndex, 'Uint32Array')) problems.push({ field: 'partIndex', message: 'must be a Uint32Array' });
    if (!isTyped(e.positions, 'Float64Array') || e.positions.length !== 3 * n) problems.push({ field: 'positions', message: 'must be a Float64Array of 3 numbers a placement' });
    if (!isTyped(e.sizes, 'Float64Array') || e.sizes.length !== 3 * n) problems.push({ field: 'sizes', message: 'must be a Float64Array of 3 numbers a placement' });
    if (!isTyped(e.orientations, 'Uint8Array') || e.orientations.length !== n) problems.push({ field: 'orientations', message: 'must be a Uint8Array of one code a placement' });
    if (!isTyped(e.unplacedIndex, 'Uint32Array') || !isTyped(e.unplacedCounts, 'Uint32Array') || e.unplacedIndex.length !== e.unplacedCounts.length) {
      problems.push({ field: 'unplacedIndex', message: 'must pair with unplacedCounts' });
    }
    if (!Array.isArray(e.ids)) problems.push({ field: 'ids', message: 'must be an array of strings' });
  }
  if (problems.length > 0) return { ok: false, problems };
  const placements: Placement[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const id = e.ids[e.partIndex[i]];
    const orientation = ORIENTATIONS[e.orientations[i]];
    if (id === undefined) problems.push({ field: `partIndex[${i}]`, message: 'points past ids' });
    if (orientation === undefined) problems.push({ field: `orientations[${i}]`, message: 'must be a code 0 to 5' });
    placements[i] = {
      id,
      position: [e.positions[3 * i], e.positions[3 * i + 1], e.positions[3 * i + 2]],
      size: [e.sizes[3 * i], e.sizes[3 * i + 1], e.sizes[3 * i + 2]],
      orientation,
    };
  }
  const unplaced = Array.from(e.unplacedIndex, (k, i) => ({ id: e.ids[k], count: e.unplacedCounts[i] }));
  if (problems.length > 0) return { ok: false, problems };
  return {
    ok: true,
    result: { format: RESULT_FORMAT, placements, unplaced, height: e.height, layers: e.layers, utilization: e.utilization, elapsedMs: e.elapsedMs },
  };
}
