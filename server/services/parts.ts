import type { Transaction } from 'sequelize';
import pLimit from 'p-limit';
import type { Database } from '../db';
import { partsRepository, type PartChanges, type PartListRow } from '../db/repositories/parts';
import { badRequest, conflict, forbidden, notFound } from '../errors';
import { measureFile, type FileMeasureResult } from '../mesh';
import { sha256Bytes, sha256File, type FileSource, type FileStorage } from '../storage';
import { formatFromFilename, quoteName, type MeasureOptions } from '../../shared/geometry';
import type { PartListQuery, PartListResponse, PartPatch, PartView, RejectedFile } from '../../shared/schemas/parts';

/** Why a part cannot be deleted right now (a message for the user), or null when nothing uses it. */
export type PartUsageCheck = (labId: string, partId: string, transaction: Transaction) => Promise<string | null>;

export type PartsDeps = {
  storage: FileStorage;
  /** Expanded-size cap for a 3MF (ZIP bomb defence). */
  max3mfExpandedBytes?: number;
  /** Triangle cap per file, after a 3MF's components are expanded. */
  maxMeshTriangles?: number;
  /** Measuring in worker threads; replaceable so a test can count or slow it. */
  measure?: (input: string | Uint8Array, options: MeasureOptions) => Promise<FileMeasureResult>;
};

export type ImportInput = {
  labId: string;
  userId: string | null;
  /** The name the file had on the designer's computer. */
  filename: string;
  source: FileSource;
  unit: 'mm' | 'cm' | 'inch';
  split: boolean;
};

/** A file measured without problems. */
export type MeasuredFile = Extract<FileMeasureResult, { ok: true }>;

export type ImportResult = { ok: true; parts: PartView[] } | { ok: false; rejected: RejectedFile; serverError?: unknown };

const FILE_CONTENT_TYPES = { stl: 'model/stl', obj: 'model/obj', '3mf': 'model/3mf' } as const;

/**
 * The file name without any folders a browser or tool may have sent along, at most 255 characters. A longer name is
 * cut in its stem, so its extension (which says how to read the file) stays: cut at its end, a 5,000-character name
 * ending in .stl was refused as not a mesh file.
 */
export function plainFileName(name: string): string {
  const last = (name.split(/[\\/]/).pop() ?? '').replace(/[\u0000-\u001f\u007f]/g, '');
  if (last.length <= 255) return last || 'unnamed';
  const dot = last.lastIndexOf('.');
  const extension = dot > 0 && last.length - dot <= 10 ? last.slice(dot) : '';
  return last.slice(0, 255 - extension.length) + extension;
}

type Vec3 = [number, number, number];

/**
 * Size after turning the part by quarter turns about x, then y, then z (fixed
 * axes). For quarter turns the rotation matrix R = Rz · Ry · Rx has one ±1 per
 * row, so the box's size is |R| · size: a permutation of the uploaded size.
 */
export function rotatedSizeMm(size: Vec3, rotationDeg: Vec3): Vec3 {
  const cos = (d: number) => [1, 0, -1, 0][((d / 90) % 4 + 4) % 4];
  const sin = (d: number) => [0, 1, 0, -1][((d / 90) % 4 + 4) % 4];
  const [ax, ay, az] = rotationDeg;
  const rx = [[1, 0, 0], [0, cos(ax), -sin(ax)], [0, sin(ax), cos(ax)]];
  const ry = [[cos(ay), 0, sin(ay)], [0, 1, 0], [-sin(ay), 0, cos(ay)]];
  const rz = [[cos(az), -sin(az), 0], [sin(az), cos(az), 0], [0, 0, 1]];
  const mul = (a: number[][], b: number[][]) => a.map((row) => [0, 1, 2].map((j) => row.reduce((s, v, k) => s + v * b[k][j], 0)));
  const r = mul(rz, mul(ry, rx));
  return r.map((row) => row.reduce((s, v, j) => s + Math.abs(v) * size[j], 0)) as Vec3;
}

function view(r: PartListRow): PartView {
  return {
    id: r.id,
    labId: r.lab_id,
    name: r.name,
    tags: r.tags,
    sizeMm: [r.size_x_mm, r.size_y_mm, r.size_z_mm],
    uploadedSizeMm: r.uploaded_size_mm as Vec3,
    rotationDeg: r.rotation_deg as Vec3,
    orientation: r.orientation,
    volumeMm3: r.volume_mm3,
    areaMm2: r.area_mm2,
    triangles: r.triangles,
    watertight: r.watertight,
    shells: r.metrics.shells,
    openEdges: r.metrics.openEdges,
    nonManifoldEdges: r.metrics.nonManifoldEdges,
    oriented: r.metrics.oriented,
    warnings: r.warnings,
    materialId: r.default_material_id,
    materialName: r.material_name,
    timesUsed: Number(r.times_used),
    uploadedBy: r.uploaded_by ? { id: r.uploaded_by, name: r.uploader_name ?? '' } : null,
    createdAt: new Date(r.created_at).toISOString(),
    updatedAt: new Date(r.updated_at).toISOString(),
    file: {
      name: r.file_name,
      format: r.file_format,
      unit: r.file_unit,
      split: r.file_split,
      partIndex: r.file_part_index,
      sizeBytes: Number(r.file_size_bytes),
      sha256: r.file_key,
    },
  };
}

/**
 * Files stored at the same time. Measuring runs in parallel in the worker
 * pool, but the PostgreSQL driver holds a file's bytes while it writes them,
 * so a folder of large files is written a few at a time, not all at once.
 */
const STORE_CONCURRENCY = 2;

/**
 * The part library: importing (measure, store the file, write the rows in one
 * transaction), listing, editing and deleting parts.
 */
export function partsService(db: Database, deps: PartsDeps) {
  const { sequelize } = db;
  const repo = partsRepository(db);
  const { storage } = deps;
  const measure = deps.measure ?? measureFile;
  const usageChecks: PartUsageCheck[] = [];
  const storeSlots = pLimit(STORE_CONCURRENCY);

  async function rowsById(labId: string, ids: string[], transaction?: Transaction): Promise<PartView[]> {
    if (ids.length === 0) return [];
    return (await repo.byIds(labId, ids, transaction)).map(view);
  }

  async function get(labId: string, partId: string, transaction?: Transaction): Promise<PartView> {
    if (!/^[0-9a-f-]{36}$/i.test(partId)) throw notFound('That part');
    const [part] = await rowsById(labId, [partId], transaction);
    if (!part) throw notFound('That part');
    return part;
  }

  /** The largest chamber of the lab's machines, per sorted axis, for the "does not fit" warning. */
  async function largestChamberMm(labId: string, transaction?: Transaction): Promise<[number, number, number] | undefined> {
    let best: number[] | undefined;
    for (const c of await repo.chambersMm(labId, transaction)) {
      const sorted = [...c].sort((a, b) => a - b);
      best = best ? best.map((v, i) => Math.max(v, sorted[i])) : sorted;
    }
    return best as [number, number, number] | undefined;
  }

  /** The options a file is measured with, or why it is refused before any work (not a mesh format). */
  async function measureOptions(
    labId: string,
    filename: string,
    unit: 'mm' | 'cm' | 'inch',
    split: boolean,
    transaction?: Transaction,
  ): Promise<{ ok: true; file: string; options: MeasureOptions } | { ok: false; rejected: RejectedFile }> {
    const file = plainFileName(filename);
    if (!formatFromFilename(file)) {
      return {
        ok: false,
        rejected: {
          file,
          code: 'unsupported-extension',
          message: `${quoteName(file)} is not a supported mesh file: upload STL (.stl), OBJ (.obj) or 3MF (.3mf).`,
        },
      };
    }
    const chamber = await largestChamberMm(labId, transaction);
    return {
      ok: true,
      file,
      options: {
        filename: file,
        unit,
        splitObjects: split,
        largestChamberMm: chamber,
        maxUncompressedBytes: deps.max3mfExpandedBytes,
        maxTriangles: deps.maxMeshTriangles,
      },
    };
  }

  /** The file's bytes (or one reference more) and one row a measured part, in `transaction`. */
  async function storeMeasured(
    input: { labId: string; userId: string | null; file: string; key: string; source: FileSource; unit: 'mm' | 'cm' | 'inch'; split: boolean },
    measured: MeasuredFile,
    transaction: Transaction,
  ): Promise<{ ids: string[]; created: boolean }> {
    const format = measured.format;
    const { created } = await storage.put(input.key, input.source, { transaction, refs: measured.parts.length });
    const ids: string[] = [];
    for (const [index, part] of measured.parts.entries()) {
      const m = part.metrics;
      const id = await repo.create(
        {
          labId: input.labId,
          name: part.name.slice(0, 200) || 'part',
          fileKey: input.key,
          fileName: input.file,
          fileFormat: format,
          // A 3MF carries its own unit, which the reader has applied.
          fileUnit: format === '3mf' ? 'mm' : input.unit,
          fileSplit: input.split,
          filePartIndex: index,
          uploadedSizeMm: m.sizeMm,
          sizeXMm: m.sizeMm[0],
          sizeYMm: m.sizeMm[1],
          sizeZMm: m.sizeMm[2],
          volumeMm3: m.volumeMm3,
          areaMm2: m.areaMm2,
          triangles: m.triangles,
          watertight: m.watertight,
          metrics: m,
          warnings: part.warnings,
          uploadedBy: input.userId,
        },
        transaction,
      );
      ids.push(id);
    }
    return { ids, created };
  }

  async function withTransaction<T>(outer: Transaction | undefined, fn: (t: Transaction) => Promise<T>): Promise<T> {
    return outer ? fn(outer) : sequelize.transaction(fn);
  }

  const service = {
    get,

    /** Later features (build plans) add a check here; deleting a part in use answers 409. */
    addUsageCheck(check: PartUsageCheck) {
      usageChecks.push(check);
    },

    /**
     * Measures one file and, when it is good, stores it and its parts. A bad
     * file is answered as rejected and nothing of it is stored; a failure
     * while storing rolls everything of this file back.
     */
    async importFile(input: ImportInput, outer?: Transaction): Promise<ImportResult> {
      const checked = await measureOptions(input.labId, input.filename, input.unit, input.split, outer);
      if (!checked.ok) return checked;
      const { file, options } = checked;
      const measured = await measure('path' in input.source ? input.source.path : input.source.bytes, options);
      if (!measured.ok) {
        const [first] = measured.problems;
        return { ok: false, rejected: { file, code: first.code, message: measured.problems.map((p) => p.message).join(' ') } };
      }
      const key = 'path' in input.source ? await sha256File(input.source.path) : sha256Bytes(input.source.bytes);
      let created = false;
      try {
        const ids = await storeSlots(() =>
          withTransaction(outer, async (transaction) => {
            const stored = await storeMeasured({ ...input, file, key }, measured, transaction);
            created = stored.created;
            return stored.ids;
          }),
        );
        return { ok: true, parts: await rowsById(input.labId, ids, outer) };
      } catch (err) {
        if (created && !outer) await storage.discard(key);
        if (outer) throw err;
        return {
          ok: false,
          rejected: { file, code: 'not_saved', message: `${quoteName(file)} was measured but could not be saved; nothing of it was kept. Try again shortly.` },
          serverError: err,
        };
      }
    },

    measureOptions: (labId: string, filename: string, unit: 'mm' | 'cm' | 'inch', split: boolean) => measureOptions(labId, filename, unit, split),

    /** Stores a measured file (its bytes, or a reference more when they are stored already) and its parts, in the caller's transaction. */
    async storeMeasured(
      input: { labId: string; userId: string | null; file: string; key: string; bytes: Uint8Array; unit: 'mm' | 'cm' | 'inch'; split: boolean },
      measured: MeasuredFile,
      transaction: Transaction,
    ): Promise<string[]> {
      return (await storeMeasured({ ...input, source: { bytes: input.bytes } }, measured, transaction)).ids;
    },

    /** The parts with these ids, in this order; parts deleted since are left out. */
    async byIds(labId: string, ids: string[]): Promise<PartView[]> {
      const rows = await rowsById(labId, ids);
      const byId = new Map(rows.map((r) => [r.id, r]));
      return ids.flatMap((id) => byId.get(id) ?? []);
    },

    async list(labId: string, q: PartListQuery): Promise<PartListResponse> {
      // The library lists each part once, as its newest file revision.
      const { rows, total } = await repo.page(labId, q);
      return { items: rows.map(view), total };
    },

    async update(labId: string, partId: string, patch: PartPatch): Promise<PartView> {
      await get(labId, partId);
      const uploadedSizeMm = await repo.uploadedSizeMm(labId, partId);
      if (!uploadedSizeMm) throw notFound('That part');
      const changes: PartChanges = {};
      if (patch.name !== undefined) changes.name = patch.name;
      if (patch.tags !== undefined) changes.tags = patch.tags;
      if (patch.orientation !== undefined) changes.orientation = patch.orientation;
      if (patch.defaultMaterialId !== undefined) {
        if (patch.defaultMaterialId !== null) {
          if (!(await repo.isMaterialOf(labId, patch.defaultMaterialId))) throw badRequest('defaultMaterialId is not a material of this lab', 'defaultMaterialId');
        }
        changes.defaultMaterialId = patch.defaultMaterialId;
      }
      if (patch.rotationDeg !== undefined) {
        const size = rotatedSizeMm(uploadedSizeMm as Vec3, patch.rotationDeg);
        Object.assign(changes, { rotationDeg: patch.rotationDeg, sizeXMm: size[0], sizeYMm: size[1], sizeZMm: size[2] });
      }
      if (Object.keys(changes).length > 0) await repo.update(labId, partId, changes);
      return get(labId, partId);
    },

    /** Only the uploader or a lead; never while something uses the part. */
    async remove(labId: string, partId: string, caller: { userId: string; isLead: boolean }): Promise<void> {
      const part = await get(labId, partId);
      if (!caller.isLead && part.uploadedBy?.id !== caller.userId) {
        throw forbidden('Only the person who uploaded this part or a lead of the lab may delete it.');
      }
      await sequelize.transaction(async (transaction) => {
        // Lock the row so a plan or request cannot start using it while it goes.
        const row = await repo.lockForRemoval(labId, partId, transaction);
        if (!row) throw notFound('That part');
        for (const check of usageChecks) {
          const why = await check(labId, partId, transaction);
          if (why) throw conflict('in_use', why);
        }
        await repo.remove(partId, transaction);
        await storage.delete(row.fileKey, { transaction });
      });
    },

    /** The stored bytes of the part's file, with a content type and the original name. */
    async file(labId: string, partId: string): Promise<{ bytes: Buffer; contentType: string; filename: string; sha256: string }> {
      const part = await get(labId, partId);
      const bytes = await storage.get(part.file.sha256);
      if (!bytes) throw notFound("That part's file");
      return { bytes, contentType: FILE_CONTENT_TYPES[part.file.format], filename: part.file.name, sha256: part.file.sha256 };
    },
  };
  return service;
}
export type PartsService = ReturnType<typeof partsService>;

