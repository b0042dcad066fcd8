import { queryOptions, useQuery, type QueryClient } from '@tanstack/react-query';
import { fetchMeshFile, type MeshFileOptions, type ParseMesh } from '../viewer/meshFileLoader';

/**
 * Parsed meshes of stored files for the 3D views, kept by URL and the unit
 * and part asked for, so the part page, the library's previews and the
 * chamber view share one download, one parse and one copy of the arrays.
 *
 * The keys sit outside the lab's `['labs', labId, …]` reads on purpose: a
 * change announced for the lab's parts must not download and parse every
 * mesh on screen again.
 */
export const meshFileKeys = {
  all: () => ['meshFiles'] as const,
  url: (url: string) => ['meshFiles', url] as const,
  one: (url: string, options: MeshFileOptions) =>
    ['meshFiles', url, { unit: options.unit ?? 'mm', partName: options.partName ?? null, filename: options.filename ?? null }] as const,
};

/**
 * A file's bytes change only when its part is given another file, so a mesh
 * stays fresh for a working session: leaving the plan editor and coming back
 * draws the chamber from the cache without parsing again.
 */
export const MESH_STALE_MS = 30 * 60_000;
/** A mesh no view shows is dropped after this long… */
export const MESH_GC_MS = 30 * 60_000;
/** …or sooner, oldest first, when more than this many are kept unseen (about a page of library previews). */
export const MESH_UNSEEN_LIMIT = 24;

/** Drops the meshes no view shows beyond the newest `limit`, so large files do not pile up in memory. */
export function trimMeshFiles(qc: QueryClient, limit = MESH_UNSEEN_LIMIT): void {
  const unseen = qc
    .getQueryCache()
    .findAll({ queryKey: meshFileKeys.all(), type: 'inactive', fetchStatus: 'idle', predicate: (q) => q.state.status === 'success' })
    .sort((a, b) => b.state.dataUpdatedAt - a.state.dataUpdatedAt);
  for (const q of unseen.slice(limit)) qc.removeQueries({ queryKey: q.queryKey, exact: true });
}

/** Drops cached meshes (all, or one URL's), e.g. after a part's file is replaced. */
export function forgetMeshFiles(qc: QueryClient, url?: string): void {
  qc.removeQueries({ queryKey: url === undefined ? meshFileKeys.all() : meshFileKeys.url(url) });
}

/** The query of one file's mesh; `parse` is the mesh worker unless given. */
export function meshFileQuery(url: string, options: MeshFileOptions = {}, parse?: ParseMesh) {
  return queryOptions({
    queryKey: meshFileKeys.one(url, options),
    queryFn: async ({ client }) => {
      const mesh = await fetchMeshFile(url, options, parse);
      trimMeshFiles(client);
      return mesh;
    },
    staleTime: MESH_STALE_MS,
    gcTime: MESH_GC_MS,
    // A file that cannot be read fails the same way again: the view offers a retry instead.
    retry: false,
    refetchOnWindowFocus: false,
    // Typed arrays of a new parse are never equal to the old ones: skip the deep comparison.
    structuralSharing: false,
  });
}

/** Waits (disabled) while `url` is null. */
export function useMeshFileQuery(url: string | null | undefined, options: MeshFileOptions = {}) {
  return useQuery({ ...meshFileQuery(url ?? '', options), enabled: !!url });
}
