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
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { AppError, badRequest, notFound } from '../errors';
import type { FileMeasureResult } from '../mesh';
import { sha256File, type FileStorage } from '../storage';
import type { LabEvent } from '../events/labEvents';
import { quoteName, type MeasureOptions } from '../../shared/geometry';
import type { JobState, JobView } from '../../shared/schemas/jobs';
import type { ProfileLayoutJob, ProfileLayoutResult, ProfilePartFile } from '../../shared/geometry/layoutSlices';
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
export type Slice = (job: ProfileLayoutJob) => Promise<ProfileLayoutResult>;
/** What a worker runs its turns with: the mesh pool's measuring and slicing. */
export type WorkerTools = { measure: Measure; slice: Slice };

/** A layout's sections to slice on the queue: its parts by stored file (read by the worker), placed as the layout places them. */
export type LayoutTask = Omit<ProfileLayoutJob, 'parts'> & { planId: string; parts: (Omit<ProfilePartFile, 'bytes'> & { fileKey: string | null })[] };
/** A sliced layout as stored with its row (the arrays as plain numbers). */
type StoredSections = { areaProfile: number[]; contourProfile: number[]; meshPlacements: number; boxPlacements: number; boxReasons: ProfileLayoutResult['boxReasons'] };
/** How a layout's slicing on the queue ended, or that it did not finish in the time given. */
export type SliceOutcome = { ok: true; result: ProfileLayoutResult; jobId: string } | { ok: false; reason: string; jobId: string };

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

/** A connection in a transaction, as pg speaks to it. */
type Sql = Pick<pg.ClientBase, 'query'>;

type JobOptions = { unit: 'mm' | 'cm' | 'inch'; split: boolean; measure: Omit<MeasureOptions, 'filename'> };

type FileRow = {
  id: string;
  job_id: string;
  lab_id: string;
  position: number;
  file_name: string;
  file_key: string | null;
  state: 'waiting' | 'queued' | 'running' | 'done' | 'rejected';
  attempts: number;
  part_ids: string[];
  rejected: RejectedFile | null;
  /** A layout to slice (a `layout` job's one row) instead of a file. */
  task: LayoutTask | null;
};

type JobRow = {
  id: string;
  lab_id: string;
  user_id: string | null;
  state: JobState;
  options: JobOptions;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
};

/** The connection a transaction runs on (for the queue's own statements in the same transaction). */
const connectionOf = (transaction: Transaction): Sql => (transaction as unknown as { connection: Sql }).connection;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const FINISHED = ['done', 'rejected'];
// One lock for handing out turns: two uploads at once must not both take the lab's next turn.
const TURN_LOCK_SQL = "SELECT pg_advisory_xact_lock(hashtext('sinter-queue-turns'))";

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
  const log = deps.log ?? (() => {});
  const publish = (e: Omit<LabEvent, 'at'>) => (deps.publish ? deps.publish(e).catch(() => {}) : Promise.resolve());
  /** Pollers of this process, woken at once when this process hands out work. */
  const localWorkers: string[] = [];

  const query = <T extends object>(sql: string, bind: unknown[], transaction?: Transaction) =>
    sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });

  /**
   * Hands the lab's waiting files to the queue while it has fewer than its
   * limit there, lowest turn first, on the caller's transaction (its
   * connection): their queue jobs and their new state commit together. The
   * number handed out.
   */
  async function handOut(client: Sql, labId: string): Promise<number> {
    await client.query("SELECT pg_advisory_xact_lock(hashtext('sinter-queue-lab:' || $1))", [labId]);
    const { rows } = await client.query<{ id: string; turn: number }>(
      `SELECT id, turn FROM mesh_job_files WHERE lab_id = $1 AND state = 'waiting' ORDER BY turn, position
        LIMIT greatest(0, $2 - (SELECT count(*) FROM mesh_job_files WHERE lab_id = $1 AND state IN ('queued', 'running')))
        FOR UPDATE`,
      [labId, settings.labConcurrency],
    );
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
    await client.query(
      "WITH handed AS (UPDATE mesh_job_files SET state = 'queued' WHERE id = ANY($1::uuid[]) RETURNING id) SELECT pg_notify($2, $3) FROM (SELECT 1 FROM handed LIMIT 1) h",
      [rows.map((r) => r.id), MESH_WORK_CHANNEL, settings.queue],
    );
    return rows.length;
  }

  /** Wakes this process's own idle pollers at once (other processes hear the database's notice). */
  function wakeLocal(sent: number) {
    if (sent > 0) for (const id of localWorkers) boss.notifyWorker(id);
  }

  /** Hands out the lab's waiting files in a transaction of its own. */
  async function dispatch(labId: string): Promise<number> {
    const client = await pool.connect();
    let sent = 0;
    try {
      await client.query('BEGIN');
      sent = await handOut(client, labId);
      await client.query('COMMIT');
    } catch (err) {
      await client.query('ROLLBACK').catch(() => {});
      throw err;
    } finally {
      client.release();
    }
    wakeLocal(sent);
    return sent;
  }

  /**
   * Locks the turn order (until the caller's transaction ends) and gives the
   * lab's next turn: its last pending turn plus one, never below the lowest
   * turn pending anywhere (or the last one given, when nothing is pending).
   */
  async function firstTurn(labId: string, transaction: Transaction): Promise<number> {
    await sequelize.query(TURN_LOCK_SQL, { transaction });
    const [t] = await query<{ floor: number | null; last: number | null; lab: number | null }>(
      `SELECT (SELECT min(turn) FROM mesh_job_files WHERE state IN ('waiting', 'queued', 'running')) AS floor,
              (SELECT max(turn) FROM mesh_job_files) AS last,
              (SELECT max(turn) FROM mesh_job_files WHERE lab_id = $1 AND state IN ('waiting', 'queued', 'running')) AS lab`,
      [labId],
      transaction,
    );
    return Math.max(t.floor ?? t.last ?? 0, t.lab === null ? -Infinity : t.lab + 1);
  }

  /** Every lab with files waiting: after a crash between an upload and its hand-over, nothing stays behind. */
  async function dispatchAll(): Promise<number> {
    const labs = await query<{ lab_id: string }>("SELECT DISTINCT lab_id FROM mesh_job_files WHERE state = 'waiting'", []);
    let sent = 0;
    for (const { lab_id } of labs) sent += await dispatch(lab_id);
    return sent;
  }

  async function jobRow(labId: string, jobId: string, transaction?: Transaction): Promise<JobRow> {
    if (!UUID.test(jobId)) throw notFound('That job');
    const [row] = await query<JobRow>('SELECT * FROM mesh_jobs WHERE id = $1 AND lab_id = $2', [jobId, labId], transaction);
    if (!row) throw notFound('That job');
    return row;
  }

  /** Marks the job finished once none of its files is left: done when a part was kept, failed otherwise. */
  async function settleJob(jobId: string, transaction: Transaction): Promise<void> {
    const [c] = await query<{ open: number; done: number }>(
      `SELECT count(*) FILTER (WHERE state NOT IN ('done', 'rejected'))::int AS open,
              count(*) FILTER (WHERE state = 'done')::int AS done
         FROM mesh_job_files WHERE job_id = $1`,
      [jobId],
      transaction,
    );
    if (c.open > 0) return;
    await sequelize.query(
      `UPDATE mesh_jobs SET state = $2, finished_at = now(), started_at = COALESCE(started_at, now()) WHERE id = $1 AND state IN ('queued', 'running')`,
      { bind: [jobId, c.done > 0 ? 'done' : 'failed'], transaction },
    );
  }

  /**
   * Records a file as refused (or not saved) and drops the job's reference to
   * its bytes; nothing when another worker finished it first.
   */
  async function rejectFile(fileId: string, rejected: (row: FileRow) => RejectedFile): Promise<FileRow | null> {
    return sequelize.transaction(async (transaction) => {
      const [head] = await query<FileRow>('SELECT job_id FROM mesh_job_files WHERE id = $1', [fileId], transaction);
      if (!head) return null;
      await query('SELECT id FROM mesh_jobs WHERE id = $1 FOR UPDATE', [head.job_id], transaction);
      const [row] = await query<FileRow>('SELECT * FROM mesh_job_files WHERE id = $1 FOR UPDATE', [fileId], transaction);
      if (!row || FINISHED.includes(row.state)) return null;
      await sequelize.query(
        "UPDATE mesh_job_files SET state = 'rejected', rejected = $2::jsonb, finished_at = now() WHERE id = $1",
        { bind: [fileId, JSON.stringify(rejected(row))], transaction },
      );
      if (row.file_key) await storage.delete(row.file_key, { transaction });
      await settleJob(row.job_id, transaction);
      return row;
    });
  }

  async function afterFile(row: FileRow, partsChanged: boolean) {
    // Told at once (a waiting upload answers on it), not waited for: the next files' hand-out does not wait on the notices.
    void publish({ labId: row.lab_id, topic: 'jobs', id: row.job_id });
    if (partsChanged) void publish({ labId: row.lab_id, topic: 'parts' });
    await dispatch(row.lab_id).catch((err: Error) => log(`mesh jobs: handing out the next files failed: ${err.message}`));
  }

  async function view(labId: string, jobId: string): Promise<JobView> {
    const job = await jobRow(labId, jobId);
    const files = await query<FileRow>('SELECT * FROM mesh_job_files WHERE job_id = $1 ORDER BY position', [jobId]);
    const out: JobView = {
      job: {
        id: job.id,
        state: job.state,
        files: {
          total: files.length,
          finished: files.filter((f) => FINISHED.includes(f.state)).length,
          running: files.filter((f) => f.state === 'running').length,
        },
        createdAt: new Date(job.created_at).toISOString(),
        startedAt: job.started_at ? new Date(job.started_at).toISOString() : null,
        finishedAt: job.finished_at ? new Date(job.finished_at).toISOString() : null,
      },
    };
    if (job.state === 'done' || job.state === 'failed') {
      out.parts = await parts.byIds(labId, files.flatMap((f) => f.part_ids));
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

  async function stateOf(jobId: string): Promise<JobState | null> {
    const [row] = await query<{ state: JobState }>('SELECT state FROM mesh_jobs WHERE id = $1', [jobId]);
    return row?.state ?? null;
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
        const state = await stateOf(jobId);
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
      const done = await rejectFile(row.id, (r) => ({ file: r.file_name, code: 'measure-failed', message: `${quoteName(r.file_name)} could not be sliced: ${why}` }));
      if (done) await afterFile(done, false);
      return;
    }
    const stored = await sequelize.transaction(async (transaction) => {
      await query('SELECT id FROM mesh_jobs WHERE id = $1 FOR UPDATE', [row.job_id], transaction);
      const [locked] = await query<FileRow>('SELECT * FROM mesh_job_files WHERE id = $1 FOR UPDATE', [row.id], transaction);
      if (!locked || FINISHED.includes(locked.state)) return null;
      await sequelize.query("UPDATE mesh_job_files SET state = 'done', result = $2::jsonb, finished_at = now() WHERE id = $1", {
        bind: [row.id, JSON.stringify(sections)],
        transaction,
      });
      await settleJob(row.job_id, transaction);
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
    const [jobs] = await query<{ n: number }>(
      `WITH gone AS (DELETE FROM mesh_jobs WHERE state IN ('done', 'failed') AND finished_at < now() - make_interval(hours => $1) RETURNING 1)
       SELECT count(*)::int AS n FROM gone`,
      [hours],
    );
    const names = [settings.queue, deadLetterQueue(settings.queue)];
    const [records] = await query<{ n: number }>(
      `WITH a AS (DELETE FROM pgboss.job WHERE name = ANY($2::text[]) AND state IN ('completed', 'failed', 'cancelled')
                    AND completed_on < now() - make_interval(hours => $1) RETURNING 1),
            b AS (DELETE FROM pgboss.archive WHERE name = ANY($2::text[]) AND archived_on < now() - make_interval(hours => $1) RETURNING 1)
       SELECT (SELECT count(*) FROM a)::int + (SELECT count(*) FROM b)::int AS n`,
      [hours, names],
    );
    return { jobs: jobs.n, queueRecords: records.n };
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
        const turn = await firstTurn(labId, transaction);
        await sequelize.query("INSERT INTO mesh_jobs (id, lab_id, user_id, options, kind) VALUES ($1, $2, $3, $4::jsonb, 'layout')", {
          bind: [jobId, labId, userId, JSON.stringify({ planId: task.planId })],
          transaction,
        });
        await sequelize.query(
          `INSERT INTO mesh_job_files (id, job_id, lab_id, position, file_name, turn, state, task)
           VALUES ($1, $2, $3, 0, 'layout sections', $4, 'waiting', $5::jsonb)`,
          { bind: [randomUUID(), jobId, labId, turn, JSON.stringify(task)], transaction },
        );
        sent = await handOut(connectionOf(transaction), labId);
      });
      wakeLocal(sent);
      const v = await waitFor(labId, jobId, waitMs);
      const [row] = await query<FileRow & { result: StoredSections | null }>('SELECT * FROM mesh_job_files WHERE job_id = $1', [jobId]);
      if (v.job.state === 'done' && row?.result) {
        const r = row.result;
        return { ok: true, jobId, result: { ...r, areaProfile: Float64Array.from(r.areaProfile), contourProfile: Float64Array.from(r.contourProfile) } };
      }
      if (v.job.state === 'failed') return { ok: false, jobId, reason: row?.rejected?.message ?? 'the slicing failed' };
      const reason = `no worker finished slicing it within ${Math.round(waitMs / 100) / 10} s`;
      const called = row ? await rejectFile(row.id, (r) => ({ file: r.file_name, code: 'not_needed', message: `${quoteName(r.file_name)} was not sliced: ${reason}; the layout was estimated by its boxes.` })) : null;
      if (called) await afterFile(called, false);
      else {
        // Finished between the wait and the calling off: use it.
        const [late] = await query<{ result: StoredSections | null }>('SELECT result FROM mesh_job_files WHERE job_id = $1', [jobId]);
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
            const base = await firstTurn(labId, transaction);
            await sequelize.query('INSERT INTO mesh_jobs (id, lab_id, user_id, options) VALUES ($1, $2, $3, $4::jsonb)', {
              bind: [jobId, labId, userId, JSON.stringify(options)],
              transaction,
            });
            let turn = base;
            for (const [position, f] of files.entries()) {
              const c = checked[position];
              const key = keys[position];
              if (!c.ok || !key) {
                await sequelize.query(
                  `INSERT INTO mesh_job_files (id, job_id, lab_id, position, file_name, turn, state, rejected, finished_at)
                   VALUES ($1, $2, $3, $4, $5, $6, 'rejected', $7::jsonb, now())`,
                  { bind: [randomUUID(), jobId, labId, position, c.ok ? c.file : c.rejected.file, base, JSON.stringify(c.ok ? null : c.rejected)], transaction },
                );
                continue;
              }
              await sequelize.query(
                `INSERT INTO mesh_job_files (id, job_id, lab_id, position, file_name, file_key, size_bytes, turn, state)
                 VALUES ($1, $2, $3, $4, $5, $6, $7, $8, 'waiting')`,
                { bind: [randomUUID(), jobId, labId, position, c.file, key, f.size, turn++], transaction },
              );
            }
            // Handed to the queue in the same transaction: a worker may take the first files as soon as it commits.
            sent = await handOut(connectionOf(transaction), labId);
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
      const [row] = await query<FileRow & { options: JobOptions; user_id: string | null }>(
        `SELECT f.*, j.options, j.user_id FROM mesh_job_files f JOIN mesh_jobs j ON j.id = f.job_id WHERE f.id = $1`,
        [fileId],
      );
      if (!row || FINISHED.includes(row.state) || (!row.file_key && !row.task)) return;
      await sequelize.transaction(async (transaction) => {
        await sequelize.query(
          "UPDATE mesh_job_files SET state = 'running', attempts = attempts + 1, worker = $2, started_at = now() WHERE id = $1 AND state NOT IN ('done', 'rejected')",
          { bind: [fileId, worker], transaction },
        );
        await sequelize.query("UPDATE mesh_jobs SET state = 'running', started_at = COALESCE(started_at, now()) WHERE id = $1 AND state = 'queued'", {
          bind: [row.job_id],
          transaction,
        });
      });
      void publish({ labId: row.lab_id, topic: 'jobs', id: row.job_id });
      if (row.task) return sliceLayout(row, row.task, tools.slice);

      const bytes = await storage.get(row.file_key!);
      if (!bytes) {
        const done = await rejectFile(fileId, (r) => ({ file: r.file_name, code: 'not_saved', message: `${quoteName(r.file_name)} was lost from the file store before it could be measured; upload it again.` }));
        if (done) await afterFile(done, false);
        return;
      }
      const view = new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
      const measured = await tools.measure(view, { ...row.options.measure, filename: row.file_name });
      if (!measured.ok) {
        const problems = measured.problems;
        const done = await rejectFile(fileId, (r) => ({ file: r.file_name, code: problems[0].code, message: problems.map((p) => p.message).join(' ') }));
        if (done) await afterFile(done, false);
        return;
      }
      let stored: FileRow | null = null;
      try {
        stored = await sequelize.transaction(async (transaction) => {
          // The job's row first, then the file's: the same order as every other writer.
          await query('SELECT id FROM mesh_jobs WHERE id = $1 FOR UPDATE', [row.job_id], transaction);
          const [locked] = await query<FileRow>('SELECT * FROM mesh_job_files WHERE id = $1 FOR UPDATE', [fileId], transaction);
          if (!locked || FINISHED.includes(locked.state)) return null;
          const ids = await parts.storeMeasured(
            { labId: row.lab_id, userId: row.user_id, file: row.file_name, key: row.file_key!, bytes: view, unit: row.options.unit, split: row.options.split },
            measured,
            transaction,
          );
          await sequelize.query("UPDATE mesh_job_files SET state = 'done', part_ids = $2::uuid[], finished_at = now() WHERE id = $1", {
            bind: [fileId, ids],
            transaction,
          });
          // The parts hold their own references now; the job's goes.
          await storage.delete(row.file_key!, { transaction });
          await settleJob(row.job_id, transaction);
          return locked;
        });
      } catch (err) {
        log(`mesh jobs: ${row.file_name} was measured but not saved: ${(err as Error)?.stack ?? String(err)}`);
        const done = await rejectFile(fileId, (r) => notSaved(r.file_name));
        if (done) await afterFile(done, false);
        return;
      }
      if (stored) await afterFile(stored, true);
    },

    /** The queue gave up on a file (its workers kept dying on it): it is refused, and the job goes on. */
    async giveUp(fileId: string): Promise<void> {
      const done = await rejectFile(fileId, (r) => ({
        file: r.file_name,
        code: 'measure-failed',
        message: `${quoteName(r.file_name)} could not be measured: the worker measuring it stopped ${r.attempts} time${r.attempts === 1 ? '' : 's'}. The file may be far larger than it looks.`,
      }));
      if (done) await afterFile(done, false);
    },
  };
}

export type MeshJobs = ReturnType<typeof meshJobsService>;
