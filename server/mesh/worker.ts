/**
 * Worker thread entry: reads an uploaded file and measures it, so a large mesh
 * never blocks the HTTP server's event loop.
 */
import { readFile } from 'node:fs/promises';
import { parentPort } from 'node:worker_threads';
import { measureMeshFile, SliceCache } from '../../shared/geometry';
import { profileLayoutFromFiles, RestingMeshCache } from '../../shared/geometry/layoutSlices';
import type { MeasureReply, MeasureRequest } from './protocol';

if (!parentPort) throw new Error('server/mesh/worker.ts must run as a worker thread');
const port = parentPort;
// Parts read and sliced before, kept for the next layout of the same parts.
const caches = { meshes: new RestingMeshCache(), slices: new SliceCache() };

port.on('message', async (request: MeasureRequest) => {
  let reply: MeasureReply;
  try {
    if (request.profile) {
      const profile = profileLayoutFromFiles(request.profile, caches);
      port.postMessage({ id: request.id, profile } satisfies MeasureReply, [profile.areaProfile.buffer as ArrayBuffer, profile.contourProfile.buffer as ArrayBuffer]);
      return;
    }
    // A view on the read buffer, not a copy: the file is held once.
    const file = request.path !== undefined ? await readFile(request.path) : undefined;
    const bytes = file ? new Uint8Array(file.buffer, file.byteOffset, file.byteLength) : request.bytes;
    if (!bytes) throw new Error('a measure request needs a path or bytes');
    reply = { id: request.id, result: measureMeshFile(bytes, request.options) };
  } catch (error) {
    reply = { id: request.id, error: error instanceof Error ? error.message : String(error) };
  }
  port.postMessage(reply);
});

port.postMessage({ ready: true });
