/**
 * From a plan (its machine, material and lines) to the packing engine's
 * instance, and from layouts to the typed arrays the chamber view draws.
 */
import {
  parseInstance,
  summariseLayout,
  toPlacementArrays,
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
