import type { MeasureOptions, MeasureResult, Problem } from '../../shared/geometry';

/** What the server asks a measuring worker: a file on disk (an upload's temp file) or its bytes. */
export interface MeasureRequest {
  id: number;
  path?: string;
  bytes?: Uint8Array;
  options: MeasureOptions;
}

export type MeasureReply = { id: number; result: MeasureResult } | { id: number; error: string };

/** Problems the server adds to the file's own: measuring took too long or the worker died. */
export type ServerProblem = Problem | { code: 'measure-timeout' | 'measure-failed'; message: string };

export type FileMeasureResult = Exclude<MeasureResult, { ok: false }> | { ok: false; problems: ServerProblem[] };
