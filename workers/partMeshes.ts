/**
 * The parts' stored files as a web worker gets them: downloaded with the
 * page's session, once (the turned, resting meshes stay in the cache), for
 * the layout slices (workers/layoutProfile.ts) and the packing by shape
 * (workers/shapeInstance.ts).
 */
import type { ProfilePartFile, RestingMeshCache } from '../shared/geometry/layoutSlices';
import type { LayoutProfilePart } from './mesh.protocol';

/** Reads a stored file's bytes; null when it cannot be had (the part then counts as its box, with the reason). */
export type FetchBytes = (url: string) => Promise<Uint8Array | null>;

/** Stored files are read with the page's session (same origin); a file that cannot be had is null. */
export const fetchSameOrigin: FetchBytes = async (url) => {
  const res = await fetch(url, { credentials: 'same-origin' });
  return res.ok ? new Uint8Array(await res.arrayBuffer()) : null;
};

/** The files of the parts with their bytes where needed: a part without a closed mesh, or one read before, needs none. */
export function partFiles(parts: readonly LayoutProfilePart[], meshes: RestingMeshCache, fetchBytes: FetchBytes): Promise<ProfilePartFile[]> {
  return Promise.all(
    parts.map(async (p) => {
      const needed = p.watertight && p.url !== null && meshes.get(p.key) === undefined;
      const bytes = needed ? await fetchBytes(p.url!).catch(() => null) : null;
      return { key: p.key, bytes, filename: p.filename, unit: p.unit, split: p.split, partIndex: p.partIndex, rotationDeg: p.rotationDeg, watertight: p.watertight };
    }),
  );
}
