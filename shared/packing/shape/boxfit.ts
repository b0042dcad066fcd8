/**
 * `fit: "box"` for a version 2 instance: the parts' bounding boxes go through
 * the box engine exactly as in version 1; each placed box then gets the
 * rotation (one the part allows, with the box's extents) and the 3MF
 * transform of its mesh, and the placements are listed bottom first, which
 * is a lift-out order for boxes kept apart along some axis.
 */
import { extentCode, placementTransform, rotationIndex, type Transform12 } from '../../geometry/rotations';
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
  // Bottom first, ties in the engine's order.
  const z = Float64Array.from(r.placements, (p) => p.position[2]);
  const order = Array.from({ length: z.length }, (_, i) => i).sort((a, b) => z[a] - z[b] || a - b);
  const placements: PlacementV2[] = [];
  const forArea: PlacedPart[] = [];
  const count = new Array<number>(parts.length).fill(0);
  let top = 0;
  let volume = 0;
  // What a part in a box orientation turns into (its rotation, code and the transform at the origin) is worked out
  // once per part and orientation (185,556 cubes: 0.5 s rather than 0.7 s; most of the rest is making the records).
  const turns = new Map<string, { code: string; at0: Transform12 }>();
  for (const i of order) {
    const p = r.placements[i];
    const part = byId.get(p.id)!;
    const key = `${part.index} ${p.orientation}`;
    let turn = turns.get(key);
    if (!turn) {
      const rot = rotationForBox(part, p.orientation);
      turn = { code: codeFor(part, rot), at0: placementTransform(rot, part.min, part.max, [0, 0, 0]) };
      turns.set(key, turn);
    }
    const a = turn.at0;
    const transform: Transform12 = [a[0], a[1], a[2], a[3], a[4], a[5], a[6], a[7], a[8], a[9] + p.position[0], a[10] + p.position[1], a[11] + p.position[2]];
    const out: PlacementV2 = { id: p.id, position: [p.position[0], p.position[1], p.position[2]], size: [p.size[0], p.size[1], p.size[2]], orientation: turn.code };
    if (part.hasMesh) out.transform = transform;
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

/**
 * What each part's box is worth when the chamber is filled (`max-volume`): its mesh's share of the box, so the
 * placed volume the box engine weighs is the meshes' (the result's `utilization`), not the boxes'. A channel whose
 * box is three times its volume no longer wins over four solid cubes of more volume in all.
 */
export function meshVolumeWeights(parts: ReadonlyArray<Pick<ShapePart, 'size' | 'volume'>>): number[] {
  return parts.map((p) => {
    const box = p.size[0] * p.size[1] * p.size[2];
    return box > 0 && p.volume > 0 ? Math.min(1, p.volume / box) : 1;
  });
}

/** The box engine's part weights for an instance: the meshes' shares when it fills the chamber, none otherwise. */
export function fillWeights(instance: Pick<PackInstanceV2, 'objective'>, parts: ReadonlyArray<Pick<ShapePart, 'size' | 'volume'>>): number[] | undefined {
  return instance.objective === 'max-volume' ? meshVolumeWeights(parts) : undefined;
}

/** Packs a version 2 instance by boxes. */
export function createBoxFitPacking(instance: PackInstanceV2, options: PackOptions = {}) {
  const parts = shapeParts(instance);
  const weighed = options.partWeights ? options : { ...options, partWeights: fillWeights(instance, parts) };
  const inner = createPacking(boxInstance(instance, parts), weighed);
  const now = options.now ?? (() => performance.now());
  const run = (hooks: BoxFitHooks) => {
    let last: PackResult | null = null;
    let lastV2: PackResultV2 | null = null;
    // The engine hands the same layout on with only its time changed (at the end, and as the answer): it is turned
    // into version 2 once. Turning one over takes time that grows with the placements (185,556 cubes: 0.7 s), and
    // doing it twice more after the engine's time limit took the run 1.4 s past it.
    let toV2Ms = 0;
    const toV2 = (r: PackResult): PackResultV2 => {
      if (last && lastV2 && r.placements === last.placements) lastV2 = { ...lastV2, elapsedMs: r.elapsedMs };
      else {
        const t = now();
        lastV2 = fromBoxResult(instance, parts, r);
        toV2Ms = Math.max(toV2Ms, now() - t);
      }
      last = r;
      return lastV2;
    };
    // So that the last layout found is also turned over within the time limit, the search ends that much earlier (as
    // long as it took to turn one over); a run capped by its completions (tests) is not timed. Timed, the first
    // layout is turned over even when no one asks for progress (the command line), so that the time is known: its
    // area profile is sliced from the meshes, and without it the run went past its limit by what turning the last
    // layout over took (248 parts of 1,000 to 49,000 triangles: 0.34 s past 2 s, 0.47 s past 10 s). A searched
    // layout's parts stand at more different heights than the first one's, and each height of a part is sliced
    // anew: turning it over took up to 1.5 times as long (0.44 s against 0.30 s), so that much is kept for it.
    const deadline = now() + instance.timeLimitMs;
    const timed = options.maxCompletions === undefined;
    return {
      hooks: {
        shouldStop: () => !!hooks.shouldStop?.() || (timed && toV2Ms > 0 && now() > deadline - 1.5 * toV2Ms),
        onProgress: (phase: PackPhase, share: number, best: PackResult | null) => {
          const fresh = best !== null && best !== last;
          if (fresh && (hooks.onProgress || (timed && lastV2 === null))) toV2(best);
          hooks.onProgress?.(phase, share, lastV2);
        },
      },
      toV2,
    };
  };
  return {
    parts,
    runSync: (hooks: BoxFitHooks = {}) => {
      const r = run(hooks);
      return r.toV2(inner.runSync(r.hooks));
    },
    run: async (hooks: BoxFitHooks = {}) => {
      const r = run(hooks);
      return r.toV2(await inner.run(r.hooks));
    },
  };
}
