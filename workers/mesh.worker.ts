/**
 * Parses a mesh file off the main thread for the 3D views. The shared readers
 * do the parsing; this adapter checks the message, flattens the parts into
 * one drawable mesh (or picks one by name) and hands the numbers back as
 * transferred typed arrays, so nothing large is copied between threads.
 *
 * API (through comlink):
 *   parseMesh(bytes: ArrayBuffer, filename: string, unit: 'mm' | 'cm' | 'inch', options?: { partName?: string })
 *     -> { ok: true, mesh: ViewMesh } | { ok: false, problems: MeshProblem[] }
 */
import * as Comlink from 'comlink';
import { MM_PER_UNIT, formatFromFilename, isBinaryStlSize, mergeMeshes, parseMeshFile, type LengthUnit } from '../shared/geometry';
import { createLayoutProfiler } from './layoutProfile';
import { fetchSameOrigin } from './partMeshes';
import type { LayoutProfileAnswer, MeshProblem, MeshWorkerApi, ParseMeshOptions, ParseMeshResult, ViewMesh } from './mesh.protocol';

export type { MeshProblem, ParseMeshOptions, ParseMeshResult, ViewMesh };

const UNITS = Object.keys(MM_PER_UNIT) as LengthUnit[];

/** The work itself, without the thread: exported so it can be tested in node. */
export function parseMeshForView(bytes: unknown, filename: unknown, unit: unknown, options: ParseMeshOptions = {}): ParseMeshResult {
  const problems: MeshProblem[] = [];
  if (!(bytes instanceof ArrayBuffer)) problems.push({ code: 'bad-request', field: 'bytes', message: 'must be an ArrayBuffer holding the file' });
  if (typeof filename !== 'string' || filename.length === 0) problems.push({ code: 'bad-request', field: 'filename', message: 'must be the file name with its extension' });
  if (!UNITS.includes(unit as LengthUnit)) problems.push({ code: 'bad-request', field: 'unit', message: `must be one of ${UNITS.join(', ')}` });
  if (options.partName !== undefined && typeof options.partName !== 'string') problems.push({ code: 'bad-request', field: 'options.partName', message: 'must be a string' });
  if (problems.length > 0) return { ok: false, problems };

  const u8 = new Uint8Array(bytes as ArrayBuffer);
  // A download URL such as /parts/7/file carries no extension; the bytes still say which reader they need.
  const name = formatFromFilename(filename as string) ? (filename as string) : `${filename as string}${sniffExtension(u8) ?? ''}`;
  const parsed = parseMeshFile(u8, { filename: name, unit: unit as LengthUnit });
  if (!parsed.ok) return { ok: false, problems: parsed.problems };

  let parts = parsed.parts;
  if (options.partName !== undefined) {
    parts = parts.filter((p) => p.name === options.partName);
    if (parts.length === 0) {
      return {
        ok: false,
        problems: [{ code: 'part-not-found', field: 'options.partName', message: `"${filename as string}" has no part named "${options.partName}".` }],
      };
    }
  }
  const merged = parts.length === 1 ? parts[0] : mergeMeshes(parts);

  const n = merged.positions.length / 3;
  const positions = new Float32Array(merged.positions.length);
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < 3; a++) {
      const v = merged.positions[3 * i + a];
      positions[3 * i + a] = v;
      if (v < min[a]) min[a] = v;
      if (v > max[a]) max[a] = v;
    }
  }
  // The parser may share its index buffer with a part; copy so the transfer cannot detach anything else.
  const indices = merged.indices.slice();
  return {
    ok: true,
    mesh: {
      positions,
      indices,
      bboxMinMm: min,
      bboxMaxMm: max,
      sizeMm: [max[0] - min[0], max[1] - min[1], max[2] - min[2]],
      triangles: indices.length / 3,
      partNames: parsed.parts.map((p) => p.name),
    },
  };
}

/**
 * The format from the first bytes: a ZIP local header ("PK\x03\x04", the
 * 3MF package), a binary STL whose size is 84 + 50 n for its facet count n
 * (the 1989 STL layout), ASCII STL's "solid" keyword, or OBJ's "v" lines.
 */
export function sniffExtension(bytes: Uint8Array): '.3mf' | '.stl' | '.obj' | null {
  if (bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04) return '.3mf';
  if (bytes.length >= 84) {
    const facets = new DataView(bytes.buffer, bytes.byteOffset + 80, 4).getUint32(0, true);
    if (isBinaryStlSize(bytes.length, facets)) return '.stl';
  }
  const head = new TextDecoder().decode(bytes.subarray(0, 4096));
  if (/^\s*solid\b/.test(head)) return '.stl';
  if (/^\s*v\s+[-+.\d]/m.test(head)) return '.obj';
  return null;
}

/** Comlink answers with promises; the worker's own calls are plain. */
type Plain<A> = { [K in keyof A]: A[K] extends (...args: infer P) => Promise<infer R> ? (...args: P) => R | Promise<R> : never };

/** Stored files are read with the page's session; a file that cannot be had counts as its box. */
const profileLayout = createLayoutProfiler(fetchSameOrigin);

const api: Plain<MeshWorkerApi> = {
  parseMesh(bytes, filename, unit, options) {
    let result: ParseMeshResult;
    try {
      result = parseMeshForView(bytes, filename, unit, options ?? {});
    } catch (err) {
      // A reader should refuse with problems, never throw; if one does, the view still gets words, not a stack.
      result = { ok: false, problems: [{ code: 'bad-request', message: `"${String(filename)}" could not be read: ${err instanceof Error ? err.message : String(err)}` }] };
    }
    if (!result.ok) return result;
    return Comlink.transfer(result, [result.mesh.positions.buffer as ArrayBuffer, result.mesh.indices.buffer as ArrayBuffer]);
  },
  async profileLayout(job) {
    let answer: LayoutProfileAnswer;
    try {
      answer = await profileLayout(job);
    } catch (err) {
      answer = { ok: false, message: err instanceof Error ? err.message : String(err) };
    }
    if (!answer.ok) return answer;
    // The sums are new arrays of each call (the caches keep only the parts' sections): handed over, not copied.
    return Comlink.transfer(answer, [answer.areaProfile.buffer as ArrayBuffer, answer.contourProfile.buffer as ArrayBuffer]);
  },
};

export type { MeshWorkerApi };

// Only expose inside a worker (self without a document); importing this file in tests must not listen on anything.
declare const self: unknown;
if (typeof self !== 'undefined' && typeof (globalThis as { document?: unknown }).document === 'undefined' && typeof (self as { postMessage?: unknown }).postMessage === 'function') {
  Comlink.expose(api);
}
