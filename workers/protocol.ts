/**
 * The packing worker's API as seen through comlink. Layouts cross the thread
 * boundary as typed arrays (EncodedLayout) sent as transferables.
 */
import type { EncodedLayout, FieldProblem, PackPhase } from '../shared/packing';
import type { ShapeFiles } from './shapeInstance';

export type { EncodedLayout, FieldProblem, PackPhase, ShapeFiles };

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
  | { ok: true; runId: number; cancelled: boolean; layout: EncodedLayout }
  | { ok: false; runId: number; problems: FieldProblem[] };

export interface PackerStartOptions {
  /** Minimum time between two progress messages (ms); 100 when absent. */
  progressEveryMs?: number;
  /** Pack by the parts' shapes: every part's stored file and allowed rotations; by boxes when absent. */
  shapes?: ShapeFiles;
}

export interface PackerApi {
  /**
   * Checks `instance` (a "pack-instance/1" object) and packs it, by boxes or
   * (with `options.shapes`) by the parts' meshes. Resolves when done or
   * cancelled, with the best layout; bad input resolves with the problems.
   */
  start(runId: number, instance: unknown, onProgress: PackerProgressCallback, options?: PackerStartOptions): Promise<PackerOutcome>;
  /** Ends the run soon with its best layout so far; unknown ids are ignored. */
  cancel(runId: number): void;
}
