/**
 * Worker thread task (run by the piscina pool in server/mesh/pool.ts): reads
 * an uploaded file and measures it, slices a layout's parts, or writes a
 * plan's build file or draws its sheet's views, so a large mesh never
 * blocks the event loop of the process that asked.
 */
import { readFile } from 'node:fs/promises';
import { setPriority } from 'node:os';
import { workerData } from 'piscina';
import { PNG } from 'pngjs';
import { measureMeshFile, SliceCache } from '../../shared/geometry';
import { profileLayoutFromFiles, readPartMeshes, restingMesh, RestingMeshCache, storedPart } from '../../shared/geometry/layoutSlices';
import { checkShapeLayout } from '../../shared/packing/shape/check';
import { renderThumbnail } from '../../shared/geometry/thumbnail';
import type { MeasureReply, MeasureRequest, ThumbnailJob } from './protocol';
import { buildFile, sheetViews, UnreadablePartFile } from './planFiles';

// A bulk thread yields the CPU to the web server and the quick lane (on Linux a nice value is per thread).
const nice = Number((workerData as { nice?: number } | undefined)?.nice ?? 0);
if (nice > 0) {
  try {
    setPriority(nice);
  } catch {
    // Not allowed here (some containers): the thread runs at the process's priority.
  }
}

// Parts read and sliced before, kept for the next layout of the same parts in this thread.
const caches = { meshes: new RestingMeshCache(), slices: new SliceCache() };

export default async function handle(request: MeasureRequest): Promise<MeasureReply> {
  try {
    if (request.thumbnail) return { id: request.id, png: thumbnailPng(request.thumbnail) };
    if (request.buildFile) return { id: request.id, file: buildFile(request.buildFile) };
    if (request.sheetViews) return { id: request.id, views: sheetViews(request.sheetViews) };
    if (request.profile) {
      // Copied back by structured clone: a profile is a few numbers a layer.
      const { check, ...job } = request.profile;
      const read = readPartMeshes(job.parts, caches.meshes);
      const profile = profileLayoutFromFiles(job, caches, read);
      if (!check) return { id: request.id, profile };
      // A layout packed by shape: checked against the same meshes the sections came from.
      const problems = checkShapeLayout(check, read.sources.map((s) => s.mesh), profile.areaProfile);
      return { id: request.id, profile: { ...profile, problems } };
    }
    // A view on the read buffer, not a copy: the file is held once.
    const file = request.path !== undefined ? await readFile(request.path) : undefined;
    const bytes = file ? new Uint8Array(file.buffer, file.byteOffset, file.byteLength) : request.bytes;
    if (!bytes) throw new Error('a measure request needs a path or bytes');
    return { id: request.id, result: measureMeshFile(bytes, request.options) };
  } catch (error) {
    if (error instanceof UnreadablePartFile) return { id: request.id, unreadable: { part: error.part, filename: error.filename } };
    return { id: request.id, error: error instanceof Error ? error.message : String(error) };
  }
}

function thumbnailPng(job: ThumbnailJob): Uint8Array | null {
  const part = storedPart(job);
  if (!part) return null;
  const picture = renderThumbnail(restingMesh(part, job.rotationDeg), job.sizePx);
  const png = new PNG({ width: picture.width, height: picture.height });
  png.data = Buffer.from(picture.rgba.buffer, picture.rgba.byteOffset, picture.rgba.byteLength);
  const out = PNG.sync.write(png, { colorType: 6 });
  return new Uint8Array(out.buffer, out.byteOffset, out.byteLength);
}
