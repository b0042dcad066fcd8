/**
 * A stored mesh file, downloaded and parsed in the mesh worker, for a 3D
 * view. The parsed meshes are react-query's (components/queries/meshFiles.ts),
 * so every view of one file shares one parse and one copy of the arrays, and
 * a screen opened again draws at once.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useCallback } from 'react';
import { meshFileKeys, useMeshFileQuery } from '../queries/meshFiles';
import { MeshFileLoadError, type MeshFileError, type MeshFileOptions } from './meshFileLoader';
import type { ViewMesh } from './types';

export type { MeshFileError, MeshFileOptions, MeshUnit } from './meshFileLoader';

export type MeshFileState =
  | { status: 'idle'; mesh: null; error: null; retry: () => void }
  | { status: 'loading'; mesh: null; error: null; retry: () => void }
  | { status: 'ready'; mesh: Required<ViewMesh>; error: null; retry: () => void }
  | { status: 'error'; mesh: null; error: MeshFileError; retry: () => void };

function asMeshFileError(error: unknown): MeshFileError {
  if (error instanceof MeshFileLoadError) return { message: error.message, problems: error.problems };
  return { message: error instanceof Error ? error.message : String(error), problems: [] };
}

/**
 * `useMeshFile('/api/labs/1/parts/7/file', { unit: 'mm' })` -> { status, mesh, error, retry }.
 * Pass a null URL to wait (status 'idle').
 */
export function useMeshFile(url: string | null | undefined, options: MeshFileOptions = {}): MeshFileState {
  const { filename, unit, partName } = options;
  const qc = useQueryClient();
  const query = useMeshFileQuery(url, { filename, unit, partName });
  // A retry starts over (the view shows it loading), rather than refetching behind the old error.
  const retry = useCallback(() => {
    if (url) void qc.resetQueries({ queryKey: meshFileKeys.one(url, { filename, unit, partName }), exact: true });
  }, [qc, url, filename, unit, partName]);

  if (!url) return { status: 'idle', mesh: null, error: null, retry };
  if (query.isSuccess) return { status: 'ready', mesh: query.data, error: null, retry };
  if (query.isError) return { status: 'error', mesh: null, error: asMeshFileError(query.error), retry };
  return { status: 'loading', mesh: null, error: null, retry };
}
