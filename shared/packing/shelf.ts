import type { BoxType, BlockNode, ContainerProblem, SolverState } from './solver';

/**
 * A quick layer-and-row fill: every box turned to its lowest allowed height,
 * tallest first, rows along x, rows stacked along y, layers along z. Not dense,
 * but linear after a sort, so even thousands of distinct parts get a first
 * valid layout at once; the block solver improves on it afterwards.
 */
export function shelfFill(problem: ContainerProblem): SolverState {
  const [cx, cy, cz] = problem.size;
  const boxes: Array<{ type: number; orient: number; d0: number; d1: number; d2: number }> = [];
  const listed = new Uint8Array(problem.types.length);
  problem.types.forEach((type: BoxType, t) => {
    let best = -1;
    for (let o = 0; o < type.orientationCodes.length; o++) {
      const d0 = type.dims[3 * o], d1 = type.dims[3 * o + 1], d2 = type.dims[3 * o + 2];
      if (d0 > cx + 1e-9 || d1 > cy + 1e-9 || d2 > cz + 1e-9) continue;
      if (best < 0 || d2 < type.dims[3 * best + 2] || (d2 === type.dims[3 * best + 2] && d0 > type.dims[3 * best])) best = o;
    }
    if (best < 0) return;
    listed[t] = 1;
    for (let k = 0; k < type.count; k++) {
      boxes.push({ type: t, orient: best, d0: type.dims[3 * best], d1: type.dims[3 * best + 1], d2: type.dims[3 * best + 2] });
    }
  });
  boxes.sort((a, b) => b.d2 - a.d2 || b.d1 - a.d1 || a.type - b.type);
  const remaining = new Int32Array(problem.types.length);
  problem.types.forEach((t, i) => (remaining[i] = t.count));
  let blocks: BlockNode | null = null;
  let value = 0;
  let boxesLeft = boxes.length;
  let z = 0, layerH = 0, y = 0, rowD = 0, x = 0;
  for (const b of boxes) {
    if (layerH === 0) layerH = b.d2;
    if (x + b.d0 > cx + 1e-9) {
      y += rowD;
      x = 0;
      rowD = 0;
    }
    if (y + b.d1 > cy + 1e-9) {
      z += layerH;
      layerH = b.d2;
      y = 0;
      x = 0;
      rowD = 0;
    }
    if (z + b.d2 > cz + 1e-9) continue;
    blocks = { type: b.type, orient: b.orient, x, y, z, nx: 1, ny: 1, nz: 1, prev: blocks };
    remaining[b.type]--;
    boxesLeft--;
    value += problem.types[b.type].unitValue;
    x += b.d0;
    rowD = Math.max(rowD, b.d1);
  }
  // Boxes that fit in no orientation were never listed; count them as left too.
  for (let t = 0; t < problem.types.length; t++) if (!listed[t]) boxesLeft += remaining[t];
  return { spaces: [], remaining, blocks, value, boxesLeft, minDim: 0 };
}
