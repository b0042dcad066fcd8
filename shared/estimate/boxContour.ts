import { boxCount, type BoxArrays } from './areaProfile';
import { LENGTH_TOLERANCE_MM } from './layers';

/**
 * Contour length per layer (mm) when every part is taken as its bounding box: a box adds its footprint's perimeter
 * 2 (x + y) to each layer it overlaps, counted over the same layers as the box area profile.
 */
export function boxContourProfile(boxes: BoxArrays, layerHeightMm: number, layers: number): Float32Array {
  const delta = new Float64Array(layers + 1);
  for (let i = 0, n = boxCount(boxes); i < n; i++) {
    const perimeter = 2 * (boxes.sizesMm[3 * i] + boxes.sizesMm[3 * i + 1]);
    const z0 = boxes.positionsMm[3 * i + 2];
    const z1 = z0 + boxes.sizesMm[3 * i + 2];
    let first = Math.floor((z0 + LENGTH_TOLERANCE_MM) / layerHeightMm);
    let end = Math.ceil((z1 - LENGTH_TOLERANCE_MM) / layerHeightMm);
    if (end <= first) end = first + 1;
    first = Math.max(0, first);
    end = Math.min(layers, end);
    if (end <= first || perimeter <= 0) continue;
    delta[first] += perimeter;
    delta[end] -= perimeter;
  }
  const profile = new Float32Array(layers);
  let running = 0;
  for (let l = 0; l < layers; l++) {
    running += delta[l];
    profile[l] = running > 1e-9 ? running : 0;
  }
  return profile;
}
