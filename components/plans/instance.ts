/**
 * From a plan (its machine, material and lines) to the packing engine's
 * instance, and from layouts to the typed arrays the chamber view draws.
 */
import {
  parseInstance,
  insideRegion,
  summariseLayout,
  toPlacementArrays,
  TOLERANCE_MM,
  usableRegion,
  validateLayout,
  type PackInstance,
  type PackInstanceInput,
  type PackResult,
  type Placement,
} from '../../shared/packing';
import type { PlanOrientationRule } from '../../shared/schemas/plans';
import type { ChamberPlacements } from '../viewer';

export {
  RULE_ORIENTATIONS,
  buildInstance,
  defaultLayerHeight,
  defaultOptions,
  type InstanceLine,
  type MachineLike,
  type MaterialLike,
  type PackingOptions,
} from '../../shared/plans/instance';

export const RULE_LABELS: Record<PlanOrientationRule, string> = { any: 'Any way', keep_up: 'Keep up', fixed: 'As stored' };

/**
 * The instance for packing new parts above what a kept layout already holds.
 * The engine can keep clear of fixed boxes, but the packing worker takes only
 * an instance, so the free space offered to it is the slab above the kept
 * parts: raising the floor keep-out to their top plus the spacing leaves
 * every kept part where it is.
 *
 *     z ^  +-----------------+ chamber top
 *       |  |  new parts go   |
 *       |  |  in this slab   |
 *       |  +- - - - - - - - -+ kept top + spacing (new bottom keep-out)
 *       |  | [kept] [kept]   |
 *       +--+-----------------+--> x
 */
export function instanceAbove(full: PackInstanceInput, kept: Placement[], parts: PackInstanceInput['parts'], objective: 'min-height' | 'max-volume'): PackInstanceInput {
  const top = kept.reduce((m, p) => Math.max(m, p.position[2] + p.size[2]), 0);
  const spacing = full.spacing ?? 0;
  const bottom = kept.length > 0 ? top + spacing : full.margin?.bottom ?? 0;
  return { ...full, objective, margin: { ...full.margin, bottom: Math.max(full.margin?.bottom ?? 0, bottom) }, parts: parts.filter((p) => p.quantity > 0) };
}

export type MergeOutcome = { ok: true; result: PackResult } | { ok: false; message: string };

/** Kept placements plus new ones, summarised and checked against the plan's full instance before it is sent. */
export function mergeLayouts(full: PackInstanceInput, kept: Placement[], added: Placement[], elapsedMs: number): MergeOutcome {
  const parsed = parseInstance(full);
  if (!parsed.ok) return { ok: false, message: parsed.problems.map((p) => `${p.field} ${p.message}`).join('; ') };
  const result = summariseLayout(parsed.instance, [...kept, ...added], elapsedMs);
  const problems = validateLayout(parsed.instance, result);
  if (problems.length > 0) return { ok: false, message: problems.slice(0, 3).map((p) => `${p.field} ${p.message}`).join('; ') };
  return { ok: true, result };
}

/**
 * Kept placements plus new ones packed in the slab above them (a re-pack or a
 * fill), when either holds parts placed by shape: such parts may share box
 * space (the shapes nest), so the boxes' check of the whole layout does not
 * apply. The kept ones were checked when they were kept and the new ones by
 * the packing that placed them; what joins them is checked here: every new
 * part lies in the slab (at least the spacing above the kept top), inside
 * the usable region, and no line gets more parts than it asks for. The
 * server checks the whole layout against the meshes again when it is kept.
 */
export function mergeAbove(full: PackInstanceInput, kept: Placement[], added: Placement[], elapsedMs: number, volumeOf?: (id: string) => number | undefined): MergeOutcome {
  const parsed = parseInstance(full);
  if (!parsed.ok) return { ok: false, message: parsed.problems.map((p) => `${p.field} ${p.message}`).join('; ') };
  const inst = parsed.instance;
  const floor = kept.length > 0 ? kept.reduce((m, p) => Math.max(m, p.position[2] + p.size[2]), 0) + inst.spacing : usableRegion(inst).min[2];
  const problems: string[] = [];
  added.forEach((p, i) => {
    if (p.position[2] < floor - TOLERANCE_MM) problems.push(`added[${i}] ("${p.id}") is ${(floor - p.position[2]).toFixed(2)} mm too low: new parts go at least the spacing above the kept ones`);
    else if (!insideRegion(inst, p)) problems.push(`added[${i}] ("${p.id}") is outside the usable region`);
  });
  const wanted = new Map(inst.parts.map((p) => [p.id, p.quantity] as const));
  const count = new Map<string, number>();
  for (const p of [...kept, ...added]) count.set(p.id, (count.get(p.id) ?? 0) + 1);
  for (const [id, n] of count) {
    if (!wanted.has(id)) problems.push(`"${id}" is not a line of the plan`);
    else if (n > wanted.get(id)!) problems.push(`"${id}" is placed ${n} times where its line asks for ${wanted.get(id)}`);
  }
  if (problems.length > 0) return { ok: false, message: problems.slice(0, 3).join('; ') };
  return { ok: true, result: withPartVolumes(summariseLayout(inst, [...kept, ...added], elapsedMs), volumeOf) };
}

/**
 * A layout by shape's density counts each part's own volume (its mesh's), as the server's check does; the
 * summary of a layout counts boxes. Parts whose volume is not known count as their boxes.
 */
export function withPartVolumes(result: PackResult, volumeOf?: (id: string) => number | undefined): PackResult {
  if (!volumeOf || result.utilization === 0) return result;
  let boxes = 0;
  let parts = 0;
  for (const p of result.placements) {
    const box = p.size[0] * p.size[1] * p.size[2];
    const own = volumeOf(p.id);
    boxes += box;
    // An inside-out mesh measures negative; its size is the same.
    parts += own !== undefined && Number.isFinite(own) && own !== 0 ? Math.abs(own) : box;
  }
  return { ...result, utilization: (result.utilization / boxes) * parts };
}

/** A layout's placements without those at the given indices, summarised again. */
export function withoutPlacements(instance: PackInstanceInput, result: PackResult, removed: ReadonlySet<number>): PackResult | null {
  const parsed = parseInstance(instance);
  if (!parsed.ok) return null;
  const kept = result.placements.filter((_, i) => !removed.has(i));
  return summariseLayout(parsed.instance as PackInstance, kept, result.elapsedMs);
}

/**
 * Placements as the chamber view's typed arrays (the packing codec's, shared/packing/codec.ts);
 * part and line index are the line's position in the plan.
 */
export function toChamberPlacements(result: Pick<PackResult, 'placements'>, lineIds: readonly string[]): ChamberPlacements {
  const { positions, sizes, partIndex, rotations } = toPlacementArrays(result.placements, lineIds);
  return { positions, sizes, partIndex, lineIndex: partIndex, rotations };
}

export const EMPTY_PLACEMENTS: ChamberPlacements = {
  positions: new Float32Array(0),
  sizes: new Float32Array(0),
  partIndex: new Uint32Array(0),
  lineIndex: new Uint32Array(0),
};
