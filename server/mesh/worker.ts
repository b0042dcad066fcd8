/**
 * Worker thread entry: reads an uploaded file and measures it, so a large mesh
 * never blocks the HTTP server's event loop.
 */
import { readFile } from 'node:fs/promises';
import { parentPort } from 'node:worker_threads';
import { measureMeshFile } from '../../shared/geometry';
import type { MeasureReply, MeasureRequest } from './protocol';

if (!parentPort) throw new Error('server/mesh/worker.ts must run as a worker thread');
const port = parentPort;

port.on('message', async (request: MeasureRequest) => {
  let reply: MeasureReply;
  try {
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
