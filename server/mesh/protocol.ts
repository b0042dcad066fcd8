import type { MeasureOptions, MeasureResult, Problem } from '../../shared/geometry';
import type { ProfileLayoutJob, ProfileLayoutResult } from '../../shared/geometry/layoutSlices';
import type { FieldProblem } from '../../shared/packing/types';
import type { ShapeCheck } from '../../shared/packing/shape/check';
import type { BuildFileJob, SheetViewsJob, SheetViewsResult, StoredPartFile } from './planFiles';

/** A layout to slice; with `check`, a layout packed by shape to check against the same meshes too. */
export type LayoutSliceJob = ProfileLayoutJob & { check?: ShapeCheck };
/** The sections; `problems` (none: an empty list) when the job asked for the check. */
export type LayoutSliceResult = ProfileLayoutResult & { problems?: FieldProblem[] };

/** A part's picture for the library: one part of a stored file, turned as stored, drawn `sizePx` square. */
export interface ThumbnailJob extends StoredPartFile {
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
  /** A plan's build file (3MF) to write from its parts' files. */
  buildFile?: BuildFileJob;
  /** The build sheet's views to draw from the parts' files. */
  sheetViews?: SheetViewsJob;
}

export type MeasureReply =
  | { id: number; result: MeasureResult }
  | { id: number; profile: LayoutSliceResult }
  /** A PNG, or null when the file holds no such part. */
  | { id: number; png: Uint8Array | null }
  /** The 3MF package's bytes. */
  | { id: number; file: Uint8Array }
  | { id: number; views: SheetViewsResult }
  /** A part's stored file does not hold the mesh the plan needs. */
  | { id: number; unreadable: { part: string; filename: string } }
  | { id: number; error: string };

/** Problems the server adds to the file's own: measuring took too long or the worker died. */
export type ServerProblem = Problem | { code: 'measure-timeout' | 'measure-failed'; message: string };

export type FileMeasureResult = Exclude<MeasureResult, { ok: false }> | { ok: false; problems: ServerProblem[] };
