import { LENGTH_TOLERANCE_MM } from './layers';

/** A plain placed box, as the packing result lists it: minimum corner and extent (mm). */
export interface PlacedBox {
  position: readonly number[];
  size: readonly number[];
}

/** Boxes as flat typed arrays: box i is at [3i, 3i+1, 3i+2] of each. */
export interface BoxArrays {
  positionsMm: ArrayLike<number>;
  sizesMm: ArrayLike<number>;
}

export function boxArraysFromPlacements(placements: readonly PlacedBox[]): { positionsMm: Float64Array; sizesMm: Float64Array } {
  const positionsMm = new Float64Array(placements.length * 3);
  const sizesMm = new Float64Array(placements.length * 3);
  placements.forEach((p, i) => {
    for (let a = 0; a < 3; a++) {
      positionsMm[3 * i + a] = p.position[a];
      sizesMm[3 * i + a] = p.size[a];
    }
  });
  return { positionsMm, sizesMm };
}

export function boxCount(boxes: BoxArrays): number {
  return Math.floor(boxes.sizesMm.length / 3);
}

export function boxesVolumeMm3(boxes: BoxArrays): number {
  let volume = 0;
  for (let i = 0, n = boxCount(boxes); i < n; i++) {
    volume += boxes.sizesMm[3 * i] * boxes.sizesMm[3 * i + 1] * boxes.sizesMm[3 * i + 2];
  }
  return volume;
}

/** Top of the highest box from the floor (mm), 0 when there are none. */
export function boxesTopMm(boxes: BoxArrays): number {
  let top = 0;
  for (let i = 0, n = boxCount(boxes); i < n; i++) {
    top = Math.max(top, boxes.positionsMm[3 * i + 2] + boxes.sizesMm[3 * i + 2]);
  }
  return top;
}

/**
 * Cross-section area per layer (mm^2) when every part is taken as its bounding box:
 * a box adds its x*y area to each layer slab [i h, (i+1) h) it overlaps. Layer 0 sits on the floor.
 * A box thinner than one layer still gets one layer, since the laser must draw it.
 *
 * Runs in O(boxes + layers) with a difference array, so thousands of parts over thousands of layers stay cheap;
 * the sums are kept in doubles and only the result is single precision, for the chart and the worker transfer.
 */
export function boxAreaProfile(boxes: BoxArrays, layerHeightMm: number, layers: number): Float32Array {
  const delta = new Float64Array(layers + 1);
  for (let i = 0, n = boxCount(boxes); i < n; i++) {
    const area = boxes.sizesMm[3 * i] * boxes.sizesMm[3 * i + 1];
    const z0 = boxes.positionsMm[3 * i + 2];
    const z1 = z0 + boxes.sizesMm[3 * i + 2];
    let first = Math.floor((z0 + LENGTH_TOLERANCE_MM) / layerHeightMm);
    let end = Math.ceil((z1 - LENGTH_TOLERANCE_MM) / layerHeightMm);
    if (end <= first) end = first + 1;
    first = Math.max(0, first);
    end = Math.min(layers, end);
    if (end <= first || area <= 0) continue;
    delta[first] += area;
    delta[end] -= area;
  }
  const profile = new Float32Array(layers);
  let running = 0;
  for (let l = 0; l < layers; l++) {
    running += delta[l];
    // Adding and removing the same areas can leave a rounding residue; an empty layer must read 0.
    profile[l] = running > 1e-9 ? running : 0;
  }
  return profile;
}

export interface AreaJumpOptions {
  /** Flag when the larger of two neighbouring layers' areas is at least this many times the smaller. Default 2. */
  minRatio?: number;
  /** ...and they differ by at least this much (mm^2), so that tiny features do not flag. Default 0. */
  minDeltaMm2?: number;
}

export interface AreaJump {
  layerIndex: number;
  areaMm2: number;
  belowAreaMm2: number;
  /** Signed: positive when the layer holds more area than the one below. */
  deltaMm2: number;
}

/**
 * Layers whose scanned area changes sharply from the layer below: the heat put into the bed jumps with it,
 * which loads the cake unevenly. Both rises and drops are flagged, with two exceptions at the ends of the build:
 * - the first layer that holds any area: below it lies only unsintered powder at bed temperature, so there is
 *   no uneven history to compare with;
 * - the build's taper at the top: a drop after which no layer up to the top holds more than the minimum area
 *   (`minDeltaMm2`; nothing at all when it is 0). The area of every build falls to nothing where its tallest
 *   parts end; an uneven heat input matters to the part layers fused over it, and there are none.
 */
export function findAreaJumps(areaPerLayerMm2: ArrayLike<number>, options: AreaJumpOptions = {}): AreaJump[] {
  const minRatio = options.minRatio ?? 2;
  const minDeltaMm2 = options.minDeltaMm2 ?? 0;
  const jumps: AreaJump[] = [];
  // The taper: the top run of layers each holding no more than the minimum area.
  let taperFrom = areaPerLayerMm2.length;
  while (taperFrom > 0 && areaPerLayerMm2[taperFrom - 1] <= minDeltaMm2) taperFrom--;
  let seenArea = false;
  for (let l = 0; l < areaPerLayerMm2.length; l++) {
    const area = areaPerLayerMm2[l];
    if (!seenArea) {
      seenArea = area > 0;
      continue;
    }
    const below = areaPerLayerMm2[l - 1];
    const larger = Math.max(area, below);
    const smaller = Math.min(area, below);
    if (larger - smaller < minDeltaMm2 || larger <= 0) continue;
    if (l >= taperFrom && area < below) continue;
    if (smaller === 0 || larger / smaller >= minRatio) {
      jumps.push({ layerIndex: l, areaMm2: area, belowAreaMm2: below, deltaMm2: area - below });
    }
  }
  return jumps;
}
