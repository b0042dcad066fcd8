import type { Transaction } from 'sequelize';
import { unlink } from 'node:fs/promises';
import type { Database } from '../db';
import { partsRepository, type PartHead } from '../db/repositories/parts';
import { AppError, conflict, notFound } from '../errors';
import type { PartsService } from './parts';
import type { PartRevisionsView, PartView } from '../../shared/schemas/parts';
import { INACTIVE_STATUSES } from './planCommon';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * A part's file revisions. A designer's new file becomes a new part row with
 * the next revision number, the same name, tags, orientation and material;
 * the old row is marked as replaced. Request lines that no active plan uses
 * yet move to the new revision (so new plans use it); lines and plans already
 * planned keep the old row and with it the file they were packed with.
 */
export function partRevisionsService(db: Database, deps: { parts: PartsService }) {
  const { sequelize } = db;
  const repo = partsRepository(db);

  async function head(labId: string, partId: string): Promise<PartHead> {
    if (!UUID.test(partId)) throw notFound('That part');
    const row = await repo.head(labId, partId);
    if (!row) throw notFound('That part');
    return row;
  }

  return {
    /** Each part id mapped to its newest revision (itself when it is the newest); unknown ids are left out. */
    async newest(partIds: string[], transaction?: Transaction): Promise<Map<string, string>> {
      return repo.newestRevisions(
        partIds.filter((id) => UUID.test(id)),
        transaction,
      );
    },

    async list(labId: string, partId: string): Promise<PartRevisionsView> {
      const part = await head(labId, partId);
      const root = part.firstRevisionId ?? part.id;
      const rows = await repo.revisions(labId, root, INACTIVE_STATUSES);
      const newest = rows.find((r) => r.supersededBy === null) ?? rows[0];
      return {
        partId: part.id,
        newestPartId: newest.id,
        revisions: rows.map((r) => ({
          partId: r.id,
          revision: r.revision,
          current: r.supersededBy === null,
          fileName: r.fileName,
          sizeMm: r.sizeMm,
          volumeMm3: r.volumeMm3,
          watertight: r.watertight,
          uploadedBy: r.uploadedBy ? { id: r.uploadedBy, name: r.uploaderName ?? '' } : null,
          uploadedAt: new Date(r.createdAt).toISOString(),
          plans: r.plans.sort((a, b) => a.name.localeCompare(b.name)),
        })),
      };
    },

    /** Stores `file` as the part's next revision; the temp file is removed whatever happens. */
    async upload(
      labId: string,
      partId: string,
      userId: string,
      file: { path: string; originalname: string; size: number } | undefined,
      unit: 'mm' | 'cm' | 'inch',
    ): Promise<PartView> {
      try {
        if (!file) throw new AppError(400, 'invalid_input', 'file: send the new file of the part in a field named "file"', 'file');
        const old = await head(labId, partId);
        if (old.supersededBy) {
          throw conflict('not_newest', `This is an older revision (${old.revision}) of "${old.name}"; add the new file to its newest revision.`, undefined, {
            newestPartId: old.supersededBy,
          });
        }
        const created = await sequelize.transaction(async (transaction) => {
          // The old row is locked first, so two new files for one part become revisions one after the other.
          const locked = await repo.lockHead(old.id, transaction);
          if (!locked) throw notFound('That part');
          if (locked.supersededBy) throw conflict('not_newest', `Someone added a newer file to "${locked.name}" a moment ago; reload the part.`);
          const imported = await deps.parts.importFile(
            { labId, userId, filename: file.originalname, source: { path: file.path, sizeBytes: file.size }, unit, split: false },
            transaction,
          );
          if (!imported.ok) throw new AppError(400, imported.rejected.code, imported.rejected.message, 'file');
          const [fresh] = imported.parts;
          await repo.makeNextRevision(fresh.id, locked.id, transaction);
          // Lines no active plan uses yet make the new revision; lines already planned keep the file they were packed with.
          await repo.moveUnplannedLines(locked.id, fresh.id, INACTIVE_STATUSES, transaction);
          return fresh.id;
        });
        return deps.parts.get(labId, created);
      } finally {
        if (file) await unlink(file.path).catch(() => {});
      }
    },
  };
}
export type PartRevisionsService = ReturnType<typeof partRevisionsService>;
