import type pg from 'pg';
import { Op, QueryTypes, col, fn, literal, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { MeshJobFileRow, MeshJobFileState, MeshJobRow } from '../models/jobs';
import type { JobState } from '../../../shared/schemas/jobs';
import type { RejectedFile } from '../../../shared/schemas/parts';
import type { JobOptions, LayoutTask, StoredSections } from '../../jobs/meshJobs';

/** A connection in a transaction, as pg speaks to it (the queue's own statements run on it). */
export type Sql = Pick<pg.ClientBase, 'query'>;

/** A job as a plain record: an upload's measuring options, or (a layout job) its plan. */
export type MeshJobRecord = {
  id: string;
  labId: string;
  userId: string | null;
  state: JobState;
  kind: 'measure' | 'layout';
  options: JobOptions;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
};

/** One file of a job (or a layout job's one row) as a plain record. */
export type MeshJobFileRecord = {
  id: string;
  jobId: string;
  labId: string;
  position: number;
  fileName: string;
  fileKey: string | null;
  turn: number;
  state: MeshJobFileState;
  attempts: number;
  partIds: string[];
  rejected: RejectedFile | null;
  /** A layout to slice (a `layout` job's one row) instead of a file. */
  task: LayoutTask | null;
  /** The sliced sections, once that row is done. */
  result: StoredSections | null;
};

const FINISHED: MeshJobFileState[] = ['done', 'rejected'];
const PENDING: MeshJobFileState[] = ['waiting', 'queued', 'running'];
/** The database's clock, for the time columns (typed as the Date it writes). */
const dbNow = () => fn('now') as unknown as Date;

const jobRecord = (r: MeshJobRow): MeshJobRecord => ({
  id: r.id,
  labId: r.labId,
  userId: r.userId,
  state: r.state,
  kind: r.kind,
  options: r.options as JobOptions,
  createdAt: r.createdAt,
  startedAt: r.startedAt ?? null,
  finishedAt: r.finishedAt ?? null,
});

const fileRecord = (r: MeshJobFileRow): MeshJobFileRecord => ({
  id: r.id,
  jobId: r.jobId,
  labId: r.labId,
  position: r.position,
  fileName: r.fileName,
  fileKey: r.fileKey ?? null,
  turn: r.turn,
  state: r.state,
  attempts: r.attempts,
  partIds: r.partIds ?? [],
  rejected: r.rejected ?? null,
  task: (r.task as LayoutTask | null) ?? null,
  result: (r.result as StoredSections | null) ?? null,
});

/** The job queue's rows (`mesh_jobs`, `mesh_job_files`), its locks and its hand-out to the queue. */
export function meshJobsRepository(db: Database) {
  const { sequelize } = db;
  const { MeshJob, MeshJobFile } = db.models;

  return {
    /**
     * Whether the migrations have made the queue's tables (a worker process does not migrate).
     * Raw SQL: a question to the catalog, which no model describes.
     */
    async tablesExist(): Promise<boolean> {
      const [{ ok }] = await sequelize.query<{ ok: boolean }>("SELECT to_regclass('mesh_job_files') IS NOT NULL AS ok", { type: QueryTypes.SELECT });
      return ok;
    },

    /** The connection a Sequelize transaction runs on (so the hand-out and pg-boss's send join that transaction). */
    connectionOf(transaction: Transaction): Sql {
      return (transaction as unknown as { connection: Sql }).connection;
    },

    /** Runs `work` in a transaction of its own on a connection of `pool` (the pool pg-boss sends through). */
    async inPoolTransaction<T>(pool: pg.Pool, work: (client: Sql) => Promise<T>): Promise<T> {
      const client = await pool.connect();
      try {
        await client.query('BEGIN');
        const out = await work(client);
        await client.query('COMMIT');
        return out;
      } catch (err) {
        await client.query('ROLLBACK').catch(() => {});
        throw err;
      } finally {
        client.release();
      }
    },

    /**
     * Locks the lab's hand-out (until the transaction ends) and locks its waiting files that fit under `limit`
     * (files queued or running count against it), lowest turn first.
     * Raw SQL: an advisory lock on a key, and a limit computed from a count, on a pg connection (not Sequelize's).
     */
    async lockWaiting(client: Sql, labId: string, limit: number): Promise<Array<{ id: string; turn: number }>> {
      await client.query("SELECT pg_advisory_xact_lock(hashtext('sinterstack:measuring-lab:' || $1))", [labId]);
      const { rows } = await client.query<{ id: string; turn: number }>(
        `SELECT id, turn FROM mesh_job_files WHERE lab_id = $1 AND state = 'waiting' ORDER BY turn, position
          LIMIT greatest(0, $2 - (SELECT count(*) FROM mesh_job_files WHERE lab_id = $1 AND state IN ('queued', 'running')))
          FOR UPDATE`,
        [labId, limit],
      );
      return rows;
    },

    /**
     * Marks the files queued and (when there were any) notifies `channel`, delivered when the transaction commits.
     * Raw SQL: it runs on the hand-out's pg connection, with pg_notify in the same statement.
     */
    async markQueued(client: Sql, fileIds: string[], channel: string, payload: string): Promise<void> {
      await client.query(
        "WITH handed AS (UPDATE mesh_job_files SET state = 'queued' WHERE id = ANY($1::uuid[]) RETURNING id) SELECT pg_notify($2, $3) FROM (SELECT 1 FROM handed LIMIT 1) h",
        [fileIds, channel, payload],
      );
    },

    /**
     * Locks the turn order (until the transaction ends) and gives the lab's next turn: its last pending turn plus
     * one, never below the lowest turn pending anywhere (or the last one given, when nothing is pending). One lock
     * for every lab: two uploads at once must not both take the same turn.
     * Raw SQL: an advisory lock on a key, and three aggregates read together under it.
     */
    async nextTurn(labId: string, transaction: Transaction): Promise<number> {
      await sequelize.query("SELECT pg_advisory_xact_lock(hashtext('sinterstack:measuring-turns'))", { transaction });
      const [t] = await sequelize.query<{ floor: number | null; last: number | null; lab: number | null }>(
        `SELECT (SELECT min(turn) FROM mesh_job_files WHERE state IN ('waiting', 'queued', 'running')) AS floor,
                (SELECT max(turn) FROM mesh_job_files) AS last,
                (SELECT max(turn) FROM mesh_job_files WHERE lab_id = $1 AND state IN ('waiting', 'queued', 'running')) AS lab`,
        { bind: [labId], type: QueryTypes.SELECT, transaction },
      );
      return Math.max(t.floor ?? t.last ?? 0, t.lab === null ? -Infinity : t.lab + 1);
    },

    /** The labs with files waiting to be handed out. */
    async labsWaiting(): Promise<string[]> {
      const rows = await MeshJobFile.findAll({ where: { state: 'waiting' }, attributes: ['labId'], group: ['labId'] });
      return rows.map((r) => r.labId);
    },

    async job(labId: string, jobId: string, transaction?: Transaction): Promise<MeshJobRecord | null> {
      const row = await MeshJob.findOne({ where: { id: jobId, labId }, transaction });
      return row ? jobRecord(row) : null;
    },

    async jobState(jobId: string): Promise<JobState | null> {
      const row = await MeshJob.findByPk(jobId, { attributes: ['state'] });
      return row?.state ?? null;
    },

    /** The job's files in upload order. */
    async files(jobId: string): Promise<MeshJobFileRecord[]> {
      const rows = await MeshJobFile.findAll({ where: { jobId }, order: [['position', 'ASC']] });
      return rows.map(fileRecord);
    },

    /** A layout job's one row. */
    async layoutRow(jobId: string): Promise<MeshJobFileRecord | null> {
      const row = await MeshJobFile.findOne({ where: { jobId } });
      return row ? fileRecord(row) : null;
    },

    /** A file with its job's options and uploader. */
    async fileWithJob(fileId: string): Promise<(MeshJobFileRecord & { options: JobOptions; userId: string | null }) | null> {
      const row = await MeshJobFile.findByPk(fileId, { include: [{ model: MeshJob, as: 'job', attributes: ['options', 'userId'], required: true }] });
      return row ? { ...fileRecord(row), options: row.job!.options as JobOptions, userId: row.job!.userId } : null;
    },

    /** The job a file belongs to (read without a lock). */
    async jobIdOf(fileId: string, transaction: Transaction): Promise<string | null> {
      const row = await MeshJobFile.findByPk(fileId, { attributes: ['jobId'], transaction });
      return row?.jobId ?? null;
    },

    /** Locks the job's row first, then the file's (the order every writer keeps); the file as locked. */
    async lockJobAndFile(jobId: string, fileId: string, transaction: Transaction): Promise<MeshJobFileRecord | null> {
      await MeshJob.findByPk(jobId, { attributes: ['id'], transaction, lock: transaction.LOCK.UPDATE });
      const row = await MeshJobFile.findByPk(fileId, { transaction, lock: transaction.LOCK.UPDATE });
      return row ? fileRecord(row) : null;
    },

    /** Marks the job finished once none of its files is left: done when a part was kept, failed otherwise. */
    async settleJob(jobId: string, transaction: Transaction): Promise<void> {
      const counts = await MeshJobFile.count({ where: { jobId }, attributes: ['state'], group: ['state'], transaction });
      const of = (states: string[]) => counts.filter((c) => states.includes(c.state as string)).reduce((n, c) => n + Number(c.count), 0);
      if (of(PENDING) > 0) return;
      await MeshJob.update(
        { state: of(['done']) > 0 ? 'done' : 'failed', finishedAt: dbNow(), startedAt: fn('COALESCE', col('started_at'), fn('now')) as unknown as Date },
        { where: { id: jobId, state: ['queued', 'running'] }, transaction },
      );
    },

    /** A worker takes the file (unless it is finished), and the job is under way. */
    async markRunning(fileId: string, jobId: string, worker: string, transaction: Transaction): Promise<void> {
      await MeshJobFile.update(
        { state: 'running', attempts: literal('attempts + 1') as unknown as number, worker, startedAt: dbNow() },
        { where: { id: fileId, state: { [Op.notIn]: FINISHED } }, transaction },
      );
      await MeshJob.update(
        { state: 'running', startedAt: fn('COALESCE', col('started_at'), fn('now')) as unknown as Date },
        { where: { id: jobId, state: 'queued' }, transaction },
      );
    },

    async markRejected(fileId: string, rejected: RejectedFile, transaction: Transaction): Promise<void> {
      await MeshJobFile.update({ state: 'rejected', rejected, finishedAt: dbNow() }, { where: { id: fileId }, transaction });
    },

    async markMeasured(fileId: string, partIds: string[], transaction: Transaction): Promise<void> {
      await MeshJobFile.update({ state: 'done', partIds, finishedAt: dbNow() }, { where: { id: fileId }, transaction });
    },

    async markSliced(fileId: string, sections: StoredSections, transaction: Transaction): Promise<void> {
      await MeshJobFile.update({ state: 'done', result: sections, finishedAt: dbNow() }, { where: { id: fileId }, transaction });
    },

    async createJob(
      job: { id: string; labId: string; userId: string | null; options: JobOptions | { planId: string }; kind?: 'layout' },
      transaction: Transaction,
    ): Promise<void> {
      // Created at the database's clock, like the times the queue writes later.
      await MeshJob.create({ ...job, createdAt: dbNow() }, { transaction });
    },

    /** A file waiting for its turn (with its bytes in the file store, or a layout to slice). */
    async addWaitingFile(
      file: { id: string; jobId: string; labId: string; position: number; fileName: string; turn: number; fileKey?: string; sizeBytes?: number; task?: LayoutTask },
      transaction: Transaction,
    ): Promise<void> {
      await MeshJobFile.create({ ...file, state: 'waiting' }, { transaction });
    },

    /** A file refused before any work: finished at once. */
    async addRejectedFile(
      file: { id: string; jobId: string; labId: string; position: number; fileName: string; turn: number; rejected: RejectedFile | null },
      transaction: Transaction,
    ): Promise<void> {
      await MeshJobFile.create({ ...file, state: 'rejected', finishedAt: dbNow() }, { transaction });
    },

    /** Deletes the jobs finished more than `hours` ago (their files go with them); how many. */
    async deleteFinishedJobs(hours: number): Promise<number> {
      return MeshJob.destroy({
        where: { state: ['done', 'failed'], finishedAt: { [Op.lt]: literal(`now() - make_interval(hours => ${sequelize.escape(hours)})`) } },
      });
    },

    /**
     * Deletes the queue's records of the named queues' work finished more than `hours` ago; how many.
     * Raw SQL: pg-boss's own tables, which no model describes.
     */
    async deleteQueueRecords(names: string[], hours: number): Promise<number> {
      const [records] = await sequelize.query<{ n: number }>(
        `WITH a AS (DELETE FROM pgboss.job WHERE name = ANY($2::text[]) AND state IN ('completed', 'failed', 'cancelled')
                      AND completed_on < now() - make_interval(hours => $1) RETURNING 1),
              b AS (DELETE FROM pgboss.archive WHERE name = ANY($2::text[]) AND archived_on < now() - make_interval(hours => $1) RETURNING 1)
         SELECT (SELECT count(*) FROM a)::int + (SELECT count(*) FROM b)::int AS n`,
        { bind: [hours, names], type: QueryTypes.SELECT },
      );
      return records.n;
    },
  };
}

export type MeshJobsRepository = ReturnType<typeof meshJobsRepository>;
