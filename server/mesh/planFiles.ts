/**
 * A plan's build file (3MF) and the build sheet's drawn views, made from the
 * parts' stored files in a mesh worker thread (./worker.ts): parsing a large
 * mesh, writing it out as 3MF text and compressing it, or drawing millions of
 * placed triangles takes seconds, and on the web server's own thread it would
 * hold every other request of every lab that long. The web server only reads
 * the files from the store and lays the finished pictures on the sheet.
 */
import { write3mf, type LengthUnit, type ThreeMfItemInput } from '../../shared/geometry';
import { restingMesh, restingTransform, storedPart } from '../../shared/geometry/layoutSlices';
import { PNG } from 'pngjs';
import { projectionGrid, projectMesh, shadeImage } from '../../shared/geometry/projection';

/** A part's stored file, how it is read (unit, one part per 3MF build item or not), which part of it, and the turn the part is stored with. */
export interface StoredPartFile {
  bytes: Uint8Array;
  filename: string;
  unit: LengthUnit;
  split: boolean;
  partIndex: number;
  rotationDeg: readonly number[];
}

/** One distinct part of a plan and its stored file. */
export interface PlanMeshFile extends StoredPartFile {
  /** The part's name, for the build file's object and for messages. */
  name: string;
}

/** A placement of one of the files' parts: its own 3MF transform (a layout by shape) or its box orientation and corner. */
export interface PlanMeshItem {
  file: number;
  orientation: string;
  position: readonly number[];
  transform?: readonly number[] | null;
}

export interface BuildFileJob {
  files: PlanMeshFile[];
  items: PlanMeshItem[];
}

/** A view of the chamber: the axes drawn across and up, the axis looked along, which way is nearer, the cell. */
export interface ViewSpec {
  axes: [number, number];
  depthAxis: number;
  nearer: 1 | -1;
  cellMm: number;
  /** The room drawn along `axes` from the chamber's corner (mm): the chamber's sides when left out. */
  sizeMm?: [number, number];
}

export interface SheetViewsJob {
  files: PlanMeshFile[];
  items: PlanMeshItem[];
  chamber: readonly number[];
  views: ViewSpec[];
  /** The shades, far to near (RGB, 0-255). */
  palette: Array<[number, number, number]>;
  /** Where no part is. */
  background: [number, number, number];
  /** More placed triangles than this and the views are not drawn (the reason says so). */
  triangleLimit: number;
}

/** Each view as a PNG picture (RGB), one pixel a cell, `width` x `height` cells. */
export type SheetViewsResult = { views: Array<{ png: Uint8Array; width: number; height: number }> } | { reason: string };

/** A part's file that does not hold the mesh its plan needs; `part` is its name. */
export class UnreadablePartFile extends Error {
  constructor(
    readonly part: string,
    readonly filename: string,
  ) {
    super(`The stored file of "${part}" (${filename}) cannot be read as a mesh`);
  }
}

interface RestingPart {
  name: string;
  positions: Float64Array;
  indices: Uint32Array;
  extentMm: number[];
}

function readFiles(files: readonly PlanMeshFile[]): RestingPart[] {
  return files.map((f) => {
    const mesh = storedPart(f);
    if (!mesh) throw new UnreadablePartFile(f.name, f.filename);
    const resting = restingMesh(mesh, f.rotationDeg);
    return { name: f.name, positions: resting.positions, indices: mesh.indices, extentMm: resting.extentMm };
  });
}

/** A placement's 3MF transform (../../shared/geometry/layoutSlices.ts restingTransform); a stored layout's orientation is always one. */
function itemTransform(item: PlanMeshItem, extentMm: readonly number[]): number[] {
  const transform = restingTransform(item, extentMm);
  if (!transform) throw new Error(`a placement's orientation "${item.orientation}" is not one`);
  return transform;
}

/** The packed build as one 3MF package: each part's mesh once, one build item per placement, numbered from 1. */
export function buildFile(job: BuildFileJob): Uint8Array {
  const parts = readFiles(job.files);
  const items: ThreeMfItemInput[] = job.items.map((item, i) => ({
    objectIndex: item.file,
    transform: itemTransform(item, parts[item.file].extentMm),
    partNumber: `${i + 1}`,
  }));
  return write3mf(
    parts.map((p) => ({ name: p.name, positions: p.positions, indices: p.indices })),
    items,
    'millimeter',
  );
}

/** The placed meshes projected on each view's plane (../../shared/geometry/projection.ts), shaded by depth, as pictures. */
export function sheetViews(job: SheetViewsJob): SheetViewsResult {
  const parts = readFiles(job.files);
  const triangles = job.items.reduce((n, item) => n + parts[item.file].indices.length / 3, 0);
  if (triangles > job.triangleLimit) {
    return {
      reason: `The placed parts have ${Math.round(triangles).toLocaleString('en-US')} triangles, more than the ${job.triangleLimit.toLocaleString('en-US')} a sheet draws, so the views draw bounding boxes.`,
    };
  }
  const transforms = job.items.map((item) => itemTransform(item, parts[item.file].extentMm));
  return {
    views: job.views.map((view) => {
      const grid = projectionGrid(view.axes, view.depthAxis, view.sizeMm ?? [job.chamber[view.axes[0]], job.chamber[view.axes[1]]], view.cellMm, view.nearer);
      job.items.forEach((item, i) => projectMesh(grid, parts[item.file].positions, parts[item.file].indices, transforms[i]));
      const png = new PNG({ width: grid.na, height: grid.nb, colorType: 2, inputColorType: 2, inputHasAlpha: false });
      png.data = Buffer.from(shadeImage(grid, job.palette, job.background).buffer);
      const out = PNG.sync.write(png, { colorType: 2, inputColorType: 2, inputHasAlpha: false });
      return { png: new Uint8Array(out.buffer, out.byteOffset, out.byteLength), width: grid.na, height: grid.nb };
    }),
  };
}
