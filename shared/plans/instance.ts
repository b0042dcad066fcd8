/**
 * From a plan (its machine, material and lines) to the packing engine's
 * instance. The editor packs this instance, the server checks a layout
 * against it, and the demo lab's seeded plan is packed from it.
 */
import { INSTANCE_FORMAT, ORIENTATIONS, type Orientation, type PackInstanceInput, type Vec3 } from '../packing';
import { ROTATION_COUNT, UPRIGHT_ROTATIONS } from '../geometry/rotations';
import type { PlanOrientationRule } from '../schemas/plans';

/** The orientations each rule allows. */
export const RULE_ORIENTATIONS: Record<PlanOrientationRule, readonly Orientation[]> = {
  any: ORIENTATIONS,
  // A turn about the vertical axis keeps the part's own z up.
  keep_up: ['xyz', 'yxz'],
  fixed: ['xyz'],
};

/** The rule whose orientations an instance part allows (a plan's instance lists exactly one rule's). */
export function ruleOfOrientations(orientations: readonly string[] | undefined): PlanOrientationRule {
  const list = orientations ?? ORIENTATIONS;
  if (list.length >= ORIENTATIONS.length) return 'any';
  return list.includes('yxz') ? 'keep_up' : 'fixed';
}

/**
 * The quarter-turn rotations (indices of shared/geometry/rotations.ts) each
 * rule allows a part packed by its shape: any of the 24; the four turns about
 * the vertical axis; none (the part as stored).
 */
export const RULE_ROTATIONS: Record<PlanOrientationRule, readonly number[]> = {
  any: Array.from({ length: ROTATION_COUNT }, (_, k) => k),
  keep_up: UPRIGHT_ROTATIONS,
  fixed: [0],
};

export interface InstanceLine {
  requestLineId: string;
  quantity: number;
  orientation: PlanOrientationRule;
  sizeMm: Vec3;
}

export interface MachineLike {
  chamberMm: Vec3;
  layerHeightsMm: number[];
}

export interface MaterialLike {
  spacingMm: number;
  marginXyMm: number;
  marginBottomMm: number;
  marginTopMm: number;
  defaultLayerHeightMm: number;
}

export interface PackingOptions {
  seed: number;
  spacingMm: number;
  timeLimitMs: number;
  layerHeightMm: number;
}

/** The material's layer height when the machine prints it, else the machine's nearest. */
export function defaultLayerHeight(machine: MachineLike, material: MaterialLike): number {
  const heights = machine.layerHeightsMm;
  if (heights.length === 0) return material.defaultLayerHeightMm;
  return heights.reduce((best, h) => (Math.abs(h - material.defaultLayerHeightMm) < Math.abs(best - material.defaultLayerHeightMm) ? h : best), heights[0]);
}

export function defaultOptions(machine: MachineLike, material: MaterialLike): PackingOptions {
  return { seed: 1, spacingMm: material.spacingMm, timeLimitMs: 4000, layerHeightMm: defaultLayerHeight(machine, material) };
}

/** One engine part per plan line, id = the request line's id, as the server expects. */
export function buildInstance(lines: InstanceLine[], machine: MachineLike, material: MaterialLike, options: PackingOptions): PackInstanceInput {
  return {
    format: INSTANCE_FORMAT,
    chamber: [...machine.chamberMm] as Vec3,
    margin: { xy: material.marginXyMm, bottom: material.marginBottomMm, top: material.marginTopMm },
    // The material's spacing is a floor: a planner may ask for more, never less.
    spacing: Math.max(options.spacingMm, material.spacingMm),
    layerHeight: options.layerHeightMm,
    objective: 'min-height',
    timeLimitMs: options.timeLimitMs,
    seed: options.seed,
    parts: lines
      .filter((l) => l.quantity > 0)
      .map((l) => ({ id: l.requestLineId, size: [...l.sizeMm] as Vec3, quantity: l.quantity, orientations: [...RULE_ORIENTATIONS[l.orientation]] })),
  };
}
