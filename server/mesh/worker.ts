/**
 * Worker thread task (run by the piscina pool in server/mesh/pool.ts): reads
 * an uploaded file and measures it, or slices a layout's parts, so a large
 * mesh never blocks the event loop of the process that asked.
 */
import { readFile } from 'node:fs/promises';
import { measureMeshFile, SliceCache } from '../../shared/geometry';
import { profileLayoutFromFiles, RestingMeshCache } from '../../shared/geometry/layoutSlices';
import type { MeasureReply, MeasureRequest } from './protocol';

// Parts read and sliced before, kept for the next layout of the same parts in this thread.
const caches = { meshes: new RestingMeshCache(), slices: new SliceCache() };

export default async function handle(request: MeasureRequest): Promise<MeasureReply> {
  try {
    if (request.profile) {
      // Copied back by structured clone: a profile is a few numbers a layer.
      return { id: request.id, profile: profileLayoutFromFiles(request.profile, caches) };
    }
    // A view on the read buffer, not a copy: the file is held once.
    const file = request.path !== undefined ? await readFile(request.path) : undefined;
    const bytes = file ? new Uint8Array(file.buffer, file.byteOffset, file.byteLength) : request.bytes;
    if (!bytes) throw new Error('a measure request needs a path or bytes');
    return { id: request.id, result: measureMeshFile(bytes, request.options) };
  } catch (error) {
    return { id: request.id, error: error instanceof Error ? error.message : String(error) };
  }
}
