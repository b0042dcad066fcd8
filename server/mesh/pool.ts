/**
 * The worker threads that measure mesh files, slice layouts, write build
 * files and draw build sheets' views: piscina pools speaking the messages
 * of ./protocol.ts, in two lanes. Small files (up to `quickBytes`) and the
 * pictures of small parts go to one thread of their own at the process's
 * priority, so a lab's 12-triangle clip is never stuck behind another lab's
 * 20 MB housing; large files, layouts, build files and sheets go to the
 * bulk threads, which run at a lower CPU priority (`bulkNice`, a
 * per-thread nice value on Linux) so that big work gives way to the web
 * server and to the small files when the machine is busy. Tasks queue when
 * every thread of their lane is busy; a task that runs past its time limit (a crafted file can make
 * inflating or parsing slow) is aborted, which ends its thread (piscina starts
 * another), and is answered with a problem instead of hanging the caller. A
 * thread that dies is answered the same way.
 */
import { stat } from 'node:fs/promises';
import { availableParallelism } from 'node:os';
import path from 'node:path';
import { Piscina } from 'piscina';
import { quoteName, type MeasureOptions } from '../../shared/geometry';
import type { FileMeasureResult, LayoutSliceJob, LayoutSliceResult, MeasureReply, MeasureRequest, ServerProblem, ThumbnailJob } from './protocol';
import { UnreadablePartFile, type BuildFileJob, type SheetViewsJob, type SheetViewsResult } from './planFiles';

/** A plan's build file or sheet views that a worker could not finish: it ran out of time or its thread stopped. */
export class MeshWorkFailed extends Error {}

export interface MeshPoolOptions {
  /** Bulk worker threads (default: half the cores, at least 1, at most 4). */
  size?: number;
  /** Time limit per file (default 120 s). */
  timeoutMs?: number;
  /** Files (and pictures of files) up to this many bytes go to the quick thread; 0: no quick lane (default 1 MB). */
  quickBytes?: number;
  /** Nice value of the bulk threads, 0 (as the process) to 19 (yield to everything); default 10. */
  bulkNice?: number;
}

export const DEFAULT_QUICK_BYTES = 1024 * 1024;
export const DEFAULT_BULK_NICE = 10;

export const defaultMeshThreads = () => Math.min(4, Math.max(1, Math.floor(availableParallelism() / 2)));

// The sources are TypeScript (run by tsx or jest): the thread entry registers tsx's loader, then loads worker.ts.
const THREAD_FILE = path.join(__dirname, 'thread.cjs');

type Lane = Piscina<MeasureRequest, MeasureReply>;

export class MeshPool {
  private readonly bulk: Lane;
  private readonly quick: Lane | null;
  private readonly quickBytes: number;
  private readonly timeoutMs: number;
  private nextId = 1;
  private closed = false;

  constructor(options: MeshPoolOptions = {}) {
    const size = options.size ?? defaultMeshThreads();
    this.timeoutMs = options.timeoutMs ?? 120_000;
    this.quickBytes = options.quickBytes ?? DEFAULT_QUICK_BYTES;
    const nice = options.bulkNice ?? DEFAULT_BULK_NICE;
    this.bulk = new Piscina({ filename: THREAD_FILE, minThreads: size, maxThreads: size, idleTimeout: 60_000, workerData: { nice } });
    this.quick = this.quickBytes > 0 ? new Piscina({ filename: THREAD_FILE, minThreads: 1, maxThreads: 1, idleTimeout: 60_000, workerData: { nice: 0 } }) : null;
  }

  /** The bulk threads. */
  get size(): number {
    return this.bulk.maxThreads;
  }

  /** Files this pool measures at once: the bulk threads and the quick one. */
  get capacity(): number {
    return this.bulk.maxThreads + (this.quick ? 1 : 0);
  }

  /** Measures a file on disk (a path) or in memory (bytes). */
  async measure(input: string | Uint8Array, options: MeasureOptions): Promise<FileMeasureResult> {
    const request = typeof input === 'string' ? { path: input, options } : { bytes: input, options };
    const bytes = typeof input === 'string' ? await stat(input).then((s) => s.size, () => Infinity) : input.byteLength;
    const reply = await this.run(request, options.filename, this.laneFor(bytes));
    if ('problem' in reply) return { ok: false, problems: [reply.problem] };
    if ('error' in reply) throw new Error(`measuring ${options.filename} failed: ${reply.error}`);
    if (!('result' in reply)) throw new Error('a measuring job got a profile back');
    return reply.result;
  }

  /**
   * Slices a layout's parts from their files in a worker (the calling thread
   * only reads the files). A worker that fails or runs out of time rejects.
   */
  async profile(job: LayoutSliceJob): Promise<LayoutSliceResult> {
    const reply = await this.run({ profile: job, options: { filename: 'layout profile' } }, 'layout profile', this.bulk);
    if ('problem' in reply) throw new Error(reply.problem.message);
    if ('error' in reply) throw new Error(`slicing the layout failed: ${reply.error}`);
    if (!('profile' in reply)) throw new Error('a layout profile job got a measure result back');
    return reply.profile;
  }

  /** Draws a stored part's picture in a worker; null when the file holds no such part. */
  async thumbnail(job: ThumbnailJob): Promise<Uint8Array | null> {
    const reply = await this.run({ thumbnail: job, options: { filename: job.filename } }, job.filename, this.laneFor(job.bytes.byteLength));
    if ('problem' in reply) throw new Error(reply.problem.message);
    if ('error' in reply) throw new Error(`drawing ${job.filename} failed: ${reply.error}`);
    if (!('png' in reply)) throw new Error('a thumbnail job got another answer back');
    return reply.png;
  }

  /** Writes a plan's build file (3MF) from its parts' files in a bulk worker. */
  async buildFile(job: BuildFileJob): Promise<Uint8Array> {
    const reply = await this.planJob({ buildFile: job }, 'the build file');
    if (!('file' in reply)) throw new Error('a build file job got another answer back');
    return reply.file;
  }

  /** Draws the build sheet's views from the parts' files in a bulk worker. */
  async sheetViews(job: SheetViewsJob): Promise<SheetViewsResult> {
    const reply = await this.planJob({ sheetViews: job }, "the build sheet's views");
    if (!('views' in reply)) throw new Error('a sheet views job got another answer back');
    return reply.views;
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await Promise.all([this.bulk.destroy(), this.quick?.destroy()]);
  }

  /**
   * A plan's job on the bulk threads. A part's file that holds no mesh rejects with UnreadablePartFile, a job out
   * of time or whose thread stopped with MeshWorkFailed.
   */
  private async planJob(request: Pick<MeasureRequest, 'buildFile' | 'sheetViews'>, what: string): Promise<MeasureReply> {
    const reply = await this.run({ ...request, options: { filename: what } }, what, this.bulk);
    if ('problem' in reply) {
      throw new MeshWorkFailed(
        reply.problem.code === 'measure-timeout'
          ? `Making ${what} took longer than ${this.limitText()} and was stopped.`
          : `Making ${what} failed: its worker thread stopped.`,
      );
    }
    if ('unreadable' in reply) throw new UnreadablePartFile(reply.unreadable.part, reply.unreadable.filename);
    if ('error' in reply) throw new Error(`making ${what} failed: ${reply.error}`);
    return reply;
  }

  /** The time limit as a person reads it: seconds, or milliseconds under one. */
  private limitText(): string {
    return this.timeoutMs >= 1000 ? `${Math.round(this.timeoutMs / 1000)} s` : `${this.timeoutMs} ms`;
  }

  private laneFor(bytes: number): Lane {
    return this.quick && bytes <= this.quickBytes ? this.quick : this.bulk;
  }

  private async run(request: Omit<MeasureRequest, 'id'>, filename: string, lane: Lane): Promise<MeasureReply | { problem: ServerProblem }> {
    if (this.closed) throw new Error('the mesh pool is closed');
    const signal = AbortSignal.timeout(this.timeoutMs);
    try {
      return await lane.run({ id: this.nextId++, ...request }, { signal });
    } catch (error) {
      if (this.closed) throw new Error('the mesh pool is closed');
      if (signal.aborted) {
        return {
          problem: {
            code: 'measure-timeout',
            message: `${quoteName(filename)} took longer than ${this.limitText()} to measure and was stopped. The file may be damaged or far larger than it looks.`,
          },
        };
      }
      const why = error instanceof Error ? error.message : String(error);
      return { problem: { code: 'measure-failed', message: `${quoteName(filename)} could not be measured: the measuring thread stopped (${why}).` } };
    }
  }
}

let shared: MeshPool | null = null;
let sharedOptions: MeshPoolOptions | undefined;

/** Sets the size and time limit of the process-wide pool before its first use. */
export function configureMeshPool(options: MeshPoolOptions): void {
  sharedOptions = options;
}

/** The process-wide pool, created on first use. */
export function meshPool(options?: MeshPoolOptions): MeshPool {
  if (!shared) shared = new MeshPool(options ?? sharedOptions);
  return shared;
}

export async function closeMeshPool(): Promise<void> {
  const pool = shared;
  shared = null;
  if (pool) await pool.close();
}

/**
 * Measures an uploaded file in a worker thread: a path (a temp file) or the
 * bytes. Resolves with the measured parts or the file's problems.
 */
export function measureFile(input: string | Uint8Array, options: MeasureOptions): Promise<FileMeasureResult> {
  return meshPool().measure(input, options);
}

/** Slices a layout's parts from their files in a worker thread of the process-wide pool. */
export function profileLayout(job: LayoutSliceJob): Promise<LayoutSliceResult> {
  return meshPool().profile(job);
}

/** Writes a plan's build file (3MF) in a worker thread of the process-wide pool. */
export function writeBuildFile(job: BuildFileJob): Promise<Uint8Array> {
  return meshPool().buildFile(job);
}

/** Draws the build sheet's views in a worker thread of the process-wide pool. */
export function drawSheetViews(job: SheetViewsJob): Promise<SheetViewsResult> {
  return meshPool().sheetViews(job);
}

/** Draws a stored part's picture in a worker thread of the process-wide pool. */
export function partThumbnail(job: ThumbnailJob): Promise<Uint8Array | null> {
  return meshPool().thumbnail(job);
}
