/**
 * A small pool of worker threads that measure mesh files. Jobs queue when all
 * workers are busy; a job that runs past its time limit (a crafted file can
 * make inflating or parsing slow) has its worker replaced and is answered with
 * a problem instead of hanging the upload.
 */
import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import path from 'node:path';
import { quoteName, type MeasureOptions } from '../../shared/geometry';
import type { ProfileLayoutJob, ProfileLayoutResult } from '../../shared/geometry/layoutSlices';
import type { FileMeasureResult, MeasureReply, MeasureRequest } from './protocol';

export interface MeshPoolOptions {
  /** Worker threads (default: half the cores, at least 1, at most 4). */
  size?: number;
  /** Time limit per file (default 120 s). */
  timeoutMs?: number;
}

interface Job {
  request: Omit<MeasureRequest, 'id'>;
  resolve: (result: FileMeasureResult) => void;
  reject: (error: Error) => void;
  /** Set for a layout profile job: its answer goes here instead. */
  resolveProfile?: (result: ProfileLayoutResult) => void;
}

interface Slot {
  worker: Worker;
  /** The worker has loaded its code (it says so once). */
  ready: boolean;
  job: (Job & { id: number; timer: NodeJS.Timeout }) | null;
}

// Under tsx or jest the sources are TypeScript; the worker then registers tsx's loader itself.
const WORKER_FILE = path.join(__dirname, __filename.endsWith('.ts') ? 'worker.ts' : 'worker.js');

function spawnWorker(): Worker {
  if (WORKER_FILE.endsWith('.ts')) {
    const bootstrap = `require('tsx/cjs/api').register(); require(${JSON.stringify(WORKER_FILE)});`;
    return new Worker(bootstrap, { eval: true });
  }
  return new Worker(WORKER_FILE);
}

export class MeshPool {
  private readonly slots: Slot[] = [];
  private readonly queue: Job[] = [];
  private readonly timeoutMs: number;
  private nextId = 1;
  private closed = false;
  /** Workers lost in a row before they loaded: a worker that cannot even start must not be respawned forever. */
  private failuresInARow = 0;
  private static readonly MAX_FAILURES_IN_A_ROW = 5;

  constructor(options: MeshPoolOptions = {}) {
    const size = options.size ?? Math.min(4, Math.max(1, Math.floor(availableParallelism() / 2)));
    this.timeoutMs = options.timeoutMs ?? 120_000;
    for (let i = 0; i < size; i++) this.slots.push(this.makeSlot());
  }

  /** Measures a file on disk (a path) or in memory (bytes). */
  measure(input: string | Uint8Array, options: MeasureOptions): Promise<FileMeasureResult> {
    if (this.closed) return Promise.reject(new Error('the mesh pool is closed'));
    const request = typeof input === 'string' ? { path: input, options } : { bytes: input, options };
    return new Promise((resolve, reject) => {
      this.queue.push({ request, resolve, reject });
      this.dispatch();
    });
  }

  /**
   * Slices a layout's parts from their files in a worker (the request thread
   * only reads the files). A worker that fails or runs out of time rejects.
   */
  profile(job: ProfileLayoutJob): Promise<ProfileLayoutResult> {
    if (this.closed) return Promise.reject(new Error('the mesh pool is closed'));
    return new Promise((resolve, reject) => {
      const request = { profile: job, options: { filename: 'layout profile' } };
      this.queue.push({
        request,
        resolve: (r) => reject(new Error(r.ok ? 'unexpected measure result' : r.problems[0].message)),
        resolveProfile: resolve,
        reject,
      });
      this.dispatch();
    });
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const job of this.queue.splice(0)) job.reject(new Error('the mesh pool is closed'));
    await Promise.all(
      this.slots.map(async (slot) => {
        if (slot.job) {
          clearTimeout(slot.job.timer);
          slot.job.reject(new Error('the mesh pool is closed'));
          slot.job = null;
        }
        await slot.worker.terminate();
      }),
    );
  }

  private makeSlot(): Slot {
    const slot: Slot = { worker: spawnWorker(), ready: false, job: null };
    this.attach(slot);
    return slot;
  }

  private attach(slot: Slot): void {
    const worker = slot.worker;
    worker.unref();
    worker.on('message', (reply: MeasureReply | { ready: true }) => {
      if ('ready' in reply) {
        slot.ready = true;
        this.failuresInARow = 0;
        return;
      }
      const job = slot.job;
      if (!job || job.id !== reply.id) return;
      clearTimeout(job.timer);
      slot.job = null;
      if ('error' in reply) job.reject(new Error(`measuring ${job.request.options.filename} failed: ${reply.error}`));
      else if ('profile' in reply) {
        if (job.resolveProfile) job.resolveProfile(reply.profile);
        else job.reject(new Error('a measuring job got a profile back'));
      } else job.resolve(reply.result);
      this.dispatch();
    });
    worker.on('error', (error) => this.replace(slot, { code: 'measure-failed', message: `${quoteName(slot.job?.request.options.filename ?? '')} could not be measured (${error.message}).` }));
    worker.on('exit', () => {
      if (!this.closed && slot.worker === worker) {
        this.replace(slot, { code: 'measure-failed', message: `${quoteName(slot.job?.request.options.filename ?? '')} could not be measured: the measuring process stopped.` });
      }
    });
  }

  /** Answers the slot's job with a problem and starts a fresh worker in its place. */
  private replace(slot: Slot, problem: { code: 'measure-timeout' | 'measure-failed'; message: string }): void {
    const job = slot.job;
    slot.job = null;
    if (job) {
      clearTimeout(job.timer);
      job.resolve({ ok: false, problems: [problem] });
    }
    const old = slot.worker;
    if (this.closed) return;
    // Only workers that died before loading count: a file that crashes a worker must not switch measuring off.
    if (!slot.ready) this.failuresInARow++;
    if (this.failuresInARow >= MeshPool.MAX_FAILURES_IN_A_ROW) {
      this.closed = true;
      const error = new Error('the mesh measuring workers keep failing to start; measuring is unavailable');
      for (const waiting of this.queue.splice(0)) waiting.reject(error);
      void Promise.all(this.slots.map((s) => s.worker.terminate()));
      return;
    }
    slot.worker = spawnWorker();
    slot.ready = false;
    this.attach(slot);
    void old.terminate();
    this.dispatch();
  }

  private dispatch(): void {
    for (const slot of this.slots) {
      if (slot.job || this.queue.length === 0) continue;
      const job = this.queue.shift()!;
      const id = this.nextId++;
      const timer = setTimeout(() => {
        this.replace(slot, {
          code: 'measure-timeout',
          message: `${quoteName(job.request.options.filename)} took longer than ${Math.round(this.timeoutMs / 1000)} s to measure and was stopped. The file may be damaged or far larger than it looks.`,
        });
      }, this.timeoutMs);
      timer.unref();
      slot.job = { ...job, id, timer };
      // A queued job keeps its worker referenced so the process waits for the answer.
      slot.worker.ref();
      slot.worker.postMessage({ id, ...job.request } satisfies MeasureRequest);
    }
    for (const slot of this.slots) if (!slot.job) slot.worker.unref();
  }
}

let shared: MeshPool | null = null;

/** The process-wide pool, created on first use. */
export function meshPool(options?: MeshPoolOptions): MeshPool {
  if (!shared) shared = new MeshPool(options);
  return shared;
}

export async function closeMeshPool(): Promise<void> {
  const pool = shared;
  shared = null;
  if (pool) await pool.close();
}

/**
 * Measures an uploaded file in a worker thread: a path (multer's temp file) or
 * the bytes. Resolves with the measured parts or the file's problems.
 */
export function measureFile(input: string | Uint8Array, options: MeasureOptions): Promise<FileMeasureResult> {
  return meshPool().measure(input, options);
}

/** Slices a layout's parts from their files in a worker thread of the process-wide pool. */
export function profileLayout(job: ProfileLayoutJob): Promise<ProfileLayoutResult> {
  return meshPool().profile(job);
}
