/**
 * The packing worker's API as seen through comlink. Layouts cross the thread
 * boundary as typed arrays (EncodedLayout) sent as transferables.
 */
import type { EncodedLayout, FieldProblem, PackPhase, PackWarning } from '../shared/packing';
import type { ShapeFiles } from './shapeInstance';

export type { EncodedLayout, FieldProblem, PackPhase, PackWarning, ShapeFiles };

export interface PackerProgress {
  phase: PackPhase;
  /** 0 to 1: share of the time budget spent. */
  shareDone: number;
  /** Present only when the best layout changed since the previous message. */
  best?: EncodedLayout;
}

/** Passed wrapped in Comlink.proxy so the worker can call back. */
export type PackerProgressCallback = (progress: PackerProgress) => void;

export type PackerOutcome =
  /** `warnings`: what the engine said of the final layout (a mesh packed by its box, a run packed by boxes for want of time). */
  | { ok: true; runId: number; cancelled: boolean; layout: EncodedLayout; warnings?: PackWarning[] }
  | { ok: false; runId: number; problems: FieldProblem[] };

export interface PackerStartOptions {
  /** Minimum time between two progress messages (ms); 100 when absent. */
  progressEveryMs?: number;
  /** Pack by the parts' shapes: every part's stored file and allowed rotations; by boxes when absent. */
  shapes?: ShapeFiles;
}

/** A layout packed by shape and changed by hand, to be checked against the parts' meshes (and, first, some of it dropped). */
export interface ShapeEditRequest {
  /** The layout's "pack-instance/1", as the editor holds it. */
  instance: unknown;
  layout: EncodedLayout;
  shapes: ShapeFiles;
  /** Placements (by index) to lower as far as their shapes allow before the check: a drop by hand. */
  drop?: number[];
  /**
   * Check only the pairs that hold one of these placements (by index; ignored with `drop`): parts being moved over
   * a layout that passed, quick enough to follow a drag.
   */
  only?: number[];
}

export type ShapeEditOutcome =
  | {
      ok: true;
      /** The placements at fault, by index in the layout checked (after the drop, when there was one). */
      faults: number[];
      /** What the check found, in the layout's own field names. */
      problems: FieldProblem[];
      /** After a drop: the placements, listed again in lift-out order (its totals are the editor's to work out), and each old index's new one. */
      dropped?: { layout: EncodedLayout; indexOf: number[] };
    }
  | { ok: false; problems: FieldProblem[] };

export interface PackerApi {
  /**
   * Checks `instance` (a "pack-instance/1" object) and packs it, by boxes or
   * (with `options.shapes`) by the parts' meshes. Resolves when done or
   * cancelled, with the best layout; bad input resolves with the problems.
   */
  start(runId: number, instance: unknown, onProgress: PackerProgressCallback, options?: PackerStartOptions): Promise<PackerOutcome>;
  /** Ends the run soon with its best layout so far; unknown ids are ignored. */
  cancel(runId: number): void;
  /** Checks a layout packed by shape and changed by hand against the meshes (dropping the chosen parts first); bad input comes back as problems. */
  checkByShape(request: ShapeEditRequest): Promise<ShapeEditOutcome>;
}
