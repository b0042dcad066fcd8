import { QueryTypes, type Transaction } from 'sequelize';
import { unlink } from 'node:fs/promises';
import type { Database } from '../db';
import { AppError, conflict, notFound } from '../errors';
import type { PartsService } from './parts';
import type { PartRevisionsView, PartView } from '../../shared/schemas/parts';
import { INACTIVE_SQL } from './planCommon';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

type Head = { id: string; name: string; revision: number; first_revision_id: string | null; superseded_by: string | null };

/**
 * A part's file revisions. A designer's new file becomes a new part row with
 * the next revision number, the same name, tags, orientation and material;
 * the old row is marked as replaced. Request lines that no active plan uses
 * yet move to the new revision (so new plans use it); lines and plans already
 * planned keep the old row and with it the file they were packed with.
 */
export function partRevisionsService(db: Database, deps: { parts: PartsService }) {
  const { sequelize } = db;

  async function head(labId: string, partId: string): Promise<Head> {
    if (!UUID.test(partId)) throw notFound('That part');
    const [row] = await sequelize.query<Head>(
      'SELECT id, name, revision, first_revision_id, superseded_by FROM parts WHERE id = $1 AND lab_id = $2',
      { bind: [partId, labId], type: QueryTypes.SELECT },
    );
    if (!row) throw notFound('That part');
    return row;
  }

  return {
    /** Each part id mapped to its newest revision (itself when it is the newest); unknown ids are left out. */
    async newest(partIds: string[], transaction?: Transaction): Promise<Map<string, string>> {
      const rows = await sequelize.query<{ id: string; newest: string }>(
        `WITH RECURSIVE chain(id, at) AS (
           SELECT id, id FROM parts WHERE id = ANY($1::uuid[])
           UNION ALL
           SELECT c.id, p.superseded_by FROM chain c JOIN parts p ON p.id = c.at WHERE p.superseded_by IS NOT NULL)
         SELECT c.id, c.at AS newest FROM chain c JOIN parts p ON p.id = c.at WHERE p.superseded_by IS NULL`,
        { bind: [partIds.filter((id) => UUID.test(id))], type: QueryTypes.SELECT, transaction },
      );
      return new Map(rows.map((r) => [r.id, r.newest]));
    },

    async list(labId: string, partId: string): Promise<PartRevisionsView> {
      const part = await head(labId, partId);
      const root = part.first_revision_id ?? part.id;
      const rows = await sequelize.query<{
        id: string;
        revision: number;
        superseded_by: string | null;
        file_name: string;
        size_x_mm: number;
        size_y_mm: number;
        size_z_mm: number;
        volume_mm3: number;
        watertight: boolean;
        uploaded_by: string | null;
        uploader: string | null;
        created_at: Date;
        plans: Array<{ id: string; name: string; status: string }> | null;
      }>(
        `SELECT p.id, p.revision, p.superseded_by, p.file_name, p.size_x_mm, p.size_y_mm, p.size_z_mm, p.volume_mm3, p.watertight,
                p.uploaded_by, u.name AS uploader, p.created_at,
                (SELECT jsonb_agg(DISTINCT jsonb_build_object('id', pl2.id, 'name', pl2.name, 'status', pl2.status))
                   FROM request_lines rl JOIN plan_lines pln ON pln.request_line_id = rl.id JOIN plans pl2 ON pl2.id = pln.plan_id
                  WHERE rl.part_id = p.id AND pl2.status NOT IN ${INACTIVE_SQL}) AS plans
           FROM parts p LEFT JOIN users u ON u.id = p.uploaded_by
          WHERE p.lab_id = $1 AND (p.id = $2 OR p.first_revision_id = $2)
          ORDER BY p.revision DESC`,
        { bind: [labId, root], type: QueryTypes.SELECT },
      );
      const newest = rows.find((r) => r.superseded_by === null) ?? rows[0];
      return {
        partId: part.id,
        newestPartId: newest.id,
        revisions: rows.map((r) => ({
          partId: r.id,
          revision: r.revision,
          current: r.superseded_by === null,
          fileName: r.file_name,
          sizeMm: [r.size_x_mm, r.size_y_mm, r.size_z_mm],
          volumeMm3: r.volume_mm3,
          watertight: r.watertight,
          uploadedBy: r.uploaded_by ? { id: r.uploaded_by, name: r.uploader ?? '' } : null,
          uploadedAt: new Date(r.created_at).toISOString(),
          plans: (r.plans ?? []).sort((a, b) => a.name.localeCompare(b.name)),
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
        if (old.superseded_by) {
          throw conflict('not_newest', `This is an older revision (${old.revision}) of "${old.name}"; add the new file to its newest revision.`, undefined, {
            newestPartId: old.superseded_by,
          });
        }
        const created = await sequelize.transaction(async (transaction) => {
          // The old row is locked first, so two new files for one part become revisions one after the other.
          const [locked] = await sequelize.query<Head>('SELECT id, name, revision, first_revision_id, superseded_by FROM parts WHERE id = $1 FOR UPDATE', {
            bind: [old.id],
            type: QueryTypes.SELECT,
            transaction,
          });
          if (locked.superseded_by) throw conflict('not_newest', `Someone added a newer file to "${locked.name}" a moment ago; reload the part.`);
          const imported = await deps.parts.importFile(
            { labId, userId, filename: file.originalname, source: { path: file.path, sizeBytes: file.size }, unit, split: false },
            transaction,
          );
          if (!imported.ok) throw new AppError(400, imported.rejected.code, imported.rejected.message, 'file');
          const [fresh] = imported.parts;
          await sequelize.query(
            `UPDATE parts n SET name = o.name, tags = o.tags, orientation = o.orientation, default_material_id = o.default_material_id,
                    revision = o.revision + 1, first_revision_id = COALESCE(o.first_revision_id, o.id), updated_at = now()
               FROM parts o WHERE n.id = $1 AND o.id = $2`,
            { bind: [fresh.id, locked.id], transaction },
          );
          await sequelize.query('UPDATE parts SET superseded_by = $1, updated_at = now() WHERE id = $2', { bind: [fresh.id, locked.id], transaction });
          // Lines no active plan uses yet make the new revision; lines already planned keep the file they were packed with.
          await sequelize.query(
            `UPDATE request_lines rl SET part_id = $1, updated_at = now()
              WHERE rl.part_id = $2
                AND NOT EXISTS (SELECT 1 FROM plan_lines pl JOIN plans p ON p.id = pl.plan_id
                                 WHERE pl.request_line_id = rl.id AND p.status NOT IN ${INACTIVE_SQL})`,
            { bind: [fresh.id, locked.id], transaction },
          );
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
