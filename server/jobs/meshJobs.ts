// Over 450 lines: the queue's one state machine (turns, hand-out, measuring, slicing, giving up) reads best in one place.
/**
 * Measuring uploads (and slicing kept layouts) on the job queue.
 *
 * An upload becomes a mesh job with one row a file. The web server stores
 * each file's bytes in the file store (holding one reference of the job's own,
 * so a worker on any machine can read them), then hands files to the queue
 * (pg-boss, in PostgreSQL) and waits a few seconds for them; whichever worker
 * process takes a file measures it in its thread pool and stores the parts.
 *
 * Fairness between labs (start-time fair queuing): every file gets a turn
 * number, the lab's last pending turn plus one, but never below the lowest
 * turn still pending anywhere; the queue hands out the lowest turn first
 * (pg-boss priority = -turn). So a lab that uploads fifty large files takes
 * turns 0..49, and another lab's one small file, arriving while the first is
 * measured, gets turn 0 or 1 and goes next, not after the fifty.
 *
 * Per-lab limit: a lab's files wait in `mesh_job_files` (state `waiting`) and
 * are handed to the queue only while fewer than `labConcurrency` of its files
 * are queued or being measured, so one lab never holds every worker thread.
 *
 * Nothing is lost when a worker dies: its queue job times out and is retried
 * by another worker; the parts of a file and the file's `done` mark are
 * written in one transaction under the file row's lock, so a retried file is
 * stored once.
 */
import { randomUUID } from 'node:crypto';
import { unlink } from 'node:fs/promises';
import type pg from 'pg';
import type PgBoss from 'pg-boss';
import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { meshJobsRepository, type MeshJobFileRecord, type Sql } from '../db/repositories/meshJobs';
import { AppError, badRequest, notFound } from '../errors';
import type { FileMeasureResult } from '../mesh';
import { sha256File, type FileStorage } from '../storage';
import type { LabEvent } from '../events/labEvents';
import { quoteName, type MeasureOptions } from '../../shared/geometry';
import type { JobView } from '../../shared/schemas/jobs';
import type { ProfileLayoutResult, ProfilePartFile } from '../../shared/geometry/layoutSlices';
import type { LayoutSliceJob, LayoutSliceResult } from '../mesh/protocol';
import type { PartUploadResponse, PartView, RejectedFile } from '../../shared/schemas/parts';

export type MeshQueueSettings = {
  /** The pg-boss queue; every server and worker of one installation uses the same name. */
  queue: string;
  /** Files of one lab measured (or handed to the queue) at once, across all workers. */
  labConcurrency: number;
  /** A file whose worker has said nothing for this long is given to another worker. */
  expireSeconds: number;
  /** Further attempts after a worker was lost (or failed) on a file. */
  retryLimit: number;
  /** Finished jobs, and the queue's records of them, are deleted this long after they finish. */
  retentionHours: number;
};

export const deadLetterQueue = (queue: string) => `${queue}-given-up`;

/** Told (with the queue's name) when files are handed out, so idle workers in other processes fetch at once instead of at their next poll. */
export const MESH_WORK_CHANNEL = 'sinterstack_mesh_work';

/** What the job queue needs of the part library. */
export type PartsForJobs = {
  /** The options a file of this lab is measured with, or why the file is refused before any work. */
  measureOptions(labId: string, filename: string, unit: 'mm' | 'cm' | 'inch', split: boolean): Promise<{ ok: true; file: string; options: MeasureOptions } | { ok: false; rejected: RejectedFile }>;
  /** Stores a measured file (already in the file store under `key`) and its parts in the caller's transaction; the part ids. */
  storeMeasured(
    input: { labId: string; userId: string | null; file: string; key: string; bytes: Uint8Array; unit: 'mm' | 'cm' | 'inch'; split: boolean },
    measured: Extract<FileMeasureResult, { ok: true }>,
    transaction: Transaction,
  ): Promise<string[]>;
  /** The parts with these ids, in this order (those deleted since are left out). */
  byIds(labId: string, ids: string[]): Promise<PartView[]>;
};

export type UploadedFile = { originalname: string; path: string; size: number };
export type UploadFields = { unit: 'mm' | 'cm' | 'inch'; split: boolean };
export type Measure = (input: Uint8Array, options: MeasureOptions) => Promise<FileMeasureResult>;
export type Slice = (job: LayoutSliceJob) => Promise<LayoutSliceResult>;
/** What a worker runs its turns with: the mesh pool's measuring and slicing. */
export type WorkerTools = { measure: Measure; slice: Slice };

/** A layout's sections to slice on the queue: its parts by stored file (read by the worker), placed as the layout places them. */
export type LayoutTask = Omit<LayoutSliceJob, 'parts'> & { planId: string; parts: (Omit<ProfilePartFile, 'bytes'> & { fileKey: string | null })[] };
/** A sliced layout as stored with its row (the arrays as plain numbers). */
export type StoredSections = { areaProfile: number[]; contourProfile: number[]; meshPlacements: number; boxPlacements: number; boxReasons: ProfileLayoutResult['boxReasons']; problems?: LayoutSliceResult['problems'] };
/** How a layout's slicing on the queue ended, or that it did not finish in the time given. */
export type SliceOutcome = { ok: true; result: LayoutSliceResult; jobId: string } | { ok: false; reason: string; jobId: string };

export type MeshJobsDeps = {
  db: Database;
  /** Connections for handing files to the queue in one transaction with their rows. */
  pool: pg.Pool;
  boss: PgBoss;
  storage: FileStorage;
  parts: PartsForJobs;
  settings: MeshQueueSettings;
  /** Tells the lab's screens (and a waiting upload) that a job or the library changed. */
  publish?: (e: Omit<LabEvent, 'at'>) => Promise<void>;
  /** Hears the lab's changes (to stop waiting as soon as a job finishes). */
  subscribe?: (labId: string, fn: (e: LabEvent) => void) => Promise<() => void>;
  log?: (msg: string) => void;
};

/** What an upload's files are measured with (a job's options). */
export type JobOptions = { unit: 'mm' | 'cm' | 'inch'; split: boolean; measure: Omit<MeasureOptions, 'filename'> };

type FileRow = MeshJobFileRecord;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const FINISHED = ['done', 'rejected'];

function allRejected(rejected: RejectedFile[]): AppError {
  const message =
    rejected.length === 1 ? rejected[0].message : `None of the ${rejected.length} files could be used. ${rejected.map((x) => x.message).join(' ')}`;
  return new AppError(400, 'invalid_file', message, 'file', { rejected });
}

const notSaved = (file: string): RejectedFile => ({
  file,
  code: 'not_saved',
  message: `${quoteName(file)} was measured but could not be saved; nothing of it was kept. Try again shortly.`,
});

export function meshJobsService(deps: MeshJobsDeps) {
  const { db, pool, boss, storage, parts, settings } = deps;
  const { sequelize } = db;
  const repo = meshJobsRepository(db);
  const log = deps.log ?? (() => {});
  const publish = (e: Omit<LabEvent, 'at'>) => (deps.publish ? deps.publish(e).catch(() => {}) : Promise.resolve());
  /** Pollers of this process, woken at once when this process hands out work. */
  const localWorkers: string[] = [];

  /**
   * Hands the lab's waiting files to the queue while it has fewer than its
   * limit there, lowest turn first, on the caller's transaction (its
   * connection): their queue jobs and their new state commit together. The
   * number handed out.
   */
  async function handOut(client: Sql, labId: string): Promise<number> {
    const rows = await repo.lockWaiting(client, labId, settings.labConcurrency);
    if (rows.length === 0) return 0;
    const db: PgBoss.Db = { executeSql: (text, values) => client.query(text, values) };
    for (const row of rows) {
      await boss.send(settings.queue, { fileId: row.id }, {
        id: row.id,
        priority: -row.turn,
        retryLimit: settings.retryLimit,
        retryDelay: 1,
        expireInSeconds: settings.expireSeconds,
        deadLetter: deadLetterQueue(settings.queue),
        db,
      });
    }
    // The notice is delivered when the transaction commits.
    await repo.markQueued(client, rows.map((r) => r.id), MESH_WORK_CHANNEL, settings.queue);
    return rows.length;
  }

  /** Wakes this process's own idle pollers at once (other processes hear the database's notice). */
  function wakeLocal(sent: number) {
    if (sent > 0) for (const id of localWorkers) boss.notifyWorker(id);
  }

  /** Hands out the lab's waiting files in a transaction of its own. */
  async function dispatch(labId: string): Promise<number> {
    const sent = await repo.inPoolTransaction(pool, (client) => handOut(client, labId));
    wakeLocal(sent);
    return sent;
  }

  /** Every lab with files waiting: after a crash between an upload and its hand-over, nothing stays behind. */
  async function dispatchAll(): Promise<number> {
    let sent = 0;
    for (const labId of await repo.labsWaiting()) sent += await dispatch(labId);
    return sent;
  }

  async function jobRow(labId: string, jobId: string) {
    if (!UUID.test(jobId)) throw notFound('That job');
    const row = await repo.job(labId, jobId);
    if (!row) throw notFound('That job');
    return row;
  }

  /**
   * Records a file as refused (or not saved) and drops the job's reference to
   * its bytes; nothing when another worker finished it first.
   */
  async function rejectFile(fileId: string, rejected: (row: FileRow) => RejectedFile): Promise<FileRow | null> {
    return sequelize.transaction(async (transaction) => {
      const jobId = await repo.jobIdOf(fileId, transaction);
      if (!jobId) return null;
      const row = await repo.lockJobAndFile(jobId, fileId, transaction);
      if (!row || FINISHED.includes(row.state)) return null;
      await repo.markRejected(fileId, rejected(row), transaction);
      if (row.fileKey) await storage.delete(row.fileKey, { transaction });
      await repo.settleJob(row.jobId, transaction);
      return row;
    });
  }

  async function afterFile(row: FileRow, partsChanged: boolean) {
    // Told at once (a waiting upload answers on it), not waited for: the next files' hand-out does not wait on the notices.
    void publish({ labId: row.labId, topic: 'jobs', id: row.jobId });
    if (partsChanged) void publish({ labId: row.labId, topic: 'parts' });
    await dispatch(row.labId).catch((err: Error) => log(`mesh jobs: handing out the next files failed: ${err.message}`));
  }

  async function view(labId: string, jobId: string): Promise<JobView> {
    const job = await jobRow(labId, jobId);
    const files = await repo.files(jobId);
    const out: JobView = {
      job: {
        id: job.id,
        state: job.state,
        files: {
          total: files.length,
          finished: files.filter((f) => FINISHED.includes(f.state)).length,
          running: files.filter((f) => f.state === 'running').length,
        },
        createdAt: new Date(job.createdAt).toISOString(),
        startedAt: job.startedAt ? new Date(job.startedAt).toISOString() : null,
        finishedAt: job.finishedAt ? new Date(job.finishedAt).toISOString() : null,
      },
    };
    if (job.state === 'done' || job.state === 'failed') {
      out.parts = await parts.byIds(labId, files.flatMap((f) => f.partIds));
      out.rejected = files.filter((f) => f.state === 'rejected' && f.rejected).map((f) => f.rejected!);
      if (job.state === 'failed') {
        const e = failure(out.rejected);
        out.error = { code: e.code, message: e.message };
      }
    }
    return out;
  }

  /** Why a job kept nothing: the server's fault when a file could not be saved, else the files'. */
  function failure(rejected: RejectedFile[]): AppError {
    const unsaved = rejected.find((r) => r.code === 'not_saved');
    if (unsaved) return new AppError(500, 'not_saved', unsaved.message, 'file', { rejected });
    return allRejected(rejected);
  }

  /** Waits up to `ms` for the job to finish (woken by the lab's events, checked twice a second besides). */
  async function waitFor(labId: string, jobId: string, ms: number): Promise<JobView> {
    const deadline = Date.now() + ms;
    let wake: () => void = () => {};
    const unsubscribe = deps.subscribe
      ? await deps.subscribe(labId, (e) => {
          if (e.topic === 'jobs' && e.id === jobId) wake();
        }).catch(() => null)
      : null;
    try {
      for (;;) {
        const state = await repo.jobState(jobId);
        const left = deadline - Date.now();
        if (state === 'done' || state === 'failed' || left <= 0) break;
        await new Promise<void>((resolve) => {
          const timer = setTimeout(resolve, Math.min(500, left));
          wake = () => {
            clearTimeout(timer);
            resolve();
          };
        });
      }
    } finally {
      unsubscribe?.();
    }
    return view(labId, jobId);
  }

  /** A worker's turn on a layout: read its parts' files, slice them, and store the sections with the row. */
  async function sliceLayout(row: FileRow, task: LayoutTask, slice: Slice): Promise<void> {
    let sections: StoredSections;
    try {
      const bytesOf = new Map<string, Uint8Array | null>();
      const parts: ProfilePartFile[] = [];
      for (const { fileKey, ...part } of task.parts) {
        if (fileKey && !bytesOf.has(fileKey)) {
          const b = await storage.get(fileKey);
          bytesOf.set(fileKey, b ? new Uint8Array(b.buffer, b.byteOffset, b.byteLength) : null);
        }
        // A file gone from the store counts as its box, as a part without a closed mesh does.
        parts.push({ ...part, bytes: fileKey ? bytesOf.get(fileKey) ?? null : null });
      }
      const { planId: _plan, parts: _parts, ...placed } = task;
      const out = await slice({ ...placed, parts });
      sections = { ...out, areaProfile: Array.from(out.areaProfile), contourProfile: Array.from(out.contourProfile) };
    } catch (err) {
      const why = err instanceof Error ? err.message : String(err);
      const done = await rejectFile(row.id, (r) => ({ file: r.fileName, code: 'measure-failed', message: `${quoteName(r.fileName)} could not be sliced: ${why}` }));
      if (done) await afterFile(done, false);
      return;
    }
    const stored = await sequelize.transaction(async (transaction) => {
      const locked = await repo.lockJobAndFile(row.jobId, row.id, transaction);
      if (!locked || FINISHED.includes(locked.state)) return null;
      await repo.markSliced(row.id, sections, transaction);
      await repo.settleJob(row.jobId, transaction);
      return locked;
    });
    if (stored) await afterFile(stored, false);
  }

  /**
   * Deletes the jobs finished longer ago than the retention (their file rows
   * go with them; a finished job holds no file any more), and the queue's
   * own records of this queue's finished work as old. Jobs still waiting or
   * being measured are kept, however old.
   */
  async function prune(): Promise<{ jobs: number; queueRecords: number }> {
    const hours = settings.retentionHours;
    const jobs = await repo.deleteFinishedJobs(hours);
    const queueRecords = await repo.deleteQueueRecords([settings.queue, deadLetterQueue(settings.queue)], hours);
    return { jobs, queueRecords };
  }
  // Once a maintenance round of the queue (one process of the installation at a time).
  boss.on('maintenance', () => {
    prune().catch((err: Error) => log(`mesh jobs: pruning finished jobs failed: ${err.message}`));
  });

  return {
    dispatch,
    dispatchAll,
    prune,

    /**
     * Slices a layout on the queue, in the lab's turn like an upload's files,
     * waiting up to `waitMs` for a worker to finish it. A slicing not finished
     * by then is called off (a worker that takes it later leaves it).
     */
    async sliceLayout(labId: string, userId: string | null, task: LayoutTask, waitMs: number): Promise<SliceOutcome> {
      const jobId = randomUUID();
      let sent = 0;
      await sequelize.transaction(async (transaction) => {
        const turn = await repo.nextTurn(labId, transaction);
        await repo.createJob({ id: jobId, labId, userId, options: { planId: task.planId }, kind: 'layout' }, transaction);
        await repo.addWaitingFile({ id: randomUUID(), jobId, labId, position: 0, fileName: 'layout sections', turn, task }, transaction);
        sent = await handOut(repo.connectionOf(transaction), labId);
      });
      wakeLocal(sent);
      const v = await waitFor(labId, jobId, waitMs);
      const row = await repo.layoutRow(jobId);
      if (v.job.state === 'done' && row?.result) {
        const r = row.result;
        return { ok: true, jobId, result: { ...r, areaProfile: Float64Array.from(r.areaProfile), contourProfile: Float64Array.from(r.contourProfile) } };
      }
      if (v.job.state === 'failed') return { ok: false, jobId, reason: row?.rejected?.message ?? 'the slicing failed' };
      const reason = `no worker finished slicing it within ${Math.round(waitMs / 100) / 10} s`;
      const called = row ? await rejectFile(row.id, (r) => ({ file: r.fileName, code: 'not_needed', message: `${quoteName(r.fileName)} was not sliced: ${reason}; the layout was estimated by its boxes.` })) : null;
      if (called) await afterFile(called, false);
      else {
        // Finished between the wait and the calling off: use it.
        const late = await repo.layoutRow(jobId);
        if (late?.result) {
          const r = late.result;
          return { ok: true, jobId, result: { ...r, areaProfile: Float64Array.from(r.areaProfile), contourProfile: Float64Array.from(r.contourProfile) } };
        }
      }
      return { ok: false, jobId, reason };
    },
    view,
    waitFor,

    /** Pollers of this process to wake when this process hands out files. */
    addLocalWorkers(ids: string[]) {
      localWorkers.push(...ids);
    },

    /**
     * Takes an upload's temp files: refuses what can be refused before any
     * work (no files, a format that is not a mesh), stores the bytes, records
     * the job and hands its first files to the queue. The temp files are
     * removed before this returns.
     */
    async submit(labId: string, userId: string, files: UploadedFile[], fields: UploadFields): Promise<{ jobId: string }> {
      try {
        if (files.length === 0) throw badRequest('Choose at least one file to upload (fields named "file").', 'file');
        const checked = await Promise.all(files.map((f) => parts.measureOptions(labId, f.originalname, fields.unit, fields.split)));
        const accepted = checked.filter((c) => c.ok);
        if (accepted.length === 0) throw allRejected(checked.map((c) => (c.ok ? null! : c.rejected)));
        // The caps and the lab's chamber are the same for every file; only the name differs.
        const { filename: _ignored, ...measure } = accepted[0].options;
        const options: JobOptions = { unit: fields.unit, split: fields.split, measure };
        const keys = await Promise.all(files.map((f, i) => (checked[i].ok ? sha256File(f.path) : null)));
        const jobId = randomUUID();
        const created: string[] = [];
        let sent = 0;
        try {
          await sequelize.transaction(async (transaction) => {
            // The bytes first, before the turn order is locked: storing a large batch must not hold up other labs' uploads.
            for (const [position, f] of files.entries()) {
              const key = keys[position];
              if (checked[position].ok && key && (await storage.put(key, { path: f.path, sizeBytes: f.size }, { transaction })).created) created.push(key);
            }
            const base = await repo.nextTurn(labId, transaction);
            await repo.createJob({ id: jobId, labId, userId, options }, transaction);
            let turn = base;
            for (const [position, f] of files.entries()) {
              const c = checked[position];
              const key = keys[position];
              if (!c.ok || !key) {
                await repo.addRejectedFile(
                  { id: randomUUID(), jobId, labId, position, fileName: c.ok ? c.file : c.rejected.file, turn: base, rejected: c.ok ? null : c.rejected },
                  transaction,
                );
                continue;
              }
              await repo.addWaitingFile({ id: randomUUID(), jobId, labId, position, fileName: c.file, fileKey: key, sizeBytes: f.size, turn: turn++ }, transaction);
            }
            // Handed to the queue in the same transaction: a worker may take the first files as soon as it commits.
            sent = await handOut(repo.connectionOf(transaction), labId);
          });
        } catch (err) {
          for (const key of created) await storage.discard(key);
          throw err;
        }
        wakeLocal(sent);
        void publish({ labId, topic: 'jobs', id: jobId });
        return { jobId };
      } finally {
        await Promise.all(files.map((f) => unlink(f.path).catch(() => {})));
      }
    },

    /**
     * An upload as the API answers it: when the job finishes within `waitMs`,
     * its parts and refused files (or the error when nothing was kept);
     * otherwise the job to follow.
     */
    async upload(labId: string, userId: string, files: UploadedFile[], fields: UploadFields, waitMs: number) {
      const { jobId } = await this.submit(labId, userId, files, fields);
      const v = await waitFor(labId, jobId, waitMs);
      if (v.job.state === 'done') return { status: 201 as const, body: { parts: v.parts ?? [], rejected: v.rejected ?? [] } satisfies PartUploadResponse };
      if (v.job.state === 'failed') throw failure(v.rejected ?? []);
      return { status: 202 as const, body: { job: { id: v.job.id, state: v.job.state } } };
    },

    /**
     * A worker's turn on one file: measure it, then store its parts and mark
     * it done in one transaction. A file already finished (by a worker that
     * was thought lost) is left as it is. Throws only on the server's own
     * failures (the database away), so the queue tries again.
     */
    async processFile(fileId: string, worker: string, tools: WorkerTools): Promise<void> {
      const row = await repo.fileWithJob(fileId);
      if (!row || FINISHED.includes(row.state) || (!row.fileKey && !row.task)) return;
      await sequelize.transaction((transaction) => repo.markRunning(fileId, row.jobId, worker, transaction));
      void publish({ labId: row.labId, topic: 'jobs', id: row.jobId });
      if (row.task) return sliceLayout(row, row.task, tools.slice);

      const bytes = await storage.get(row.fileKey!);
      if (!bytes) {
        const done = await rejectFile(fileId, (r) => ({ file: r.fileName, code: 'not_saved', message: `${quoteName(r.fileName)} was lost from the file store before it could be measured; upload it again.` }));
        if (done) await afterFile(done, false);
        return;
      }
      const view = new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
      const measured = await tools.measure(view, { ...row.options.measure, filename: row.fileName });
      if (!measured.ok) {
        const problems = measured.problems;
        const done = await rejectFile(fileId, (r) => ({ file: r.fileName, code: problems[0].code, message: problems.map((p) => p.message).join(' ') }));
        if (done) await afterFile(done, false);
        return;
      }
      let stored: FileRow | null = null;
      try {
        stored = await sequelize.transaction(async (transaction) => {
          // The job's row first, then the file's: the same order as every other writer.
          const locked = await repo.lockJobAndFile(row.jobId, fileId, transaction);
          if (!locked || FINISHED.includes(locked.state)) return null;
          const ids = await parts.storeMeasured(
            { labId: row.labId, userId: row.userId, file: row.fileName, key: row.fileKey!, bytes: view, unit: row.options.unit, split: row.options.split },
            measured,
            transaction,
          );
          await repo.markMeasured(fileId, ids, transaction);
          // The parts hold their own references now; the job's goes.
          await storage.delete(row.fileKey!, { transaction });
          await repo.settleJob(row.jobId, transaction);
          return locked;
        });
      } catch (err) {
        log(`mesh jobs: ${row.fileName} was measured but not saved: ${(err as Error)?.stack ?? String(err)}`);
        const done = await rejectFile(fileId, (r) => notSaved(r.fileName));
        if (done) await afterFile(done, false);
        return;
      }
      if (stored) await afterFile(stored, true);
    },

    /** The queue gave up on a file (its workers kept dying on it): it is refused, and the job goes on. */
    async giveUp(fileId: string): Promise<void> {
      const done = await rejectFile(fileId, (r) => ({
        file: r.fileName,
        code: 'measure-failed',
        message: `${quoteName(r.fileName)} could not be measured: the worker measuring it stopped ${r.attempts} time${r.attempts === 1 ? '' : 's'}. The file may be far larger than it looks.`,
      }));
      if (done) await afterFile(done, false);
    },
  };
}

export type MeshJobs = ReturnType<typeof meshJobsService>;
