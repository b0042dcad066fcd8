import type { MeasureOptions, MeasureResult, Problem } from '../../shared/geometry';
import type { ProfileLayoutJob, ProfileLayoutResult } from '../../shared/geometry/layoutSlices';

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
  profile?: ProfileLayoutJob;
}

export type MeasureReply =
  | { id: number; result: MeasureResult }
  | { id: number; profile: ProfileLayoutResult }
  | { id: number; error: string };

/** Problems the server adds to the file's own: measuring took too long or the worker died. */
export type ServerProblem = Problem | { code: 'measure-timeout' | 'measure-failed'; message: string };

export type FileMeasureResult = Exclude<MeasureResult, { ok: false }> | { ok: false; problems: ServerProblem[] };
