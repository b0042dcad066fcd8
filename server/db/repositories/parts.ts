import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { MeshMetrics } from '../../../shared/geometry';
import type { PartListQuery, PartView } from '../../../shared/schemas/parts';
import type { PlanStatus } from '../../../shared/plans/status';

const FOREIGN_KEY = 'SequelizeForeignKeyConstraintError';

/** A part as the library lists it: its row, its material's and uploader's names, its file's size and how many builds use it. */
export type PartListRow = {
  id: string;
  lab_id: string;
  name: string;
  tags: string[];
  file_key: string;
  file_name: string;
  file_format: 'stl' | 'obj' | '3mf';
  file_unit: 'mm' | 'cm' | 'inch';
  file_split: boolean;
  file_part_index: number;
  uploaded_size_mm: number[];
  rotation_deg: number[];
  size_x_mm: number;
  size_y_mm: number;
  size_z_mm: number;
  volume_mm3: number;
  area_mm2: number;
  triangles: number;
  watertight: boolean;
  metrics: MeshMetrics;
  warnings: { code: string; message: string }[];
  orientation: PartView['orientation'];
  default_material_id: string | null;
  material_name: string | null;
  uploaded_by: string | null;
  uploader_name: string | null;
  file_size_bytes: string | number;
  times_used: string | number;
  created_at: Date;
  updated_at: Date;
};

/** A new part row, as measured from its file. */
export type NewPart = {
  labId: string;
  name: string;
  fileKey: string;
  fileName: string;
  fileFormat: string;
  fileUnit: string;
  fileSplit: boolean;
  filePartIndex: number;
  uploadedSizeMm: number[];
  sizeXMm: number;
  sizeYMm: number;
  sizeZMm: number;
  volumeMm3: number;
  areaMm2: number;
  triangles: number;
  watertight: boolean;
  metrics: MeshMetrics;
  warnings: unknown[];
  uploadedBy: string | null;
};

export type PartChanges = Partial<{
  name: string;
  tags: string[];
  orientation: string;
  defaultMaterialId: string | null;
  rotationDeg: number[];
  sizeXMm: number;
  sizeYMm: number;
  sizeZMm: number;
}>;

/** Where a part stands among its file revisions. */
export type PartHead = { id: string; name: string; revision: number; firstRevisionId: string | null; supersededBy: string | null };

export type PartRevision = {
  id: string;
  revision: number;
  supersededBy: string | null;
  fileName: string;
  sizeMm: [number, number, number];
  volumeMm3: number;
  watertight: boolean;
  uploadedBy: string | null;
  uploaderName: string | null;
  createdAt: Date;
  /** The plans (not cancelled or aborted) holding a line of this revision, each once. */
  plans: Array<{ id: string; name: string; status: string }>;
};

// The builds a part is in: plans holding one of its request lines, cancelled ones aside.
const TIMES_USED_SQL = `(SELECT count(DISTINCT pl.plan_id)
     FROM plan_lines pl
     JOIN request_lines rl ON rl.id = pl.request_line_id
     JOIN plans pn ON pn.id = pl.plan_id
    WHERE rl.part_id = p.id AND pn.status <> 'cancelled')`;

const SELECT_PARTS = `
  SELECT p.*, m.name AS material_name, u.name AS uploader_name, f.size_bytes AS file_size_bytes,
         ${TIMES_USED_SQL} AS times_used
    FROM parts p
    JOIN files f ON f.key = p.file_key
    LEFT JOIN materials m ON m.id = p.default_material_id
    LEFT JOIN users u ON u.id = p.uploaded_by`;

const SORT_SQL: Record<string, string> = {
  name: 'lower(p.name)',
  sizeX: 'p.size_x_mm',
  sizeY: 'p.size_y_mm',
  sizeZ: 'p.size_z_mm',
  volume: 'p.volume_mm3',
  area: 'p.area_mm2',
  triangles: 'p.triangles',
  material: 'lower(m.name)',
  timesUsed: 'times_used',
  uploadedBy: 'lower(u.name)',
  createdAt: 'p.created_at',
};

const likePattern = (s: string) => `%${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/**
 * The part library: parts, their file revisions and their kept pictures, as
 * plain records (never ORM instances). The library's list counts each part's
 * builds, sorts by that count and searches tags inside their array: typed
 * SQL, here; the rest goes through the models.
 */
export function partsRepository(db: Database) {
  const { sequelize } = db;
  const { Part, PartThumbnail, Machine, Material, PlanLine, Plan, RequestLine, User } = db.models;
  const select = <T extends object>(sql: string, bind: unknown[], transaction?: Transaction) => sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });

  return {
    /** The lab's parts with these ids, in file order. */
    async byIds(labId: string, ids: string[], transaction?: Transaction): Promise<PartListRow[]> {
      if (ids.length === 0) return [];
      return select<PartListRow>(`${SELECT_PARTS} WHERE p.lab_id = $1 AND p.id = ANY($2::uuid[]) ORDER BY p.file_part_index`, [labId, ids], transaction);
    },

    /** One page of the lab's newest revisions (search, material, warnings), sorted, and how many match in all. */
    async page(labId: string, q: PartListQuery): Promise<{ rows: PartListRow[]; total: number }> {
      const where = ['p.lab_id = $1', 'p.superseded_by IS NULL'];
      const bind: unknown[] = [labId];
      const param = (v: unknown) => {
        bind.push(v);
        return `$${bind.length}`;
      };
      if (q.search) {
        const s = param(likePattern(q.search));
        where.push(`(p.name ILIKE ${s} OR EXISTS (SELECT 1 FROM unnest(p.tags) AS tag WHERE tag ILIKE ${s}))`);
      }
      if (q.materialId === 'none') where.push('p.default_material_id IS NULL');
      else if (q.materialId) where.push(`p.default_material_id = ${param(q.materialId)}`);
      if (q.warnings === 'any') where.push('jsonb_array_length(p.warnings) > 0');
      else if (q.warnings === 'none') where.push('jsonb_array_length(p.warnings) = 0');
      else if (q.warnings) where.push(`p.warnings @> jsonb_build_array(jsonb_build_object('code', ${param(q.warnings)}::text))`);
      const desc = q.sort.startsWith('-');
      const key = desc ? q.sort.slice(1) : q.sort;
      const order = `${SORT_SQL[key]} ${desc ? 'DESC' : 'ASC'} NULLS LAST, p.created_at DESC, p.id`;
      const whereSql = where.join(' AND ');
      const [{ total }] = await select<{ total: string }>(`SELECT count(*) AS total FROM parts p WHERE ${whereSql}`, bind);
      const limit = param(q.pageSize);
      const offset = param((q.page - 1) * q.pageSize);
      const rows = await select<PartListRow>(`${SELECT_PARTS} WHERE ${whereSql} ORDER BY ${order} LIMIT ${limit} OFFSET ${offset}`, bind);
      return { rows, total: Number(total) };
    },

    /** The chambers (x, y, z mm) of the lab's machines whose profile gives one. */
    async chambersMm(labId: string, transaction?: Transaction): Promise<number[][]> {
      const machines = await Machine.findAll({ where: { labId }, attributes: ['profile'], transaction });
      return machines.flatMap((m) => {
        const c = (m.profile as { chamberMm?: unknown }).chamberMm;
        return Array.isArray(c) && c.length === 3 ? [c as number[]] : [];
      });
    },

    async create(part: NewPart, transaction: Transaction): Promise<string> {
      return (await Part.create({ ...part, tags: [], rotationDeg: [0, 0, 0], orientation: 'any', defaultMaterialId: null }, { transaction })).id;
    },

    /** The size the part had as uploaded (before any turn), or null when the lab has no such part. */
    async uploadedSizeMm(labId: string, partId: string): Promise<number[] | null> {
      const row = await Part.findOne({ where: { id: partId, labId }, attributes: ['uploadedSizeMm'] });
      return row ? row.uploadedSizeMm : null;
    },

    async isMaterialOf(labId: string, materialId: string): Promise<boolean> {
      return (await Material.count({ where: { id: materialId, labId } })) > 0;
    },

    async update(labId: string, partId: string, changes: PartChanges): Promise<void> {
      const row = await Part.findOne({ where: { id: partId, labId } });
      if (row) await row.update(changes);
    },

    /** Locks the part's row so nothing starts using it while it goes; its file's key, or null when there is no such part. */
    async lockForRemoval(labId: string, partId: string, transaction: Transaction): Promise<{ fileKey: string } | null> {
      const row = await Part.findOne({ where: { id: partId, labId }, attributes: ['id', 'fileKey'], transaction, lock: transaction.LOCK.UPDATE });
      return row ? { fileKey: row.fileKey } : null;
    },

    async remove(partId: string, transaction: Transaction): Promise<void> {
      await Part.destroy({ where: { id: partId }, transaction });
    },

    async head(labId: string, partId: string): Promise<PartHead | null> {
      const row = await Part.findOne({ where: { id: partId, labId }, attributes: ['id', 'name', 'revision', 'firstRevisionId', 'supersededBy'] });
      return row ? { id: row.id, name: row.name, revision: row.revision, firstRevisionId: row.firstRevisionId, supersededBy: row.supersededBy } : null;
    },

    /** Locks the part's row, so two new files for one part become revisions one after the other. */
    async lockHead(partId: string, transaction: Transaction): Promise<PartHead | null> {
      const row = await Part.findByPk(partId, { attributes: ['id', 'name', 'revision', 'firstRevisionId', 'supersededBy'], transaction, lock: transaction.LOCK.UPDATE });
      return row ? { id: row.id, name: row.name, revision: row.revision, firstRevisionId: row.firstRevisionId, supersededBy: row.supersededBy } : null;
    },

    /**
     * Each id mapped to the newest revision of its part (itself when newest); unknown ids are left out. The
     * chain of revisions is walked in one recursive query, which a model query cannot say.
     */
    async newestRevisions(partIds: string[], transaction?: Transaction): Promise<Map<string, string>> {
      const rows = await select<{ id: string; newest: string }>(
        `WITH RECURSIVE chain(id, at) AS (
           SELECT id, id FROM parts WHERE id = ANY($1::uuid[])
           UNION ALL
           SELECT c.id, p.superseded_by FROM chain c JOIN parts p ON p.id = c.at WHERE p.superseded_by IS NOT NULL)
         SELECT c.id, c.at AS newest FROM chain c JOIN parts p ON p.id = c.at WHERE p.superseded_by IS NULL`,
        [partIds],
        transaction,
      );
      return new Map(rows.map((r) => [r.id, r.newest]));
    },

    /** Every revision of the part whose first revision is `rootId`, newest first, with the plans (not `inactive`) using each. */
    async revisions(labId: string, rootId: string, inactive: readonly PlanStatus[]): Promise<PartRevision[]> {
      const rows = await Part.findAll({
        where: { labId, [Op.or]: [{ id: rootId }, { firstRevisionId: rootId }] },
        include: [{ model: User, as: 'uploader', attributes: ['name'], required: false }],
        order: [['revision', 'DESC']],
      });
      const uses = await PlanLine.findAll({
        attributes: ['planId'],
        include: [
          { model: RequestLine, as: 'requestLine', attributes: ['partId'], required: true, where: { partId: rows.map((r) => r.id) } },
          { model: Plan, as: 'plan', attributes: ['id', 'name', 'status'], required: true, where: { status: { [Op.notIn]: [...inactive] } } },
        ],
      });
      const plansOf = new Map<string, Map<string, { id: string; name: string; status: string }>>();
      for (const u of uses) {
        const partId = u.requestLine!.partId;
        const plans = plansOf.get(partId) ?? new Map();
        plans.set(u.plan!.id, { id: u.plan!.id, name: u.plan!.name, status: u.plan!.status });
        plansOf.set(partId, plans);
      }
      return rows.map((p) => ({
        id: p.id,
        revision: p.revision,
        supersededBy: p.supersededBy,
        fileName: p.fileName,
        sizeMm: [p.sizeXMm, p.sizeYMm, p.sizeZMm],
        volumeMm3: p.volumeMm3,
        watertight: p.watertight,
        uploadedBy: p.uploadedBy,
        uploaderName: p.uploader?.name ?? null,
        createdAt: p.createdAt,
        plans: [...(plansOf.get(p.id)?.values() ?? [])],
      }));
    },

    /**
     * Makes `freshId` the next revision of the locked part: it takes the old one's name, tags, orientation and
     * material, and the old one points to it.
     */
    async makeNextRevision(freshId: string, oldId: string, transaction: Transaction): Promise<void> {
      const old = await Part.findByPk(oldId, { transaction });
      if (!old) return;
      await Part.update(
        {
          name: old.name,
          tags: old.tags,
          orientation: old.orientation,
          defaultMaterialId: old.defaultMaterialId,
          revision: old.revision + 1,
          firstRevisionId: old.firstRevisionId ?? old.id,
        },
        { where: { id: freshId }, transaction },
      );
      await old.update({ supersededBy: freshId }, { transaction });
    },

    /** Request lines of the old revision that no plan (other than `inactive` ones) holds move to the new one. */
    async moveUnplannedLines(fromPartId: string, toPartId: string, inactive: readonly PlanStatus[], transaction: Transaction): Promise<void> {
      const lines = await RequestLine.findAll({ where: { partId: fromPartId }, attributes: ['id'], transaction });
      if (lines.length === 0) return;
      const planned = await PlanLine.findAll({
        where: { requestLineId: lines.map((l) => l.id) },
        attributes: ['requestLineId'],
        include: [{ model: Plan, as: 'plan', attributes: [], required: true, where: { status: { [Op.notIn]: [...inactive] } } }],
        transaction,
      });
      const keep = new Set(planned.map((p) => p.requestLineId));
      const move = lines.map((l) => l.id).filter((id) => !keep.has(id));
      if (move.length > 0) await RequestLine.update({ partId: toPartId }, { where: { id: move }, transaction });
    },

    async thumbnail(fileKey: string, view: string): Promise<Buffer | null> {
      const row = await PartThumbnail.findOne({ where: { fileKey, view }, attributes: ['png'] });
      return row ? row.png : null;
    },

    /** Keeps a picture: when two servers draw the same one at once the first stays, and a file removed meanwhile keeps none. */
    async keepThumbnail(fileKey: string, view: string, png: Buffer): Promise<void> {
      try {
        await PartThumbnail.bulkCreate([{ fileKey, view, png }], { ignoreDuplicates: true });
      } catch (err) {
        if ((err as { name?: string }).name !== FOREIGN_KEY) throw err;
      }
    },
  };
}
export type PartsRepository = ReturnType<typeof partsRepository>;
