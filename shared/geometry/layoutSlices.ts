/**
 * A kept or working layout's per-layer area and contour from the parts' stored
 * mesh files: the work a worker thread (server) or web worker (editor) does
 * before the estimates.
 *
 * A part's own axes in a plan are its file's coordinates turned by the part's
 * stored quarter turns (about x, then y, then z, fixed axes: R = Rz Ry Rx) and
 * moved so its bounding box starts at the origin: the "resting" mesh, whose
 * extent is the part's size in the plan. A box placement (orientation code and
 * minimum corner) becomes the rotation of that code (the 24-rotation table's
 * indices 0..5) moved to the corner; a placement with a 3MF transform (a shape
 * layout) uses the transform, which applies to the resting mesh.
 */
import { parseMeshFile } from './measure';
import { placementTransform, rotationIndex } from './rotations';
import { layoutProfiles, SliceCache, type LayoutProfiles, type ProfilePlacement, type ProfileSource } from './slice';
import type { LengthUnit, MeshData } from './types';

/** R = Rz Ry Rx for quarter turns about x, then y, then z (fixed axes), as the parts store them. */
export function quarterTurnMatrix(rotationDeg: readonly number[]): number[][] {
  const q = (d: number) => ((Math.round(d / 90) % 4) + 4) % 4;
  const cos = (d: number) => [1, 0, -1, 0][q(d)];
  const sin = (d: number) => [0, 1, 0, -1][q(d)];
  const [ax, ay, az] = rotationDeg;
  const rx = [[1, 0, 0], [0, cos(ax), -sin(ax)], [0, sin(ax), cos(ax)]];
  const ry = [[cos(ay), 0, sin(ay)], [0, 1, 0], [-sin(ay), 0, cos(ay)]];
  const rz = [[cos(az), -sin(az), 0], [sin(az), cos(az), 0], [0, 0, 1]];
  const mul = (a: number[][], b: number[][]) => a.map((row) => [0, 1, 2].map((j) => row.reduce((s, v, k) => s + v * b[k][j], 0)));
  return mul(rz, mul(ry, rx));
}

/** The mesh turned by the part's stored quarter turns, its bounding box moved to start at the origin. */
export function restingMesh(mesh: MeshData, rotationDeg: readonly number[]): MeshData & { extentMm: [number, number, number] } {
  const r = quarterTurnMatrix(rotationDeg);
  const p = mesh.positions;
  const out = new Float64Array(p.length);
  const min = [Infinity, Infinity, Infinity];
  const max = [-Infinity, -Infinity, -Infinity];
  for (let v = 0; v < p.length; v += 3) {
    for (let k = 0; k < 3; k++) {
      const c = r[k][0] * p[v] + r[k][1] * p[v + 1] + r[k][2] * p[v + 2];
      out[v + k] = c;
      if (c < min[k]) min[k] = c;
      if (c > max[k]) max[k] = c;
    }
  }
  for (let v = 0; v < out.length; v += 3) for (let k = 0; k < 3; k++) out[v + k] -= min[k];
  return { positions: out, indices: mesh.indices, extentMm: [max[0] - min[0], max[1] - min[1], max[2] - min[2]] };
}

/** A stored file's part, read as it was stored (its unit; a 3MF one part per build item or not): null when the file holds no such part. */
export function storedPart(f: { bytes: Uint8Array; filename: string; unit: LengthUnit; split: boolean; partIndex: number }): MeshData | null {
  const parsed = parseMeshFile(f.bytes, { filename: f.filename, unit: f.unit, splitObjects: f.split });
  return (parsed.ok ? parsed.parts[f.partIndex] : undefined) ?? null;
}

/**
 * A placement's 3MF transform from its part's resting mesh (which fills [0, extent]): its own (a layout packed by
 * shape, whose rotation may be any of the 24), or from its box orientation and corner; null for an orientation
 * that is not one.
 */
export function restingTransform(p: { orientation?: string; position: readonly number[]; transform?: readonly number[] | null }, extentMm: readonly number[]): number[] | null {
  if (p.transform) return [...p.transform];
  const r = p.orientation === undefined ? -1 : rotationIndex(p.orientation);
  return r >= 0 ? placementTransform(r, [0, 0, 0], extentMm, p.position) : null;
}

/** The same mesh with its triangles turned outward when they all face in (negative volume), so its sections count positive. */
export function outwardFacing<M extends MeshData>(mesh: M): M {
  const p = mesh.positions;
  const idx = mesh.indices;
  let six = 0;
  for (let f = 0; f + 2 < idx.length; f += 3) {
    const a = 3 * idx[f];
    const b = 3 * idx[f + 1];
    const c = 3 * idx[f + 2];
    six +=
      p[a] * (p[b + 1] * p[c + 2] - p[b + 2] * p[c + 1]) - p[a + 1] * (p[b] * p[c + 2] - p[b + 2] * p[c]) + p[a + 2] * (p[b] * p[c + 1] - p[b + 1] * p[c]);
  }
  if (six >= 0) return mesh;
  const flipped = idx.slice();
  for (let f = 0; f + 2 < flipped.length; f += 3) [flipped[f + 1], flipped[f + 2]] = [flipped[f + 2], flipped[f + 1]];
  return { ...mesh, indices: flipped };
}

/** One distinct part of the layout and its stored file. */
export interface ProfilePartFile {
  /** Names the part's mesh for the caches: file hash, part index in the file and stored turns. */
  key: string;
  /** The file's bytes; null when the file could not be read (the part then counts as its box). */
  bytes: Uint8Array | null;
  filename: string;
  unit: LengthUnit;
  /** A 3MF read as one part per build item. */
  split: boolean;
  partIndex: number;
  rotationDeg: readonly number[];
  /** A mesh that is not watertight and consistently oriented has no well-defined sections: it counts as its box. */
  watertight: boolean;
}

export interface ProfileLayoutPlacement {
  part: number;
  /** Box orientation code (xyz ... zyx) or a signed rotation code; ignored when `transform` is given. */
  orientation?: string;
  /** Minimum corner of the placed box (chamber mm). */
  position: readonly number[];
  /** Extent of the placed box (chamber mm). */
  size: readonly number[];
  /** 3MF transform taking the resting mesh to the chamber (shape layouts). */
  transform?: readonly number[];
}

export interface ProfileLayoutJob {
  parts: ProfilePartFile[];
  placements: ProfileLayoutPlacement[];
  layerHeightMm: number;
  layers: number;
}

export interface ProfileLayoutResult extends LayoutProfiles {
  /** Why a part counted as its box, one line a part. */
  boxReasons: { part: number; reason: string }[];
}

/** Resting meshes already read, by key, so a repeated layout does not parse its files again. */
export class RestingMeshCache {
  private entries = new Map<string, (MeshData & { extentMm: [number, number, number] }) | null>();
  private triangles = 0;

  constructor(private readonly maxTriangles = 4_000_000) {}

  get(key: string): (MeshData & { extentMm: [number, number, number] }) | null | undefined {
    return this.entries.get(key);
  }

  set(key: string, mesh: (MeshData & { extentMm: [number, number, number] }) | null): void {
    this.entries.set(key, mesh);
    this.triangles += mesh ? mesh.indices.length / 3 : 0;
    for (const [k, m] of this.entries) {
      if (this.triangles <= this.maxTriangles || k === key) break;
      this.entries.delete(k);
      this.triangles -= m ? m.indices.length / 3 : 0;
    }
  }
}

/**
 * Reads each part's file (once), slices the placed parts at the layout's layer
 * middles and sums them. Parts whose file is missing, unreadable or not
 * watertight count as their boxes, with the reason.
 */
export function profileLayoutFromFiles(
  job: ProfileLayoutJob,
  caches: { meshes?: RestingMeshCache; slices?: SliceCache } = {},
  read: PartMeshes = readPartMeshes(job.parts, caches.meshes),
): ProfileLayoutResult {
  const { sources, boxReasons } = read;
  const placements: ProfilePlacement[] = job.placements.map((p) => {
    const mesh = sources[p.part]?.mesh as (MeshData & { extentMm: number[] }) | null | undefined;
    const transform = p.transform ?? (mesh ? restingTransform(p, mesh.extentMm) : null);
    return { part: p.part, transform, position: p.position, size: p.size };
  });
  const profiles = layoutProfiles({ parts: sources, placements, layerHeightMm: job.layerHeightMm, layers: job.layers, cache: caches.slices });
  return { ...profiles, boxReasons };
}

/** Each part's resting mesh (null: it counts as its box) and why a part has none. */
export interface PartMeshes {
  sources: ProfileSource[];
  boxReasons: { part: number; reason: string }[];
}

/** Reads each part's file once (or takes its resting mesh from the cache). */
export function readPartMeshes(files: readonly ProfilePartFile[], meshes: RestingMeshCache = new RestingMeshCache()): PartMeshes {
  const boxReasons: { part: number; reason: string }[] = [];
  const sources: ProfileSource[] = files.map((f, i) => {
    if (!f.watertight) {
      boxReasons.push({ part: i, reason: `"${f.filename}" is not a closed, consistently oriented mesh, so its sections are not defined` });
      return { key: f.key, mesh: null };
    }
    let mesh = meshes.get(f.key);
    if (mesh === undefined) {
      if (!f.bytes) {
        boxReasons.push({ part: i, reason: `the stored file "${f.filename}" could not be read` });
        return { key: f.key, mesh: null };
      }
      const part = storedPart({ ...f, bytes: f.bytes });
      mesh = part ? outwardFacing(restingMesh(part, f.rotationDeg)) : null;
      meshes.set(f.key, mesh);
    }
    if (!mesh) boxReasons.push({ part: i, reason: `"${f.filename}" cannot be read as a mesh` });
    return { key: f.key, mesh };
  });
  return { sources, boxReasons };
}
