import type { LengthUnit, MeasureOptions, MeasureResult, Problem } from '../../shared/geometry';
import type { ProfileLayoutJob, ProfileLayoutResult } from '../../shared/geometry/layoutSlices';
import type { FieldProblem } from '../../shared/packing/types';
import type { ShapeCheck } from '../../shared/packing/shape/check';

/** A layout to slice; with `check`, a layout packed by shape to check against the same meshes too. */
export type LayoutSliceJob = ProfileLayoutJob & { check?: ShapeCheck };
/** The sections; `problems` (none: an empty list) when the job asked for the check. */
export type LayoutSliceResult = ProfileLayoutResult & { problems?: FieldProblem[] };

/** A part's picture for the library: one part of a stored file, turned as stored, drawn `sizePx` square. */
export interface ThumbnailJob {
  bytes: Uint8Array;
  filename: string;
  unit: LengthUnit;
  split: boolean;
  partIndex: number;
  rotationDeg: readonly number[];
  sizePx: number;
}

/**
 * What the server asks a mesh worker: measure a file on disk (an upload's temp
 * file) or its bytes; or, with `profile`, slice a layout's parts from their
 * files (the options then only name the job in messages).
 */
export interface MeasureRequest {
  id: number;
  path?: string;
  bytes?: Uint8Array;
  options: MeasureOptions;
  profile?: LayoutSliceJob;
  thumbnail?: ThumbnailJob;
}

export type MeasureReply =
  | { id: number; result: MeasureResult }
  | { id: number; profile: LayoutSliceResult }
  /** A PNG, or null when the file holds no such part. */
  | { id: number; png: Uint8Array | null }
  | { id: number; error: string };

/** Problems the server adds to the file's own: measuring took too long or the worker died. */
export type ServerProblem = Problem | { code: 'measure-timeout' | 'measure-failed'; message: string };

export type FileMeasureResult = Exclude<MeasureResult, { ok: false }> | { ok: false; problems: ServerProblem[] };
