/**
 * `fit: "box"` for a version 2 instance: the parts' bounding boxes go through
 * the box engine exactly as in version 1; each placed box then gets the
 * rotation (one the part allows, with the box's extents) and the 3MF
 * transform of its mesh, and the placements are listed bottom first, which
 * is a lift-out order for boxes kept apart along some axis.
 */
import { extentCode, placementTransform, rotationIndex } from '../../geometry/rotations';
import { createPacking, type PackOptions, type PackPhase } from '../engine';
import { INSTANCE_FORMAT, type Orientation, type PackInstance, type PackInstanceV2, type PackResult, type PackResultV2, type PlacementV2 } from '../types';
import type { PlacedPart } from './area';
import { codeFor, finishResult } from './result';
import { shapeParts, type ShapePart } from './parts';

/** The version 1 instance of the parts' boxes. */
export function boxInstance(instance: PackInstanceV2, parts: ShapePart[]): PackInstance {
  return {
    format: INSTANCE_FORMAT,
    chamber: instance.chamber,
    margin: instance.margin,
    spacing: instance.spacing,
    layerHeight: instance.layerHeight,
    objective: instance.objective,
    timeLimitMs: instance.timeLimitMs,
    seed: instance.seed,
    parts: parts.map((p) => ({
      id: p.id,
      size: p.size,
      quantity: p.quantity,
      orientations: [...new Set(p.rotations.map((r) => extentCode(r)))] as Orientation[],
    })),
  };
}

/** The rotation a placed box of `part` stands for: the box orientation's own index when allowed, else an allowed one with its extents. */
export function rotationForBox(part: Pick<ShapePart, 'rotations'>, orientation: string): number {
  const v1 = rotationIndex(orientation);
  if (v1 >= 0 && v1 < 6 && part.rotations.includes(v1)) return v1;
  return part.rotations.find((k) => extentCode(k) === orientation) ?? part.rotations[0];
}

/** A version 1 result of the parts' boxes as a version 2 result (transforms, lift-out order, area profile). */
export function fromBoxResult(instance: PackInstanceV2, parts: ShapePart[], r: PackResult): PackResultV2 {
  const byId = new Map(parts.map((p) => [p.id, p] as const));
  const sorted = r.placements.map((p, i) => ({ p, i })).sort((a, b) => a.p.position[2] - b.p.position[2] || a.i - b.i);
  const placements: PlacementV2[] = [];
  const forArea: PlacedPart[] = [];
  const count = new Array<number>(parts.length).fill(0);
  let top = 0;
  let volume = 0;
  for (const { p } of sorted) {
    const part = byId.get(p.id)!;
    const rot = rotationForBox(part, p.orientation);
    const transform = placementTransform(rot, part.min, part.max, p.position);
    const out: PlacementV2 = { id: p.id, position: [...p.position], size: [...p.size], orientation: codeFor(part, rot) };
    if (part.hasMesh) out.transform = [...transform];
    placements.push(out);
    forArea.push({ part, transform });
    count[part.index]++;
    top = Math.max(top, p.position[2] + p.size[2]);
    volume += part.volume;
  }
  return finishResult(instance, parts, placements, forArea, count, top, volume, r.elapsedMs, []);
}

export interface BoxFitHooks {
  onProgress?: (phase: PackPhase, shareDone: number, best: PackResultV2 | null) => void;
  shouldStop?: () => boolean;
}

/** Packs a version 2 instance by boxes. */
export function createBoxFitPacking(instance: PackInstanceV2, options: PackOptions = {}) {
  const parts = shapeParts(instance);
  const inner = createPacking(boxInstance(instance, parts), options);
  const wrap = (hooks: BoxFitHooks) => {
    let last: PackResult | null = null;
    let lastV2: PackResultV2 | null = null;
    return {
      shouldStop: hooks.shouldStop,
      onProgress: (phase: PackPhase, share: number, best: PackResult | null) => {
        if (best && best !== last) {
          last = best;
          lastV2 = fromBoxResult(instance, parts, best);
        }
        hooks.onProgress?.(phase, share, lastV2);
      },
    };
  };
  return {
    parts,
    runSync: (hooks: BoxFitHooks = {}) => fromBoxResult(instance, parts, inner.runSync(wrap(hooks))),
    run: async (hooks: BoxFitHooks = {}) => fromBoxResult(instance, parts, await inner.run(wrap(hooks))),
  };
}
